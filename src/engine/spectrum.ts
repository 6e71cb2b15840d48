// Amplitude spectra in engineering units, peak search with sub-bin interpolation, and the display spectrum.
// Amplitudes are "peak amplitude of a bin-centred tone": amp_k = 2|X_k|/Σw, so a tone A·cos(2πft) reads A.
import { complexFftScratch, complexInputScratch, realInputScratch, transformRealScratch, nextPow2 } from "./fft.ts";
import { makeWindow, enbwBins, type WindowName } from "./windows.ts";
import { decimateReal, zoomComplex, type Decimated } from "./zoom.ts";
import { sinc, quadraticDb } from "./interpolate.ts";
import { STANDARD_GRAVITY } from "./formulas.ts";

export interface LineSpectrum {
  /** Frequency of bin 0 and bin spacing (Hz). Bin k is at hz0 + k·df. */
  hz0: number;
  df: number;
  /** Peak-amplitude spectrum (signal units). */
  amp: Float64Array;
  /** Zero-padding ratio nfft/ndata (1 = none); the resolution is 1/T = df·rho. */
  rho: number;
  window: WindowName;
  /** Duration of the data behind one transform (s): the resolution is 1/seconds. */
  seconds: number;
  /** Equivalent noise bandwidth of the window in bins of 1/seconds. */
  enbw: number;
  averages: number;
}

export interface SpectrumOptions {
  window?: WindowName;
  /** Minimum zero-padding factor (the FFT size is the next power of two ≥ pad·N). */
  pad?: number;
  /** Welch averaging: segment length in samples (default: whole record) with 50 % overlap, power-averaged. */
  segment?: number;
}

// Σw and the ENBW of the (cached, read-only) windows, computed once per window array.
const windowSumCache = new WeakMap<Float64Array, { sum: number; enbw: number }>();
function windowSums(w: Float64Array): { sum: number; enbw: number } {
  let v = windowSumCache.get(w);
  if (!v) {
    let sum = 0;
    for (let i = 0; i < w.length; i++) sum += w[i];
    v = { sum, enbw: enbwBins(w) };
    windowSumCache.set(w, v);
  }
  return v;
}

/** One-sided amplitude spectrum of a real signal (mean removed). */
export function realSpectrum(x: ArrayLike<number>, fs: number, opts: SpectrumOptions = {}): LineSpectrum {
  const windowName = opts.window ?? "hann";
  const seg = Math.min(opts.segment ?? x.length, x.length);
  const size = nextPow2(Math.ceil(seg * (opts.pad ?? 1)));
  const w = makeWindow(windowName, seg);
  const { sum: wsum, enbw } = windowSums(w);
  const hop = Math.max(1, Math.floor(seg / 2));
  const nb = size / 2 + 1;
  const scale = 2 / wsum;
  if (seg === x.length) {
    // One segment (the usual case): amplitudes straight from the transform, no power accumulator.
    const buf = realInputScratch(size);
    let mu = 0;
    for (let i = 0; i < seg; i++) mu += x[i];
    mu /= seg;
    for (let i = 0; i < seg; i++) buf[i] = (x[i] - mu) * w[i];
    buf.fill(0, seg);
    const X = transformRealScratch(buf);
    const amp = new Float64Array(nb);
    for (let k = 0; k < nb; k++) amp[k] = Math.sqrt(X[2 * k] * X[2 * k] + X[2 * k + 1] * X[2 * k + 1]) * scale;
    amp[0] /= 2; // DC is not doubled in a one-sided spectrum
    return { hz0: 0, df: fs / size, amp, rho: size / seg, window: windowName, seconds: seg / fs, enbw, averages: 1 };
  }
  const power = new Float64Array(nb);
  // mean-removed, windowed segment straight into the transform's scratch input (zero-padded tail)
  const buf = realInputScratch(size);
  buf.fill(0, seg);
  let averages = 0;
  for (let start = 0; start + seg <= x.length; start += hop) {
    let mu = 0;
    for (let i = 0; i < seg; i++) mu += x[start + i];
    mu /= seg;
    for (let i = 0; i < seg; i++) buf[i] = (x[start + i] - mu) * w[i];
    const X = transformRealScratch(buf);
    for (let k = 0; k < nb; k++) power[k] += X[2 * k] * X[2 * k] + X[2 * k + 1] * X[2 * k + 1];
    averages++;
    if (seg === x.length) break;
  }
  const amp = new Float64Array(nb);
  for (let k = 0; k < nb; k++) amp[k] = Math.sqrt(power[k] / averages) * scale;
  amp[0] /= 2; // DC is not doubled in a one-sided spectrum
  return { hz0: 0, df: fs / size, amp, rho: size / seg, window: windowName, seconds: seg / fs, enbw, averages };
}

