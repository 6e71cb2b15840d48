// Pure maths of the spectrum viewer: where a marker sits on the plot, what the cursor reads, how a long
// series is reduced for display, which points are peaks (the steps: peak-steps.ts) and how the view zooms and pans.
// No React, DOM or uPlot here, so the client tests exercise exactly what the screen uses.
import { hzDecimals } from "./cursor-resolve.ts";

export interface LinearScale {
  /** Value at the left edge of the plot area. */
  min: number;
  /** Value at the right edge of the plot area. */
  max: number;
}

export interface PlotBox {
  /** Left edge of the plot area, px (CSS or canvas pixels, the caller's choice). */
  left: number;
  width: number;
}

/** x pixel of a value on a linear axis, or null when it lies outside the visible range. */
export function valueToX(value: number, scale: LinearScale, box: PlotBox): number | null {
  const span = scale.max - scale.min;
  if (!(span > 0) || !Number.isFinite(value)) return null;
  if (value < scale.min || value > scale.max) return null;
  return box.left + ((value - scale.min) / span) * box.width;
}

/** Inverse of valueToX (unclamped). */
export function xToValue(x: number, scale: LinearScale, box: PlotBox): number {
  return scale.min + ((x - box.left) / box.width) * (scale.max - scale.min);
}

export interface MarkerLike {
  name: string;
  family: string;
  hz: number;
  level: number;
  channel: string;
}

export interface PlacedMarker<M extends MarkerLike = MarkerLike> {
  marker: M;
  x: number;
  /** Label row from the top (0, 1, 2 …) so neighbouring labels do not overlap. */
  row: number;
  /**
   * False when the label is left off so it does not overlap: its line sits on top of a stronger marker's line
   * (e.g. 1× and 1× ± pole pass at full range), or every label row is taken there. The line is still drawn; the
   * label shows on hover, and by itself once the view is zoomed far enough to separate the lines.
   */
  labelled: boolean;
}

/**
 * The markers a channel shows. The engine tags each marker with the channel it was measured on, and the
 * frequencies hold for every phase or axis, so per family: the channel's own markers of that family, else those of
 * the first of `channelNames` (the viewer's channels) that has the family, else of any channel. `markerSource` is
 * the channel the borrowed markers come from (the channel itself when nothing is borrowed); `partly` says whether
 * some families are the channel's own.
 */
export function markersForChannel<M extends MarkerLike>(
  markers: readonly M[],
  channel: string,
  channelNames: readonly string[],
): { channelMarkers: M[]; markerSource: string; partly: boolean } {
  const families = [...new Set(markers.map((m) => m.family))];
  const out: M[] = [];
  let source: string | null = null;
  let own = 0;
  for (const family of families) {
    const of = markers.filter((m) => m.family === family);
    const mine = of.filter((m) => m.channel === channel);
    if (mine.length) {
      out.push(...mine);
      own++;
      continue;
    }
    const from = channelNames.find((n) => of.some((m) => m.channel === n)) ?? of[0].channel;
    out.push(...of.filter((m) => m.channel === from));
    source ??= from;
  }
  return { channelMarkers: out, markerSource: source ?? channel, partly: source !== null && own > 0 };
}

/**
 * Places the markers of the enabled families on the x axis (exactly at the engine's frequencies) and stacks
 * their labels in rows so that two labels closer than their width never share a row. Lines closer than
 * `mergePx` (they look like one line) keep only the label of the strongest; a label that finds no free row
 * within `maxRows` is left off rather than drawn over another.
 */
