// Spectral windows and their figures of merit (Harris 1978; Heinzel, Rüdiger & Schilling 2002).
// Windows are "periodic" (DFT-even): w[n] for n = 0..N−1 of a length-N+1 symmetric window minus its last point,
// which gives the textbook ENBW and coherent gain exactly.

export type WindowName = "rect" | "hann" | "flattop" | "blackman-harris";

/** SciPy's 5-term flat-top coefficients (the ones the domain sheet's 3.77-bin ENBW refers to). */
const FLATTOP = [0.21557895, 0.41663158, 0.277263158, 0.083578947, 0.006947368];
const BLACKMAN_HARRIS = [0.35875, 0.48829, 0.14128, 0.01168];

function cosineSum(n: number, coeffs: number[]): Float64Array {
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = (2 * Math.PI * i) / n;
    let v = 0;
    for (let k = 0; k < coeffs.length; k++) v += (k % 2 === 0 ? 1 : -1) * coeffs[k] * Math.cos(k * x);
    w[i] = v;
  }
  return w;
}

const cache = new Map<string, Float64Array>();

/** Cached window of length n (read-only by convention: callers must not modify it). */
export function makeWindow(name: WindowName, n: number): Float64Array {
  const key = `${name}:${n}`;
  let w = cache.get(key);
  if (!w) {
    if (name === "rect") w = new Float64Array(n).fill(1);
    else if (name === "hann") w = cosineSum(n, [0.5, 0.5]);
    else if (name === "flattop") w = cosineSum(n, FLATTOP);
    else w = cosineSum(n, BLACKMAN_HARRIS);
    if (cache.size > 24) cache.clear(); // windows are cheap to rebuild; keep memory bounded
    cache.set(key, w);
  }
  return w;
}

export function hann(n: number): Float64Array {
  return makeWindow("hann", n);
}
export function flatTop(n: number): Float64Array {
  return makeWindow("flattop", n);
}

/** Coherent gain Σw/N (amplitude of a bin-centred tone relative to a rectangular window). */
export function coherentGain(w: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < w.length; i++) s += w[i];
  return s / w.length;
}

/** Equivalent noise bandwidth in bins: N·Σw²/(Σw)². */
export function enbwBins(w: ArrayLike<number>): number {
  let s = 0;
  let s2 = 0;
  for (let i = 0; i < w.length; i++) {
    s += w[i];
    s2 += w[i] * w[i];
  }
  return (w.length * s2) / (s * s);
}

/** |W(δ)|/|W(0)|: the window's response to a tone δ bins off a bin centre (direct DTFT of the window). */
export function windowResponse(w: ArrayLike<number>, deltaBins: number): number {
  const n = w.length;
  let re = 0;
  let im = 0;
  let s = 0;
  for (let i = 0; i < n; i++) {
    const ph = (-2 * Math.PI * deltaBins * i) / n;
    re += w[i] * Math.cos(ph);
    im += w[i] * Math.sin(ph);
    s += w[i];
  }
  return Math.hypot(re, im) / s;
}

/** Scalloping loss in dB at half a bin (the worst case for a symmetric window). */
export function scallopingLossDb(w: ArrayLike<number>): number {
  return -20 * Math.log10(windowResponse(w, 0.5));
}

/** Worst-case leakage (dB, negative) of a tone at `bins` bins distance, over fractional offsets in [−0.5, 0.5]. */
export function worstLeakageDb(w: ArrayLike<number>, bins: number, steps = 41): number {
  let worst = 0;
  for (let i = 0; i < steps; i++) {
    const frac = -0.5 + i / (steps - 1);
    worst = Math.max(worst, windowResponse(w, bins + frac));
  }
  return 20 * Math.log10(worst);
}