/** Spectrum of a complex zoomed signal (interleaved), fft-shifted so bins run from centre − fs/2 upward. */
export function zoomSpectrum(z: Decimated, opts: { window?: WindowName; pad?: number } = {}): LineSpectrum {
  const windowName = opts.window ?? "hann";
  const n = z.data.length / 2;
  const size = nextPow2(Math.ceil(n * (opts.pad ?? 1)));
  const w = makeWindow(windowName, n);
  const buf = complexInputScratch(size);
  let wsum = 0;
  for (let i = 0; i < n; i++) {
    buf[2 * i] = z.data[2 * i] * w[i];
    buf[2 * i + 1] = z.data[2 * i + 1] * w[i];
    wsum += w[i];
  }
  const X = complexFftScratch(buf);
  const amp = new Float64Array(size);
  const half = size / 2;
  const scale = 2 / wsum;
  for (let k = 0; k < size; k++) {
    const src = (k + half) % size; // bin k of the output ↔ frequency offset (k − half)·df
    amp[k] = Math.hypot(X[2 * src], X[2 * src + 1]) * scale;
  }
  const df = z.sampleRate / size;
  return { hz0: z.centerHz - half * df, df, amp, rho: size / n, window: windowName, seconds: n / z.sampleRate, enbw: windowSums(w).enbw, averages: 1 };
}

export function binOf(spec: LineSpectrum, hz: number): number {
  return (hz - spec.hz0) / spec.df;
}
export function hzOf(spec: LineSpectrum, bin: number): number {
  return spec.hz0 + bin * spec.df;
}

/** Continuous Hann kernel |W(ν)|/W(0) = |sinc(ν)/(1 − ν²)|, ν in bins of 1/T. */
function hannKernel(nu: number): number {
  const d = 1 - nu * nu;
  if (Math.abs(d) < 1e-9) return 0.5;
  return Math.abs(sinc(nu) / d);
}

/**
 * Sub-bin peak under a Hann window, valid with zero padding ratio rho: solve |K((1−δ)/ρ)|/|K((−1−δ)/ρ)| = m₊/m₋
 * for δ by bisection (the ratio is monotone in δ), then A = m₀/|K(−δ/ρ)|. For rho = 1 this is Grandke's estimator.
 */
export function hannPeakInterp(mM1: number, m0: number, mP1: number, rho: number): { delta: number; amp: number } {
  if (!(mM1 > 0) || !(mP1 > 0)) return { delta: 0, amp: m0 };
  const target = Math.log(mP1 / mM1);
  let lo = -1;
  let hi = 1;
  for (let i = 0; i < 60; i++) {
    const mid = 0.5 * (lo + hi);
    const g = Math.log(hannKernel((1 - mid) / rho) + 1e-300) - Math.log(hannKernel((-1 - mid) / rho) + 1e-300);
    if (g < target) lo = mid;
    else hi = mid;
  }
  const delta = 0.5 * (lo + hi);
  return { delta, amp: m0 / hannKernel(-delta / rho) };
}

