// Engine benchmark: FFT speed (vs numpy's rfft when python3 + numpy are present), whole-analysis time and peak
// memory for captures of 2^14 … 2^22 samples × 1–4 channels, and the target case 3 ch × 10 kHz × 20 s.
//
// Peak memory method: each case runs in a fresh child process (`tsx bench/engine.ts --child …`), which builds
// the capture, notes its RSS, analyses it and reports (maxRSS − RSS before analysis) from
// process.resourceUsage() — the growth of the resident set during the analysis, i.e. the engine's peak working
// memory (on Linux the peak is reset just before the analysis and read as VmHWM: see childMain), after one
// warm-up analysis of another capture, whose own growth (compiling the engine) is reported apart. It is compared
// with the capture's own size in Float32 (limit: 10×).
import { spawnSync } from "node:child_process";
import { readFileSync, writeFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import FFT from "fft.js";
import { analyzeCapture } from "../src/engine/analyze.ts";
import { synthCapture } from "../src/engine/synth.ts";
import type { Capture, Nameplate } from "../src/engine/types.ts";

const FS = 10000;
const NAMEPLATE: Nameplate = { poles: 4, ratedRpm: 1470, ratedHz: 50, rotorBars: 28, ratedCurrent: 20 };

/** A quick multi-line current capture (no per-line supply wander), cheaper to build than synthCapture at 2^22. */
export function benchCapture(samples: number, channels: number): Capture {
  const s = 0.02;
  const lines: Array<[number, number]> = [
    [50, 28],
    [50 * (1 - 2 * s), 28 * 10 ** (-45 / 20)],
    [50 * (1 + 2 * s), 28 * 10 ** (-48 / 20)],
    [50 * (1 - (1 - s) / 2), 28 * 10 ** (-48 / 20)],
    [50 * (1 + (1 - s) / 2), 28 * 10 ** (-48 / 20)],
    [50 * (14 * (1 - s) + 1), 28 * 10 ** (-50 / 20)],
    [50 * (14 * (1 - s) - 1), 28 * 10 ** (-50 / 20)],
    [150, 28 * 10 ** (-32 / 20)],
  ];
  let seed = 99;
  const noise = () => {
    seed = (seed * 1103515245 + 12345) >>> 0;
    return seed / 2 ** 32 - 0.5;
  };
  const base = new Float32Array(samples);
  for (const [hz, a] of lines) {
    const w = (2 * Math.PI * hz) / FS;
    for (let i = 0; i < samples; i++) base[i] += a * Math.cos(w * i);
  }
  for (let i = 0; i < samples; i++) base[i] += 0.02 * noise();
  const chans = [];
  for (let c = 0; c < channels; c++) {
    const shift = Math.round((c * FS) / 150); // a third of a 50 Hz period per phase
    const data = new Float32Array(samples);
    for (let i = 0; i < samples; i++) data[i] = base[(i + shift) % samples];
    chans.push({ name: `I${"abcd"[c]}`, kind: "current" as const, position: "ABCD"[c], unit: "A", data });
  }
  return { sampleRate: FS, channels: chans };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1];
}

export function timeAnalysis(capture: Capture, reps: number): number {
  analyzeCapture(capture, NAMEPLATE); // warm-up (JIT, FFT plans, windows)
  const t: number[] = [];
  for (let i = 0; i < reps; i++) {
    const t0 = performance.now();
    analyzeCapture(capture, NAMEPLATE);
    t.push(performance.now() - t0);
  }
  return median(t);
}

/**
 * fft.js realTransform time per call (ms): the best of 5 batches, the same statistic as timeNumpy (min of
 * timeit.repeat), so that load on the machine does not count against one side only.
 */
