// Data-quality checks. Problems are reported as verdicts in quality[], never thrown: a capture with a problem
// still gets every reading that can be trusted.
import type { QualityVerdict } from "./types.ts";

export interface ChannelStats {
  mean: number;
  /** r.m.s. after removing the mean. */
  rms: number;
  min: number;
  max: number;
  /** Share of samples in runs of ≥ 3 identical values at either rail. */
  railFraction: number;
  longestRailRun: number;
  crestFactor: number;
}

/** One pass over the samples. */
export function channelStats(x: ArrayLike<number>): ChannelStats {
  const n = x.length;
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    sum += v;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  const mean = n ? sum / n : 0;
  // Second pass: the spread about the mean, and clipping — flat runs at the rails. A clipped ADC or amplifier
  // returns the same value sample after sample; an unclipped sine oversampled many times only lingers near its
  // peak without repeating it exactly.
  const range = max - min;
  const tol = 1e-4 * range;
  let ss = 0;
  let inRuns = 0;
  let longest = 0;
  let run = 1;
  let prev = n ? x[0] : 0;
  if (n) ss += (prev - mean) * (prev - mean);
  for (let i = 1; i < n; i++) {
    const v = x[i];
    const dv = v - mean;
    ss += dv * dv;
    if (v === prev && (Math.abs(v - max) <= tol || Math.abs(v - min) <= tol)) run++;
    else {
      if (run >= 3) inRuns += run;
      if (run > longest) longest = run;
      run = 1;
    }
    prev = v;
  }
  if (n) {
    // the run still open at the end
    if (run >= 3) inRuns += run;
    if (run > longest) longest = run;
  }
  const rms = n ? Math.sqrt(ss / n) : 0;
  const peak = Math.max(Math.abs(max - mean), Math.abs(min - mean));
  return { mean, rms, min, max, railFraction: n ? inRuns / n : 0, longestRailRun: longest, crestFactor: rms ? peak / rms : 0 };
}

/** ≥ 0.1 % of samples in flat runs of ≥ 3 at the rails (domain.md §8, common practice). */
export const CLIP_FRACTION = 0.001;
/** |mean|/r.m.s. above 5 % is flagged for current (domain.md §8, 2–5 %, common practice). */
export const DC_OFFSET_RATIO = 0.05;

/** The clipping rule above: enough samples in flat runs at the rails. */
export const isClipped = (st: Pick<ChannelStats, "railFraction" | "longestRailRun">) => st.railFraction >= CLIP_FRACTION && st.longestRailRun >= 3;

export function channelVerdicts(name: string, kind: string, st: ChannelStats): QualityVerdict[] {
  const out: QualityVerdict[] = [];
  if (st.rms === 0) {
    out.push({ code: "flat-channel", severity: "error", message: `${name}: the channel is constant (no signal).`, channel: name });
    return out;
  }
  if (isClipped(st)) {
    out.push({
      code: "clipping",
      severity: "error",
      message: `${name}: ${(st.railFraction * 100).toFixed(2)} % of samples sit flat at the rails (crest factor ${st.crestFactor.toFixed(2)}; a sine has 1.41). Sidebands and harmonics are not trustworthy: increase the range and re-measure.`,
      channel: name,
    });
  }
  const ratio = Math.abs(st.mean) / st.rms;
  if (kind === "current" && ratio > DC_OFFSET_RATIO) {
    out.push({
      code: "dc-offset",
      severity: "warning",
      message: `${name}: DC offset ${st.mean.toPrecision(3)} is ${(ratio * 100).toFixed(1)} % of the r.m.s. (> ${DC_OFFSET_RATIO * 100} %); removed before analysis, but check the clamp's zero.`,
      channel: name,
    });
  }
  return out;
}