export interface Peak {
  hz: number;
  /** Interpolated peak amplitude (signal units). */
  amp: number;
  bin: number;
  /** Median amplitude around the search range: the local noise/leakage floor. */
  floorAmp: number;
  /** 20·log10(amp/floorAmp). */
  prominenceDb: number;
  /** False when the maximum sits on the edge of the search range (no true local maximum inside). */
  isLocalMax: boolean;
  /** Number of independent resolution cells searched (sets how tall a noise peak can get by chance). */
  searchCells: number;
}

/** Upper median (the element at index n >> 1 of the sorted values), by selection in O(n); reorders `values`. */
function median(values: Float64Array): number {
  const n = values.length;
  if (n === 0) return 0;
  const want = n >> 1;
  let lo = 0;
  let hi = n - 1;
  while (hi > lo) {
    // Hoare partition around the median of three
    const mid = (lo + hi) >> 1;
    let a = values[lo], b = values[mid], c = values[hi];
    if (a > b) { const t = a; a = b; b = t; }
    if (b > c) { b = c; }
    if (a > b) { b = a; }
    const pivot = b;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (values[i] < pivot) i++;
      while (values[j] > pivot) j--;
      if (i <= j) {
        const t = values[i];
        values[i] = values[j];
        values[j] = t;
        i++;
        j--;
      }
    }
    if (want <= j) hi = j;
    else if (want >= i) lo = i;
    else return values[want];
  }
  return values[want];
}

// Scratch for findPeak's floor values and exclusion mask (grown as needed; findPeak does not re-enter).
let floorScratch = new Float64Array(4096);
let maskScratch = new Uint8Array(4096);

/** Interpolated amplitude and frequency of the peak at integer bin k. */
export function interpolateAt(spec: LineSpectrum, k: number): { hz: number; amp: number } {
  const a = spec.amp;
  if (k <= 0 || k >= a.length - 1) return { hz: hzOf(spec, k), amp: a[Math.max(0, Math.min(a.length - 1, k))] };
  if (spec.window === "hann") {
    const { delta, amp } = hannPeakInterp(a[k - 1], a[k], a[k + 1], spec.rho);
    return { hz: hzOf(spec, k + delta), amp };
  }
  const db = (v: number) => 20 * Math.log10(v + 1e-300);
  const q = quadraticDb(db(a[k - 1]), db(a[k]), db(a[k + 1]));
  // Flat-top: the main lobe is flat to ≤ 0.01 dB over ±½ bin, so the tallest bin is already the amplitude; a
  // parabola through a flat top overshoots (measured: ≤ 0.0023 dB raw vs ≤ 0.028 dB parabolic, tests/engine/
  // spectrum-velocity.test.ts). The parabola still places the frequency.
  if (spec.window === "flattop") return { hz: hzOf(spec, k + q.delta), amp: a[k] };
  return { hz: hzOf(spec, k + q.delta), amp: 10 ** (q.peakDb / 20) };
}

/**
 * Largest peak between loHz and hiHz. The floor is the median amplitude over the range widened by `floorMarginHz`
 * each side (default: the range width, at least 20 bins of resolution).
 */
