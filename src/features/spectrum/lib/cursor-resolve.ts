// What the cursor reads once it is put on a peak (a click snaps to one, the keys step to one): the best frequency
// known there and how precisely it is known, which sets the decimals shown. Pure (no React, DOM or uPlot).
//
// Best first: the engine's marker when the peak is one of its lines (interpolated between bins); else the
// full-resolution bin of the peak (every point of a spectrum answer is a bin: a decimated answer puts each point
// at the bin of its bucket's max, server/spectra.ts); else, when only a bucket is known, the bucket.

/** Points of one spectrum answer: each x is a bin's frequency; max is its level (a bucket's max when decimated). */
export interface BinPoints {
  x: ArrayLike<number>;
  max: ArrayLike<number>;
  decimated: boolean;
}

export interface ResolveContext {
  /** Bin spacing of the full-resolution spectrum, Hz. */
  binHz: number;
  /** Frequency resolution 1/T, Hz (≥ the bin spacing when the transform was zero-padded). */
  resolutionHz: number;
  /** Bucket width of the view's answer when it is decimated, Hz. */
  bucketHz: number | null;
  /** The markers of the channel (the engine's lines). */
  markers: readonly MarkerHz[];
}

export interface MarkerHz {
  name: string;
  hz: number;
}

export type CursorTarget<M extends MarkerHz = MarkerHz> = { at: "peak"; hz: number } | { at: "marker"; hz: number; marker: M };

export interface ResolvedCursor<M extends MarkerHz = MarkerHz> {
  hz: number;
  /** The level of the line's bin; null while it is not known (a marker inside a bucket held by another line). */
  level: number | null;
  /** How precisely hz is known, Hz: the readout shows as many decimals as this allows (hzDecimals). */
  precisionHz: number;
  source: "marker" | "bin" | "bucket";
  marker: M | null;
}

/** Most decimals a readout shows: the engine rounds marker frequencies to 4. */
export const MAX_HZ_DECIMALS = 4;

/**
 * Decimals for a value known to within `precisionHz`: the last digit's step is at most the precision and more than
 * a tenth of it, so no digit is shown that the data does not hold. 1.25 Hz buckets → 0 (50 Hz); a 0.019 Hz bin →
 * 2 (49.97 Hz); a marker known to 0.0033 Hz → 3 (49.981 Hz).
 */
export function hzDecimals(precisionHz: number, maxDecimals = MAX_HZ_DECIMALS): number {
  if (!(precisionHz > 0) || !Number.isFinite(precisionHz)) return maxDecimals;
  return Math.max(0, Math.min(maxDecimals, Math.ceil(-Math.log10(precisionHz) - 1e-9)));
}

/**
 * How precisely a marker's frequency is known: a tenth of the resolution 1/T. The engine interpolates its lines
 * between bins (domain.md §2, "Peak-frequency interpolation": quadratic-dB under Hann is biased by ≤ 0.02 bin on
 * a clean tone); a tenth of a bin leaves room for noise and supply wander.
 */
export function markerPrecisionHz(resolutionHz: number): number {
  return resolutionHz / 10;
}

/** How far a marker may sit from a peak's bin and still be that peak's line: one resolution cell (or bin). */
export function markerToleranceHz(ctx: Pick<ResolveContext, "binHz" | "resolutionHz">): number {
  return Math.max(ctx.binHz, ctx.resolutionHz);
}

function covers(p: BinPoints | null | undefined, hz: number): p is BinPoints {
  const n = p ? p.x.length : 0;
  return !!p && n > 0 && !p.decimated && hz >= p.x[0] && hz <= p.x[n - 1];
}

function nearest(xs: ArrayLike<number>, hz: number): number {
  let lo = 0;
  let hi = xs.length - 1;
  if (hi < 0) return -1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (xs[mid] <= hz) lo = mid;
    else hi = mid;
  }
  return Math.abs(xs[hi] - hz) < Math.abs(xs[lo] - hz) ? hi : lo;
}

/**
 * The line's bin near hz: the highest full-resolution bin within ±tol (a window fetched around the cursor, or the
 * view itself when it holds every bin); else the decimated view's point there when one is within ±tol (the max
 * bin of its bucket, at its exact frequency); else only the bucket is known (level null).
 */
export function lineBin(hz: number, full: readonly (BinPoints | null | undefined)[], view: BinPoints | null | undefined, ctx: ResolveContext): { hz: number; level: number | null; precisionHz: number; source: "bin" | "bucket" } {
  const tol = markerToleranceHz(ctx);
  const f = full.find((p) => covers(p, hz));
  if (f) {
    let best = -1;
    for (let i = nearest(f.x, hz - tol); i < f.x.length && f.x[i] <= hz + tol; i++) {
      if (f.x[i] < hz - tol) continue;
      if (best < 0 || f.max[i] > f.max[best]) best = i;
    }
    if (best < 0) best = nearest(f.x, hz);
    return { hz: f.x[best], level: f.max[best], precisionHz: ctx.binHz, source: "bin" };
  }
  if (view && view.x.length) {
    const i = nearest(view.x, hz);
    if (Math.abs(view.x[i] - hz) <= tol) return { hz: view.x[i], level: view.max[i], precisionHz: ctx.binHz, source: "bin" };
  }
  return { hz, level: null, precisionHz: ctx.bucketHz ?? ctx.binHz, source: "bucket" };
}

/** The nearest marker within one resolution cell of hz, or null. */
export function markerAt<M extends MarkerHz>(markers: readonly M[], hz: number, tolHz: number): M | null {
  let best: M | null = null;
  for (const m of markers) if (Math.abs(m.hz - hz) <= tolHz && (!best || Math.abs(m.hz - hz) < Math.abs(best.hz - hz))) best = m;
  return best;
}

/**
 * What the cursor reads at a target. A peak: its bin (lineBin), and when a marker lies within one resolution cell
 * of that bin, the marker's frequency with the bin's level. A marker (the keys step to every marker): the marker's
 * frequency, and the level of its line's bin once that bin is known.
 */
export function resolveCursor<M extends MarkerHz>(
  target: CursorTarget<M>,
  full: readonly (BinPoints | null | undefined)[],
  view: BinPoints | null | undefined,
  ctx: ResolveContext & { markers: readonly M[] },
): ResolvedCursor<M> {
  const markerPrecision = markerPrecisionHz(ctx.resolutionHz);
  if (target.at === "marker") {
    const bin = lineBin(target.marker.hz, full, view, ctx);
    return { hz: target.marker.hz, level: bin.source === "bin" ? bin.level : null, precisionHz: markerPrecision, source: "marker", marker: target.marker };
  }
  const bin = lineBin(target.hz, full, view, ctx);
  const m = bin.source === "bin" ? markerAt(ctx.markers, bin.hz, markerToleranceHz(ctx)) : null;
  if (m) return { hz: m.hz, level: bin.level, precisionHz: markerPrecision, source: "marker", marker: m };
  return { ...bin, marker: null };
}