export function placeMarkers<M extends MarkerLike>(
  markers: readonly M[],
  scale: LinearScale,
  box: PlotBox,
  opts: { families?: ReadonlySet<string>; channel?: string; labelWidth?: (m: M) => number; maxRows?: number; mergePx?: number } = {},
): PlacedMarker<M>[] {
  const width = opts.labelWidth ?? ((m: M) => 8 + 7 * m.name.length);
  const maxRows = opts.maxRows ?? 4;
  const mergePx = opts.mergePx ?? 3;
  const visible: { marker: M; x: number }[] = [];
  for (const m of markers) {
    if (opts.families && !opts.families.has(m.family)) continue;
    if (opts.channel !== undefined && m.channel !== opts.channel) continue;
    const x = valueToX(m.hz, scale, box);
    if (x !== null) visible.push({ marker: m, x });
  }
  visible.sort((a, b) => a.x - b.x);
  // Runs of lines each within mergePx of the previous one: only the strongest of a run gets a label.
  const labelled = new Array<boolean>(visible.length).fill(true);
  for (let i = 0; i < visible.length; ) {
    let j = i;
    while (j + 1 < visible.length && visible[j + 1].x - visible[j].x < mergePx) j++;
    let best = i;
    for (let k = i + 1; k <= j; k++) if (visible[k].marker.level > visible[best].marker.level) best = k;
    for (let k = i; k <= j; k++) labelled[k] = k === best;
    i = j + 1;
  }
  const rowEnds: number[] = [];
  return visible.map(({ marker, x }, i) => {
    if (!labelled[i]) return { marker, x, row: 0, labelled: false };
    const w = width(marker);
    const left = x - w / 2;
    let row = rowEnds.findIndex((end) => end <= left);
    if (row === -1 && rowEnds.length < maxRows) row = rowEnds.length;
    if (row === -1) return { marker, x, row: 0, labelled: false };
    rowEnds[row] = x + w / 2;
    return { marker, x, row, labelled: true };
  });
}

// ---------------------------------------------------------------------------------------------------------
// Cursor readout

export interface CursorReadout {
  hz: number;
  level: number | null;
  /** hz − supply, Hz; null without a supply frequency. */
  offsetHz: number | null;
  /** Slip frequency s·f, Hz; null without slip. */
  slipHz: number | null;
  /** (hz − f) / (s·f): the offset in multiples of the slip frequency; null without slip. */
  slipMultiple: number | null;
  /** hz / f: the harmonic order of the supply. */
  supplyOrder: number | null;
  /** Offset written in the viewer's notation, e.g. "f − 2.00sf" or "f + 3.10 Hz". */
  label: string;
  /** Decimals of hz and of the offset in Hz: as many as the precision of hz allows (3 when it is not given). */
  hzDigits: number;
  /** Decimals of the harmonic order hz / f. */
  orderDigits: number;
  /** How precisely hz is known, Hz (null when not given). */
  precisionHz: number | null;
}

const MINUS = "\u2212";

/** Signed number with a typographic minus. */
export function signed(x: number, digits: number): string {
  const s = Math.abs(x).toFixed(digits);
  if (Number(s) === 0) return `+${s}`;
  return x < 0 ? `${MINUS}${s}` : `+${s}`;
}

/**
 * The offset as "f ± k·sf" when slip is known, else "f ± Δ Hz", with `digits.multiple` decimals of k (2 unless
 * given) and `digits.hz` of Δ (3 unless given).
 */
export function offsetLabel(offsetHz: number | null, slipMultiple: number | null, digits: { hz?: number; multiple?: number } = {}): string {
  if (offsetHz === null) return "—";
  if (slipMultiple !== null && Number.isFinite(slipMultiple)) {
    const d = digits.multiple ?? 2;
    const k = Math.abs(slipMultiple);
    if (Number(k.toFixed(d)) === 0) return "f";
    return `f ${slipMultiple < 0 ? MINUS : "+"} ${k.toFixed(d)}sf`;
  }
  const d = digits.hz ?? 3;
  if (Number(Math.abs(offsetHz).toFixed(d)) === 0) return "f";
  return `f ${offsetHz < 0 ? MINUS : "+"} ${Math.abs(offsetHz).toFixed(d)} Hz`;
}

/**
 * What the cursor reads at hz. The label uses multiples of s·f near the supply line (|k| ≤ maxMultiple, where the
 * rotor-related sidebands live) and plain hertz further out, where a multiple of s·f means nothing to an analyst.
 * With `precisionHz` (how precisely hz is known) every number derived from hz shows only the decimals that
 * precision allows: hz and the offset in Hz up to 4, the multiple of s·f up to 2, the order of f up to 3.
 */
