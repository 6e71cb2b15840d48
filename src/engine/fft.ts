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

// Scratch buffers per transform size, reused across calls (a 2^20 transform would otherwise allocate 8 + 16 MB
// per call and leave it to the collector). One set per size, made on first use; a few sizes are kept, like the
// plans. Larger transforms get fresh buffers each call, so a long-lived worker keeps at most ~6 × 40 MB.
interface Scratch {
  input: Float64Array | null;
  output: Float64Array | null;
  /** Interleaved complex input (2·size). */
  complexInput: Float64Array | null;
}
const scratch = new Map<number, Scratch>();
const MAX_SCRATCH = 6;
const MAX_SCRATCH_SIZE = 1 << 20;

function scratchFor(size: number): Scratch {
  let s = scratch.get(size);
  if (s) {
    scratch.delete(size);
    scratch.set(size, s);
    return s;
  }
  s = { input: null, output: null, complexInput: null };
  if (size > MAX_SCRATCH_SIZE) return s; // transient: not kept
  if (scratch.size >= MAX_SCRATCH) scratch.delete(scratch.keys().next().value as number);
  scratch.set(size, s);
  return s;
}
function scratchInput(size: number): Float64Array {
  const s = scratchFor(size);
  return (s.input ??= new Float64Array(size));
}
function scratchOutput(size: number): Float64Array {
  const s = scratchFor(size);
  return (s.output ??= new Float64Array(2 * size));
}

/**
 * As realFft, but the result is a shared scratch buffer (length 2·size; bins 0..size/2 interleaved in the first
 * size + 2 values) that the next transform of the same size overwrites: read it before transforming again.
 */
export function realFftScratch(input: ArrayLike<number>, size: number, window?: ArrayLike<number>): Float64Array {
  const n = input.length;
  if (!isPow2(size) || size < n) throw new Error(`realFft: size ${size} must be a power of two ≥ ${n}`);
  const buf = scratchInput(size);
  if (window) for (let i = 0; i < n; i++) buf[i] = input[i] * window[i];
  else for (let i = 0; i < n; i++) buf[i] = input[i];
  buf.fill(0, n);
  return transformRealScratch(buf);
}

/**
 * Real FFT of `input` (optionally multiplied by `window`, which must be input.length long), zero-padded to
 * `size` (a power of two ≥ input.length; default next power of two). Returns bins 0..size/2 inclusive,
 * interleaved: length size + 2.
 */
export function realFft(input: ArrayLike<number>, options: { size?: number; window?: ArrayLike<number> } = {}): Float64Array {
  const size = options.size ?? nextPow2(input.length);
  // fft.js fills bins 0..size/2 (the left half); keep exactly those.
  return realFftScratch(input, size, options.window).slice(0, size + 2);
}

/** The real-input scratch buffer of a size (contents undefined): fill it, then call transformRealScratch(buffer). */
export function realInputScratch(size: number): Float64Array {
  return scratchInput(size);
}

/** Real FFT of a buffer from realInputScratch (length a power of two) into the shared output scratch (as realFftScratch). */
export function transformRealScratch(input: Float64Array): Float64Array {
  const size = input.length;
  const out = scratchOutput(size);
  fftPlan(size).realTransform(out, input);
  return out;
}

/** A zeroed scratch buffer of 2·size for the interleaved input of complexFftScratch (shared like its output). */
export function complexInputScratch(size: number): Float64Array {
  const s = scratchFor(size);
  if (!s.complexInput) s.complexInput = new Float64Array(2 * size);
  else s.complexInput.fill(0);
  return s.complexInput;
}

/** Complex FFT into a shared scratch buffer (length 2·size), overwritten by the next transform of that size. */
export function complexFftScratch(interleaved: Float64Array): Float64Array {
  const size = interleaved.length / 2;
  if (!isPow2(size)) throw new Error(`complexFft: size ${size} must be a power of two`);
  const out = scratchOutput(size);
  fftPlan(size).transform(out, interleaved);
  return out;
}

/** Complex FFT of interleaved data (length 2·size, size a power of two). Forward, unnormalised. */
export function complexFft(interleaved: Float64Array): Float64Array {
  return complexFftScratch(interleaved).slice();
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
