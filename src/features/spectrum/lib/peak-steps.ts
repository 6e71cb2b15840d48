// Where the cursor keys (← / →) step: to lines that stand clearly above the local noise floor, and to the engine's
// markers. Pure (no React, DOM or uPlot), so tests/client/peak-steps.test.ts exercises what the screen uses.
//
// A local maximum of a noise floor can have 10 dB or more of topographic prominence (the floor's own dips between
// bumps are deep), so prominence alone walks the bumps of the floor. A line is told from a bump by its height over
// the floor's typical level there: the running median of the points around it, which the few points of a line do
// not move. The defaults: a window of 101 points (2–4 Hz of the around-supply view at full resolution, one
// twentieth of a decimated view), and a line at least 10 dB over that median and 10 dB prominent. The noise power
// of one periodogram bin is exponential, so a bin passes its median by 10 dB with probability 2^−10 (common
// practice: chi-squared with 2 degrees of freedom); over a few hundred independent bins of a view that is rarely
// once.
import { findPeaks } from "./viewer-math.ts";

export interface LinePeakOptions {
  /** Half-width of the running-median window, in points (the window holds 2·h + 1 points). */
  floorHalfWindow?: number;
  /** How far above the local floor a line must stand, dB. */
  aboveFloorDb?: number;
  /** Topographic prominence a line needs besides (findPeaks), dB. */
  prominenceDb?: number;
  /** How far findPeaks looks on each side for the prominence, in points. */
  halfWidth?: number;
  /** Drop side lobes of stronger lines (needs the frequencies, `x`). */
  leakage?: Leakage | null;
}

export const LINE_PEAK_DEFAULTS = { floorHalfWindow: 50, aboveFloorDb: 10, prominenceDb: 10, halfWidth: 400 };

/**
 * A window's side lobes: the highest level (dB re a line) its leakage may reach d resolution cells (1/T) away.
 * With zero padding the side lobes between their nulls are drawn as peaks of their own, tall and prominent; one
 * within this envelope of a stronger line (plus `marginDb`) is taken as that line's leakage, not a line.
 */
export interface Leakage {
  resolutionHz: number;
  envelopeDb: (cells: number) => number;
  marginDb?: number;
}

/**
 * The Hann window's side-lobe envelope (the viewer's current spectra use Hann): the main lobe reaches ±2 cells;
 * the first side lobe is −31.5 dB, and the lobes fall 18 dB per octave (domain.md §2, window table). From the
 * first lobe at about 2.4 cells this gives −50.6, −55.3, −59.3, −62.8, −68.6 dB at 5, 6, 7, 8, 10 cells, within
 * 2 dB of domain.md's worst case over the fractional offset (−48.7, −54, −58.5, −62.3, −68.5 dB); the default
 * 3 dB margin covers the difference.
 */
export function hannSidelobeDb(cells: number): number {
  const d = Math.abs(cells);
  if (d < 2) return 0;
  return -31.5 - 18 * Math.log2(Math.max(d, 2.4) / 2.4);
}

/**
 * The running median of y over windows of min(n, 2·h + 1) points: centred on each point, shifted inwards at the
 * ends so every point's window is full. NaN counts as −∞ (below everything).
 */
export function runningMedian(y: ArrayLike<number>, halfWindow: number): Float64Array {
  const n = y.length;
  const out = new Float64Array(n);
  if (n === 0) return out;
  const h = Math.max(0, Math.floor(halfWindow));
  const w = Math.min(n, 2 * h + 1);
  const val = (i: number) => (Number.isNaN(y[i]) ? -Infinity : y[i]);
  const sorted: number[] = [];
  /** First index in `sorted` holding a value ≥ v. */
  const lowerBound = (v: number) => {
    let a = 0;
    let b = sorted.length;
    while (a < b) {
      const m = (a + b) >> 1;
      if (sorted[m] < v) a = m + 1;
      else b = m;
    }
    return a;
  };
  for (let i = 0; i < w; i++) sorted.splice(lowerBound(val(i)), 0, val(i));
  let from = 0;
  const mid = (w - 1) >> 1;
  for (let i = 0; i < n; i++) {
    const want = Math.max(0, Math.min(i - h, n - w));
    while (from < want) {
      // slide by one: drop the leftmost point, take the next one on the right
      sorted.splice(lowerBound(val(from)), 1);
      const add = val(from + w);
      sorted.splice(lowerBound(add), 0, add);
      from++;
    }
    out[i] = w % 2 ? sorted[mid] : (sorted[mid] + sorted[mid + 1]) / 2;
  }
  return out;
}

