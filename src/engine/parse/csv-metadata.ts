// Sample rate from comment lines before the header: "# sample_rate=10000", "# fs=10000 Hz", "# fs: 10 kHz",
// "# dt=0.0001 s", "% sampling interval = 100 us".

import { CaptureParseError } from "./errors.ts";

const NUMBER = String.raw`([+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)`;
const RATE_RE = new RegExp(
  String.raw`\b(?:sample[\s_-]*rate|sampling[\s_-]*(?:rate|frequency|freq)|samplerate|sample[\s_-]*freq(?:uency)?|fs|sr)\s*[=:]\s*` +
    NUMBER +
    String.raw`\s*(khz|hz|ksps|sps|ks/s|s/s)?`,
  "i",
);
const INTERVAL_RE = new RegExp(
  String.raw`\b(?:dt|sample[\s_-]*interval|sampling[\s_-]*interval|sample[\s_-]*period|time[\s_-]*step)\s*[=:]\s*` +
    NUMBER +
    String.raw`\s*(ms|us|µs|μs|ns|s)?\b`,
  "i",
);

/** Returns the sample rate in Hz stated in a comment line, or undefined when the line states none. */
export function sampleRateFromComment(text: string, line: number): number | undefined {
  const rate = RATE_RE.exec(text);
  if (rate) {
    const unit = (rate[2] ?? "hz").toLowerCase();
    const hz = Number(rate[1]) * (unit.startsWith("k") ? 1000 : 1);
    return checkRate(hz, rate[0], line);
  }
  const interval = INTERVAL_RE.exec(text);
  if (interval) {
    const unit = (interval[2] ?? "s").toLowerCase();
    const factor = unit === "ms" ? 1e-3 : unit === "s" ? 1 : unit === "ns" ? 1e-9 : 1e-6;
    const seconds = Number(interval[1]) * factor;
    return checkRate(seconds > 0 ? 1 / seconds : 0, interval[0], line);
  }
  return undefined;
}

function checkRate(hz: number, text: string, line: number): number {
  if (!Number.isFinite(hz) || hz <= 0) {
    throw new CaptureParseError(
      "no-sample-rate",
      `Line ${line}: "${text.trim()}" does not give a usable sample rate. Write it as a positive number, e.g. "# sample_rate=10000".`,
      { line },
    );
  }
  return hz;
}