export function cursorReadout(
  hz: number,
  level: number | null,
  supplyHz: number | null,
  slip: number | null,
  maxMultiple = 20,
  precisionHz: number | null = null,
): CursorReadout {
  const offsetHz = supplyHz !== null && Number.isFinite(supplyHz) ? hz - supplyHz : null;
  const slipHz = supplyHz !== null && slip !== null && slip > 0 ? slip * supplyHz : null;
  const slipMultiple = offsetHz !== null && slipHz !== null ? offsetHz / slipHz : null;
  const supplyOrder = supplyHz !== null && supplyHz > 0 ? hz / supplyHz : null;
  const near = slipMultiple !== null && Math.abs(slipMultiple) <= maxMultiple;
  const p = precisionHz;
  const hzDigits = p === null ? 3 : hzDecimals(p, 4);
  const multipleDigits = p === null || slipHz === null ? 2 : hzDecimals(p / slipHz, 2);
  const orderDigits = p === null || supplyOrder === null ? 3 : hzDecimals(p / supplyHz!, 3);
  const label = offsetLabel(offsetHz, near ? slipMultiple : null, { hz: hzDigits, multiple: multipleDigits });
  return { hz, level, offsetHz, slipHz, slipMultiple, supplyOrder, label, hzDigits, orderDigits, precisionHz: p };
}

/** Index of the sample nearest to hz in an ascending array (binary search); -1 for an empty array. */
export function nearestIndex(xs: ArrayLike<number>, hz: number): number {
  const n = xs.length;
  if (n === 0) return -1;
  let lo = 0;
  let hi = n - 1;
  if (hz <= xs[0]) return 0;
  if (hz >= xs[hi]) return hi;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (xs[mid] <= hz) lo = mid;
    else hi = mid;
  }
  return hz - xs[lo] <= xs[hi] - hz ? lo : hi;
}

// ---------------------------------------------------------------------------------------------------------
// Min/max decimation

export interface MinMaxSeries {
  x: Float64Array;
  min: Float64Array;
  max: Float64Array;
}

/**
 * Reduces (x, min, max) to at most `buckets` buckets of equal width in x over [xMin, xMax]: each bucket keeps
 * the lowest min and the highest max of its samples, at the x of its highest max (so a peak stays where it is).
 * When the range holds ≤ buckets samples they come back unchanged (full resolution). Empty buckets are dropped.
 */
export function minMaxDecimate(
  x: ArrayLike<number>,
  min: ArrayLike<number>,
  max: ArrayLike<number>,
  buckets: number,
  xMin = x.length ? x[0] : 0,
  xMax = x.length ? x[x.length - 1] : 0,
): MinMaxSeries {
  let first = 0;
  while (first < x.length && x[first] < xMin) first++;
  let last = x.length - 1;
  while (last >= first && x[last] > xMax) last--;
  const count = last - first + 1;
  if (count <= 0) return { x: new Float64Array(0), min: new Float64Array(0), max: new Float64Array(0) };
  if (count <= buckets) {
    return {
      x: Float64Array.from({ length: count }, (_, i) => x[first + i]),
      min: Float64Array.from({ length: count }, (_, i) => min[first + i]),
      max: Float64Array.from({ length: count }, (_, i) => max[first + i]),
    };
  }
  const outX: number[] = [];
  const outMin: number[] = [];
  const outMax: number[] = [];
  const width = (xMax - xMin) / buckets || 1;
  let i = first;
  for (let b = 0; b < buckets && i <= last; b++) {
    const end = b === buckets - 1 ? Infinity : xMin + (b + 1) * width;
    let lo = Infinity;
    let hi = -Infinity;
    let hiX = NaN;
    while (i <= last && x[i] < end) {
      if (min[i] < lo) lo = min[i];
      if (max[i] > hi) {
        hi = max[i];
        hiX = x[i];
      }
      i++;
    }
    if (hi > -Infinity) {
      outX.push(hiX);
      outMin.push(lo);
      outMax.push(hi);
    }
  }
  return { x: Float64Array.from(outX), min: Float64Array.from(outMin), max: Float64Array.from(outMax) };
}