/**
 * Indices of the lines of y (a level in dB, at frequencies x): local maxima with at least `prominenceDb` of
 * topographic prominence that also stand at least `aboveFloorDb` over the running median of the points around
 * them, and, with `leakage`, above the side lobes of every stronger one of them.
 */
export function findLinePeaks(x: ArrayLike<number>, y: ArrayLike<number>, opts: LinePeakOptions = {}): number[] {
  const o = { ...LINE_PEAK_DEFAULTS, ...opts };
  const peaks = findPeaks(y, { prominence: o.prominenceDb, halfWidth: o.halfWidth });
  if (!peaks.length) return peaks;
  const floor = runningMedian(y, o.floorHalfWindow);
  const lines = peaks.filter((i) => y[i] - floor[i] >= o.aboveFloorDb);
  const lk = o.leakage;
  if (!lk || !(lk.resolutionHz > 0)) return lines;
  const margin = lk.marginDb ?? 3;
  return lines.filter((i) => !lines.some((j) => y[j] > y[i] && y[i] < y[j] + lk.envelopeDb((x[i] - x[j]) / lk.resolutionHz) + margin));
}

export interface StepTarget<M extends { hz: number } = { hz: number }> {
  hz: number;
  /** The line's point in the data, when a line is there. */
  index: number | null;
  /** The engine's marker there, when there is one: its frequency is the target's. */
  marker: M | null;
}

/**
 * Everything the cursor steps to, in frequency order: each line (findLinePeaks) and each marker in
 * [range.min, range.max] (markers always count, found line or not). A line within `tolHz` of a marker is that
 * marker's line: one target, at the marker's frequency (the engine's, interpolated between bins).
 */
export function stepTargets<M extends { hz: number }>(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  markers: readonly M[],
  opts: LinePeakOptions & { tolHz: number; range?: { min: number; max: number } },
): StepTarget<M>[] {
  const n = x.length;
  const range = opts.range ?? { min: n ? x[0] : 0, max: n ? x[n - 1] : 0 };
  const inView = markers.filter((m) => m.hz >= range.min && m.hz <= range.max).sort((a, b) => a.hz - b.hz);
  const targets: StepTarget<M>[] = inView.map((m) => ({ hz: m.hz, index: null, marker: m }));
  for (const i of findLinePeaks(x, y, opts)) {
    let near: StepTarget<M> | null = null;
    for (const t of targets) {
      if (t.marker && Math.abs(t.marker.hz - x[i]) <= opts.tolHz && (!near || Math.abs(t.hz - x[i]) < Math.abs(near.hz - x[i]))) near = t;
    }
    if (near) near.index ??= i;
    else targets.push({ hz: x[i], index: i, marker: null });
  }
  // Two markers of one frequency (e.g. f − 2sf and a bearing line on top of it) are one stop.
  const out = targets.sort((a, b) => a.hz - b.hz).filter((t, k, all) => k === 0 || Math.abs(t.hz - all[k - 1].hz) > 1e-9);
  return out;
}

/** The first target strictly right (+1) or left (−1) of fromHz, skipping those within epsHz of it; null when none. */
export function nextTarget<T extends { hz: number }>(targets: readonly T[], fromHz: number, direction: 1 | -1, epsHz = 1e-9): T | null {
  if (direction > 0) return targets.find((t) => t.hz > fromHz + epsHz) ?? null;
  for (let i = targets.length - 1; i >= 0; i--) if (targets[i].hz < fromHz - epsHz) return targets[i];
  return null;
}