export function findPeak(spec: LineSpectrum, loHz: number, hiHz: number, opts: { floorMarginHz?: number; exclude?: Array<[number, number]> } = {}): Peak | null {
  const n = spec.amp.length;
  const amp = spec.amp;
  const k0 = Math.max(1, Math.ceil(binOf(spec, loHz)));
  const k1 = Math.min(n - 2, Math.floor(binOf(spec, hiHz)));
  if (k1 < k0) return null;
  const resBins = spec.rho; // bins per 1/T
  const margin = opts.floorMarginHz ?? Math.max(hiHz - loHz, 20 * resBins * spec.df);
  const f0 = Math.max(0, Math.floor(binOf(spec, loHz - margin)));
  const f1 = Math.min(n - 1, Math.ceil(binOf(spec, hiHz + margin)));
  // Exclusion mask over the bins [m0, m1] that either loop visits: 1 where hzOf(k) lies in an excluded zone. Only the
  // bins around each zone are tested, with the same hzOf comparison a per-bin test would make (hzOf is monotone).
  const m0 = Math.min(f0, k0);
  const m1 = Math.max(f1, k1);
  const span = m1 - m0 + 1;
  const ex = opts.exclude;
  if (ex && ex.length) {
    if (maskScratch.length < span) maskScratch = new Uint8Array(span * 2);
    maskScratch.fill(0, 0, span);
    for (const [a, b] of ex) {
      const lo = Math.max(m0, Math.floor(binOf(spec, a)) - 1);
      const hi = Math.min(m1, Math.ceil(binOf(spec, b)) + 1);
      for (let k = lo; k <= hi; k++) {
        const hz = hzOf(spec, k);
        if (hz >= a && hz <= b) maskScratch[k - m0] = 1;
      }
    }
  }
  const mask = ex && ex.length ? maskScratch : null;
  let best = -1;
  let bestAmp = -Infinity;
  for (let k = k0; k <= k1; k++) {
    if (mask && mask[k - m0]) continue;
    const v = amp[k];
    if (v > bestAmp) {
      bestAmp = v;
      best = k;
    }
  }
  if (best < 0) return null;
  const isLocalMax = amp[best] >= amp[best - 1] && amp[best] >= amp[best + 1];
  const ring = Math.ceil(3 * resBins); // skip the peak's own main lobe
  if (floorScratch.length < span) floorScratch = new Float64Array(span * 2);
  let count = 0;
  for (let k = f0; k <= f1; k++) if (Math.abs(k - best) > ring && !(mask && mask[k - m0])) floorScratch[count++] = amp[k];
  const floorAmp = median(floorScratch.subarray(0, count)) || 1e-300;
  const { hz, amp: pa } = isLocalMax ? interpolateAt(spec, best) : { hz: hzOf(spec, best), amp: amp[best] };
  const searchCells = Math.max(1, (k1 - k0 + 1) / resBins);
  return { hz, amp: pa, bin: best, floorAmp, prominenceDb: 20 * Math.log10(pa / floorAmp), isLocalMax, searchCells };
}

/**
 * Prominence a line needs to count as found in a search over `cells` resolution cells: the largest of n Rayleigh
 * noise cells reaches about √(2 ln n)·σ against a median of 1.18σ, so require that plus a 6 dB margin (and ≥ 10 dB).
 */
export function requiredProminenceDb(cells: number): number {
  const chance = 20 * Math.log10(Math.sqrt(2 * Math.log(Math.max(2, cells))) / 1.1774);
  return Math.max(10, chance + 6);
}

/** Largest local maximum nearest to hz within ±tolHz; null when no local maximum lies in the window. */
export function peakNear(spec: LineSpectrum, hz: number, tolHz: number): Peak | null {
  const p = findPeak(spec, hz - tolHz, hz + tolHz, { floorMarginHz: Math.max(10 * tolHz, 20 * spec.rho * spec.df) });
  return p && p.isLocalMax ? p : p ? { ...p, isLocalMax: false } : null;
}

export function toDb(ratio: number): number {
  return 20 * Math.log10(Math.max(ratio, 1e-300));
}

// ---------------------------------------------------------------------------------------------------------------
// Display spectrum for the viewer

export type SignalQuantity = "acceleration" | "velocity";

/**
 * Factor from a channel unit to SI (m/s² or m/s) and which quantity it is: g → 9.80665 m/s² (standard gravity,
 * CGPM 1901), mm/s → 1e−3 m/s, in/s → 0.0254 m/s; anything else (m/s2, m/s^2, m/s²) is taken as m/s².
 */
export function unitScale(unit: string): { scale: number; quantity: SignalQuantity } {
  const u = unit.toLowerCase().replace(/\s/g, "");
  if (u === "g") return { scale: STANDARD_GRAVITY, quantity: "acceleration" };
  if (u === "mm/s") return { scale: 1e-3, quantity: "velocity" };
  if (u === "m/s") return { scale: 1, quantity: "velocity" };
  if (u === "in/s" || u === "ips") return { scale: 0.0254, quantity: "velocity" };
  return { scale: 1, quantity: "acceleration" }; // m/s2, m/s^2, m/s²
}