export function timeFftJs(size: number): number {
  const f = new FFT(size);
  const x = new Float64Array(size);
  for (let i = 0; i < size; i++) x[i] = Math.sin(i * 0.001) + ((i * 7919) % 13) / 13;
  const out = new Float64Array(2 * size);
  const reps = Math.max(3, Math.round(2 ** 22 / size));
  for (let i = 0; i < Math.min(reps, 5); i++) f.realTransform(out, x);
  const batches: number[] = [];
  for (let b = 0; b < 5; b++) {
    const t0 = performance.now();
    for (let i = 0; i < reps; i++) f.realTransform(out, x);
    batches.push((performance.now() - t0) / reps);
  }
  return Math.min(...batches);
}

/**
 * fft.js against numpy for one length, as `pairs` back-to-back pairs (numpy, then fft.js) with the median ratio:
 * one pair swings by ±20 % on a shared machine (seen 1.5–2.3× at 2^20), the median of five much less.
 */
export function pairedFftRatio(size: number, pairs = 5): { ratios: number[]; median: number } | null {
  const ratios: number[] = [];
  for (let k = 0; k < pairs; k++) {
    const np = timeNumpy([size])?.get(size);
    if (np === undefined) return null;
    ratios.push(timeFftJs(size) / np);
  }
  const sorted = [...ratios].sort((a, b) => a - b);
  return { ratios, median: sorted[Math.floor(sorted.length / 2)] };
}

/** numpy.fft.rfft time per call (ms) for each size, or null without python3/numpy. */
export function timeNumpy(sizes: number[]): Map<number, number> | null {
  const code = [
    "import numpy as np, timeit, json, sys",
    "out = {}",
    `for n in ${JSON.stringify(sizes)}:`,
    "    x = np.random.rand(n)",
    "    r = max(3, (1 << 22) // n)",
    "    out[n] = min(timeit.repeat(lambda: np.fft.rfft(x), number=r, repeat=5)) / r * 1000",
    "print(json.dumps(out))",
  ].join("\n");
  const p = spawnSync("python3", ["-c", code], { encoding: "utf8", timeout: 120_000 });
  if (p.status !== 0) return null;
  const obj = JSON.parse(p.stdout) as Record<string, number>;
  return new Map(Object.entries(obj).map(([k, v]) => [Number(k), v]));
}

/** VmRSS / VmHWM (peak) of this process in bytes from /proc/self/status, or null off Linux. */
function procStatusBytes(field: "VmRSS" | "VmHWM"): number | null {
  try {
    const m = new RegExp(`^${field}:\\s+(\\d+) kB`, "m").exec(readFileSync("/proc/self/status", "utf8"));
    return m ? Number(m[1]) * 1024 : null;
  } catch {
    return null;
  }
}

/**
 * Child-process memory probe: prints {ms, peakMb, firstCallMb, captureMb}. The peak is the growth of the resident
 * set during the analysis. maxRSS is the peak over the whole process life, so when loading the modules (tsx
 * compiling them) or building the capture went higher than the analysis does, "maxRSS − RSS before" reports the
 * loading, not the analysis (seen: ~130 MB for a 64 kB capture under `tsx bench/run.ts`). On Linux the peak is
 * therefore reset just before the analysis (write "5" to /proc/self/clear_refs, which resets VmHWM) and read back
 * as VmHWM afterwards.
 *
 * The very first analysis in a process also compiles the engine (bytecode, feedback, optimised code) and grows
 * V8's heap: 1.3–6 MB measured, whatever the capture's size, and paid once per worker, not per capture. So the
 * child first analyses another capture with as many channels but another length (as a worker has done before its next job) and reports that
 * growth as firstCallMb; then it collects garbage, resets the peak and measures the capture itself (peakMb).
 */