/**
 * The plot's columns for a min/max answer whose min and max each sit at their own bin (server/spectra.ts): one
 * ascending x array holding both (a bin that holds a bucket's min and max once), max null where only a min sits and
 * min null where only a max sits (both drawn with spanGaps), and the overlay (given on the hz grid) carried along.
 * Without minHz (every point one bin, min = max) the columns are the input.
 */
export function envelopeColumns(
  hz: ArrayLike<number>,
  max: ArrayLike<number>,
  min: ArrayLike<number>,
  minHz: ArrayLike<number> | null | undefined,
  overlay: readonly (number | null)[] | null = null,
): { x: number[]; max: (number | null)[]; min: (number | null)[]; overlay: (number | null)[] | null } {
  if (!minHz || minHz.length !== hz.length) return { x: Array.from(hz), max: Array.from(max), min: Array.from(min), overlay: overlay ? [...overlay] : null };
  const x: number[] = [];
  const hi: (number | null)[] = [];
  const lo: (number | null)[] = [];
  const ov: (number | null)[] | null = overlay ? [] : null;
  let i = 0;
  let j = 0;
  while (i < hz.length || j < minHz.length) {
    const a = i < hz.length ? hz[i] : Infinity;
    const b = j < minHz.length ? minHz[j] : Infinity;
    if (a === b) {
      x.push(a);
      hi.push(max[i]);
      lo.push(min[j]);
      ov?.push(overlay![i]);
      i++;
      j++;
    } else if (a < b) {
      x.push(a);
      hi.push(max[i]);
      lo.push(null);
      ov?.push(overlay![i]);
      i++;
    } else {
      x.push(b);
      hi.push(null);
      lo.push(min[j]);
      ov?.push(null);
      j++;
    }
  }
  return { x, max: hi, min: lo, overlay: ov };
}

/**
 * Puts a second series (e.g. an earlier capture) on the x grid of the first, for one uPlot x array: each
 * target point takes the highest source value between the midpoints to its neighbours, or the linearly
 * interpolated value when no source sample falls there; null outside the source's range.
 */
export function resampleOnto(target: ArrayLike<number>, srcX: ArrayLike<number>, srcY: ArrayLike<number>): (number | null)[] {
  const out: (number | null)[] = new Array(target.length).fill(null);
  const n = srcX.length;
  if (n === 0) return out;
  let j = 0;
  for (let i = 0; i < target.length; i++) {
    const t = target[i];
    if (t < srcX[0] || t > srcX[n - 1]) continue;
    const lo = i > 0 ? (target[i - 1] + t) / 2 : t;
    const hi = i < target.length - 1 ? (t + target[i + 1]) / 2 : t;
    while (j < n && srcX[j] < lo) j++;
    let best = -Infinity;
    let k = j;
    while (k < n && srcX[k] <= hi) {
      if (srcY[k] > best) best = srcY[k];
      k++;
    }
    if (best > -Infinity) {
      out[i] = best;
      continue;
    }
    // no source sample in this bucket: interpolate between the neighbours
    const r = Math.min(Math.max(j, 1), n - 1);
    const x0 = srcX[r - 1];
    const x1 = srcX[r];
    const w = x1 > x0 ? (t - x0) / (x1 - x0) : 0;
    out[i] = srcY[r - 1] + w * (srcY[r] - srcY[r - 1]);
  }
  return out;
}

// ---------------------------------------------------------------------------------------------------------
// Peak stepping

/**
 * Indices of local maxima of y whose topographic prominence is at least `prominence`: the height above the
 * higher of the two lowest points between the peak and the nearest higher sample on each side (searched at most
 * `halfWidth` samples away; a side without a higher sample uses its lowest point in that reach). Plateaus count
 * once (their first sample); maxima at the ends of the data do not count.
 */