/**
 * Velocity r.m.s. in mm/s of a line of peak amplitude `amp` (channel units) at `hz`: integration in the frequency
 * domain, V = A/(2πf) (domain.md §6, check value 16), r.m.s. = peak/√2. A velocity channel is only rescaled.
 * Zero at f ≤ 0 (DC has no velocity line).
 */
export function lineVelocityMmS(amp: number, hz: number, unit: string): number {
  const { scale, quantity } = unitScale(unit);
  const rms = (amp * scale) / Math.SQRT2;
  if (quantity === "velocity") return rms * 1000;
  return hz > 0 ? (rms / (2 * Math.PI * hz)) * 1000 : 0;
}

/** Default low cut of a velocity spectrum integrated from acceleration (Hz): see DisplaySpectrumOptions. */
export const VELOCITY_LOW_CUT_HZ = 2;

/** "db": dB relative to the supply line (current). "velocity-mm-s": velocity per line in mm/s r.m.s. (vibration). */
export type DisplayQuantity = "db" | "velocity-mm-s";

export interface DisplaySpectrumOptions {
  fMinHz?: number;
  fMaxHz?: number;
  /** Number of points returned at most; bins are merged by max-hold so narrow lines survive. Default 4000. */
  maxPoints?: number;
  /**
   * Reference for 0 dB. "db": signal units, default the largest peak between 5 and 120 Hz (the supply line).
   * "velocity-mm-s": mm/s r.m.s., default 1 (db is then dB re 1 mm/s).
   */
  referenceAmplitude?: number;
  /** Default "hann" for "db"; "flattop" for "velocity-mm-s" (≤ 0.01 dB scalloping: a line reads its level). */
  window?: WindowName;
  /** Default "db". */
  quantity?: DisplayQuantity;
  /** Channel unit for "velocity-mm-s": "g", "m/s2" (default), "mm/s", "m/s", "in/s". */
  unit?: string;
  /**
   * "velocity-mm-s" from an accelerometer: lines below this are shown as 0 (default 2 Hz, the lower edge of the
   * ISO 20816-3 band for the slowest machines, domain.md §6). Dividing by 2πf lifts the window's leakage of DC and
   * the sensor's low-frequency noise into tall false lines near 0 Hz otherwise.
   */
  velocityLowCutHz?: number;
}

export interface DisplaySpectrum {
  hz: Float64Array;
  /** dB re referenceAmplitude: the supply line ("db"), or 1 mm/s r.m.s. ("velocity-mm-s"). */
  db: Float32Array;
  referenceAmplitude: number;
  resolutionHz: number;
  /** Unit of `level`: "dB" (then level is db) or "mm/s" (velocity r.m.s. per line). */
  unit: "dB" | "mm/s";
  /** The value to plot, in `unit`. */
  level: Float32Array;
  window: WindowName;
  /** Velocity integrated from acceleration: lines below this frequency are 0 (not shown). */
  lowCutHz?: number;
}

/**
 * Spectrum for the viewer, in dB relative to the supply component (or referenceAmplitude), or as velocity in
 * mm/s r.m.s. per line for a vibration channel. A narrow band (≤ fs/8 wide) is computed by complex zoom at full
 * resolution 1/T; a low band (fMax ≤ fs/6) by real decimation; otherwise one FFT of the record (Welch-averaged in
 * 2^21-sample segments for very long records, so a display spectrum holds up to about a million lines). Points
 * are merged by max-hold of the plotted quantity (after integration in velocity mode, so the 1/f weighting picks
 * the right bin).
 */
