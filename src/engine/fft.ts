// Thin wrapper around fft.js: cached plans, real transforms of any length (zero-padded to a power of two),
// and complex transforms. Outputs are interleaved Float64Array [re0, im0, re1, im1, …].
import FFT from "fft.js";

const plans = new Map<number, FFT>();
const MAX_PLANS = 8;

/** Cached fft.js plan (the twiddle table for 2^20 is ~16 MB as a JS array, so only a few are kept). */
export function fftPlan(size: number): FFT {
  let plan = plans.get(size);
  if (plan) {
    // refresh LRU position
    plans.delete(size);
    plans.set(size, plan);
    return plan;
  }
  plan = new FFT(size);
  if (plans.size >= MAX_PLANS) plans.delete(plans.keys().next().value as number);
  plans.set(size, plan);
  return plan;
}

export function nextPow2(n: number): number {
  let p = 2;
  while (p < n) p *= 2;
  return p;
}

export function isPow2(n: number): boolean {
  return n >= 2 && (n & (n - 1)) === 0;
}

/**
 * Real FFT of `input` (optionally multiplied by `window`, which must be input.length long), zero-padded to
 * `size` (a power of two ≥ input.length; default next power of two). Returns bins 0..size/2 inclusive,
 * interleaved: length size + 2.
 */
export function realFft(input: ArrayLike<number>, options: { size?: number; window?: ArrayLike<number> } = {}): Float64Array {
  const n = input.length;
  const size = options.size ?? nextPow2(n);
  if (!isPow2(size) || size < n) throw new Error(`realFft: size ${size} must be a power of two ≥ ${n}`);
  const buf = new Float64Array(size);
  const w = options.window;
  if (w) for (let i = 0; i < n; i++) buf[i] = input[i] * w[i];
  else for (let i = 0; i < n; i++) buf[i] = input[i];
  const out = new Float64Array(2 * size);
  fftPlan(size).realTransform(out, buf);
  // fft.js fills bins 0..size/2 (the left half); keep exactly those.
  return out.subarray(0, size + 2).slice();
}

/** Complex FFT of interleaved data (length 2·size, size a power of two). Forward, unnormalised. */
export function complexFft(interleaved: Float64Array): Float64Array {
  const size = interleaved.length / 2;
  if (!isPow2(size)) throw new Error(`complexFft: size ${size} must be a power of two`);
  const out = new Float64Array(2 * size);
  fftPlan(size).transform(out, interleaved);
  return out;
}

/** Inverse complex FFT (normalised by 1/size, as fft.js does). */
export function inverseComplexFft(interleaved: Float64Array): Float64Array {
  const size = interleaved.length / 2;
  const out = new Float64Array(2 * size);
  fftPlan(size).inverseTransform(out, interleaved);
  return out;
}

/** Reference O(N²) DFT (tests only): returns interleaved bins 0..N−1. */
export function directDft(re: ArrayLike<number>, im?: ArrayLike<number>): Float64Array {
  const n = re.length;
  const out = new Float64Array(2 * n);
  for (let k = 0; k < n; k++) {
    let sr = 0;
    let si = 0;
    for (let t = 0; t < n; t++) {
      const ph = (-2 * Math.PI * ((k * t) % n)) / n;
      const c = Math.cos(ph);
      const s = Math.sin(ph);
      const xr = re[t];
      const xi = im ? im[t] : 0;
      sr += xr * c - xi * s;
      si += xr * s + xi * c;
    }
    out[2 * k] = sr;
    out[2 * k + 1] = si;
  }
  return out;
}