export function findPeaks(y: ArrayLike<number>, opts: { prominence?: number; halfWidth?: number } = {}): number[] {
  const prominence = opts.prominence ?? 3;
  const reach = Math.max(1, opts.halfWidth ?? 200);
  const n = y.length;
  const peaks: number[] = [];
  for (let i = 1; i < n; i++) {
    const v = y[i];
    if (!Number.isFinite(v)) continue;
    if (y[i - 1] >= v) continue; // not the first sample of a rise
    let j = i + 1;
    while (j < n && y[j] === v) j++; // plateau
    if (j >= n || y[j] > v) continue; // cut off at the end, or still rising
    let leftMin = v;
    for (let k = i - 1; k >= Math.max(0, i - reach); k--) {
      if (y[k] > v) break;
      if (y[k] < leftMin) leftMin = y[k];
    }
    let rightMin = v;
    for (let k = j; k < Math.min(n, j + reach); k++) {
      if (y[k] > v) break;
      if (y[k] < rightMin) rightMin = y[k];
    }
    if (v - Math.max(leftMin, rightMin) >= prominence) peaks.push(i);
  }
  return peaks;
}

// ---------------------------------------------------------------------------------------------------------
// Zoom and pan

export interface Range {
  min: number;
  max: number;
}

/** Zoom by `factor` (< 1 zooms in) about `center`, kept inside `bounds` and no narrower than minSpan. */
export function zoomRange(view: Range, factor: number, bounds: Range, center = (view.min + view.max) / 2, minSpan = 0): Range {
  const boundSpan = bounds.max - bounds.min;
  const span = Math.min(boundSpan, Math.max(minSpan, (view.max - view.min) * factor));
  const frac = view.max > view.min ? (center - view.min) / (view.max - view.min) : 0.5;
  const min = center - frac * span;
  return clampRange({ min, max: min + span }, bounds);
}

/** Shift the view by `fraction` of its width (positive: to higher x), kept inside bounds. */
export function panRange(view: Range, fraction: number, bounds: Range): Range {
  const d = (view.max - view.min) * fraction;
  return clampRange({ min: view.min + d, max: view.max + d }, bounds);
}

export function clampRange(view: Range, bounds: Range): Range {
  const span = Math.min(view.max - view.min, bounds.max - bounds.min);
  let min = view.min;
  if (min < bounds.min) min = bounds.min;
  if (min + span > bounds.max) min = bounds.max - span;
  return { min, max: min + span };
}

/**
 * The band around the supply line the viewer opens with: ±5·sf, so the broken-bar pair at f ± 2sf sits well
 * inside; at least ±5 Hz, at most ±f/2.
 */
export function supplyWindow(supplyHz: number, slip: number | null): Range {
  const sf = slip && slip > 0 ? slip * supplyHz : 0;
  const half = Math.max(5, Math.min(supplyHz * 0.5, 5 * sf));
  return { min: Math.max(0, supplyHz - half), max: supplyHz + half };
}

// ---------------------------------------------------------------------------------------------------------
// Waveform envelope

/**
 * The min/max envelope of a decimated waveform over at least one period. When each bucket is shorter than a
 * cycle, a bucket's max catches the crest in some buckets and not in others, and a line through them beats; the
 * running max (min) over the `window` buckets that span one period holds the crest (trough) at every point.
 * `window` is 1 (the input unchanged) when a bucket already spans a period.
 */
export function periodEnvelope(
  t: ArrayLike<number>,
  min: ArrayLike<number>,
  max: ArrayLike<number>,
  periodS: number,
): { min: number[]; max: number[]; window: number } {
  const n = t.length;
  const dt = n > 1 ? (t[n - 1] - t[0]) / (n - 1) : 0;
  const window = dt > 0 && periodS > 0 ? Math.max(1, Math.ceil(periodS / dt - 1e-9)) : 1;
  if (window <= 1) return { min: Array.from(min), max: Array.from(max), window: 1 };
  const before = Math.floor((window - 1) / 2);
  const lo = new Array<number>(n);
  const hi = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    let a = Infinity;
    let b = -Infinity;
    // Centred on i; at the ends shifted inwards, so every point still spans a whole period.
    const from = Math.max(0, Math.min(i - before, n - window));
    for (let j = from; j < Math.min(n, from + window); j++) {
      if (min[j] < a) a = min[j];
      if (max[j] > b) b = max[j];
    }
    lo[i] = a;
    hi[i] = b;
  }
  return { min: lo, max: hi, window };
}