export function spectrumForDisplay(data: ArrayLike<number>, fs: number, opts: DisplaySpectrumOptions = {}): DisplaySpectrum {
  const velocity = opts.quantity === "velocity-mm-s";
  if (opts.quantity !== undefined && opts.quantity !== "db" && !velocity) throw new RangeError(`spectrumForDisplay: unknown quantity "${String(opts.quantity)}"`);
  const fMin = Math.max(0, opts.fMinHz ?? 0);
  const fMax = Math.min(fs / 2, opts.fMaxHz ?? fs / 2);
  const maxPoints = Math.max(16, opts.maxPoints ?? 4000);
  const window = opts.window ?? (velocity ? "flattop" : "hann");
  let spec: LineSpectrum;
  if (fMax - fMin <= fs / 8 && fMin > 0) {
    const half = (fMax - fMin) / 2;
    spec = zoomSpectrum(zoomComplex(data, fs, fMin + half, half * 1.05), { window });
  } else if (fMax <= fs / 6) {
    const dec = decimateReal(data, fs, fMax);
    spec = realSpectrum(dec.data, dec.sampleRate, { window });
  } else {
    spec = realSpectrum(data, fs, { window, segment: Math.min(data.length, 1 << 21) });
  }
  const k0 = Math.max(0, Math.ceil(binOf(spec, fMin)));
  const k1 = Math.min(spec.amp.length - 1, Math.floor(binOf(spec, fMax)));
  // the per-bin quantity that is max-held and plotted
  let value: Float64Array;
  let lowCutHz: number | undefined;
  let ref = opts.referenceAmplitude;
  if (velocity) {
    const unit = opts.unit ?? "m/s2";
    const integrated = unitScale(unit).quantity === "acceleration";
    lowCutHz = integrated ? Math.max(0, opts.velocityLowCutHz ?? VELOCITY_LOW_CUT_HZ) : undefined;
    value = new Float64Array(spec.amp.length);
    for (let k = k0; k <= k1; k++) {
      const f = hzOf(spec, k);
      value[k] = lowCutHz !== undefined && f < lowCutHz ? 0 : lineVelocityMmS(spec.amp[k], f, unit);
    }
    if (!ref) ref = 1;
  } else {
    value = spec.amp;
    if (!ref) {
      const p = findPeak(spec, Math.max(5, fMin), Math.min(120, fMax));
      ref = p ? p.amp : Math.max(...spec.amp);
    }
  }
  const nBins = Math.max(0, k1 - k0 + 1);
  const group = Math.max(1, Math.ceil(nBins / maxPoints));
  const nOut = Math.ceil(nBins / group);
  const hz = new Float64Array(nOut);
  const db = new Float32Array(nOut);
  const level = velocity ? new Float32Array(nOut) : db;
  for (let o = 0; o < nOut; o++) {
    let best = k0 + o * group;
    const end = Math.min(k1, k0 + (o + 1) * group - 1);
    for (let k = best + 1; k <= end; k++) if (value[k] > value[best]) best = k;
    hz[o] = hzOf(spec, best);
    db[o] = toDb(value[best] / ref);
    if (velocity) level[o] = value[best];
  }
  return { hz, db, referenceAmplitude: ref, resolutionHz: 1 / spec.seconds, unit: velocity ? "mm/s" : "dB", level, window, ...(lowCutHz !== undefined ? { lowCutHz } : {}) };
}

/**
 * Power-weighted mean frequency over [centerHz ± halfWidthHz], floor power removed. For a line smeared by supply
 * wander (frequency modulation) the power centroid equals the time-average instantaneous frequency, whereas the
 * tallest bin of an FM spectrum sits near one of the deviation extremes.
 */
export function powerCentroidHz(spec: LineSpectrum, centerHz: number, halfWidthHz: number, floorAmp: number): number {
  const k0 = Math.max(0, Math.floor(binOf(spec, centerHz - halfWidthHz)));
  const k1 = Math.min(spec.amp.length - 1, Math.ceil(binOf(spec, centerHz + halfWidthHz)));
  const fl = floorAmp * floorAmp;
  let num = 0;
  let den = 0;
  for (let k = k0; k <= k1; k++) {
    const pw = Math.max(0, spec.amp[k] * spec.amp[k] - fl);
    num += pw * hzOf(spec, k);
    den += pw;
  }
  return den > 0 ? num / den : centerHz;
}