function childMain(samples: number, channels: number): void {
  const capture = benchCapture(samples, channels);
  // same channel count (the multi-phase paths compile too), another length (its FFT plans are not the capture's)
  const warmUp = benchCapture(samples === 2 ** 15 ? 2 ** 14 : 2 ** 15, channels);
  const gc = (globalThis as { gc?: () => void }).gc;
  const measure = (c: Capture) => {
    gc?.();
    let reset = false;
    try {
      writeFileSync("/proc/self/clear_refs", "5");
      reset = true;
    } catch {
      /* not Linux, or not allowed: fall back to maxRSS */
    }
    const before = (reset && procStatusBytes("VmRSS")) || process.memoryUsage().rss;
    const t0 = performance.now();
    analyzeCapture(c, NAMEPLATE);
    const ms = performance.now() - t0;
    const hwm = reset ? procStatusBytes("VmHWM") : null;
    const peak = hwm ?? process.resourceUsage().maxRSS * 1024;
    return { ms, mb: Math.max(0, peak - before) / 2 ** 20, method: hwm !== null ? "VmHWM reset" : "maxRSS" };
  };
  const first = measure(warmUp);
  measure(warmUp); // a second time, so that the hot functions are optimised before the measured run, as in a worker
  const run = measure(capture);
  process.stdout.write(JSON.stringify({ ms: run.ms, peakMb: run.mb, firstCallMb: first.mb, captureMb: (samples * channels * 4) / 2 ** 20, method: run.method }));
}

export function measurePeakMemory(samples: number, channels: number): { ms: number; peakMb: number; firstCallMb: number; captureMb: number } | null {
  const self = fileURLToPath(import.meta.url);
  const once = () => {
    // --single-threaded: no background compiler or GC threads growing the resident set during the measured run
    const p = spawnSync(process.execPath, ["--single-threaded", "--expose-gc", "--import", "tsx", self, "--child", String(samples), String(channels)], { encoding: "utf8", timeout: 120_000 });
    return p.status === 0 ? (JSON.parse(p.stdout) as { ms: number; peakMb: number; firstCallMb: number; captureMb: number }) : null;
  };
  // Below a few MB the resident set moves in V8's page steps (256 kB), and pages freed by the collection before the
  // run may or may not be reused: the median of five processes for captures under 1 MB.
  const runs = samples * channels * 4 < 2 ** 20 ? [once(), once(), once(), once(), once()] : [once()];
  const ok = runs.filter((r) => r !== null).sort((a, b) => a.peakMb - b.peakMb);
  return ok.length ? ok[ok.length >> 1] : null;
}

export function targetCase(): number {
  const { capture, nameplate } = synthCapture({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 20, sampleRate: 10000, phases: 3, brokenBars: 1 });
  analyzeCapture(capture, nameplate);
  const t: number[] = [];
  for (let i = 0; i < 7; i++) {
    const t0 = performance.now();
    analyzeCapture(capture, nameplate);
    t.push(performance.now() - t0);
  }
  return median(t);
}

/**
 * The bearing search's share (src/engine/bearings.ts): 3 current phases + 2 accelerometers × 10 kHz × 20 s on a
 * 2-pole motor (its 3× BPFI lines near 800 Hz need a wider band than the 400 Hz low band), analysed with and without
 * two bearings on the nameplate; median of 7 each.
 */
export function bearingCase(): { withMs: number; withoutMs: number } {
  const opts = { poles: 2, supplyHz: 50, slip: 0.012, durationS: 20, sampleRate: 10000, phases: 3 as const, seed: 3 };
  const a = synthCapture({ ...opts, vibration: { axis: "H" } });
  const b = synthCapture({ ...opts, phases: 0, seed: 4, vibration: { axis: "V" } });
  a.capture.channels.push(...b.capture.channels);
  const bearings = [
    { position: "DE" as const, rollingElements: 8, elementDiameterMm: 25.4, pitchDiameterMm: 110 },
    { position: "NDE" as const, rollingElements: 10, elementDiameterMm: 16.669, pitchDiameterMm: 92.5 },
  ];
  const time = (np: typeof a.nameplate) => {
    analyzeCapture(a.capture, np);
    const t: number[] = [];
    for (let i = 0; i < 7; i++) {
      const t0 = performance.now();
      analyzeCapture(a.capture, np);
      t.push(performance.now() - t0);
    }
    return median(t);
  };
  return { withoutMs: time(a.nameplate), withMs: time({ ...a.nameplate, bearings }) };
}

if (process.argv[2] === "--child") childMain(Number(process.argv[3]), Number(process.argv[4]));
