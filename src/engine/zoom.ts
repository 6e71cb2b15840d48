// Fine resolution only where it is needed: instead of one giant FFT of the whole capture, low-pass + decimate
// (real) for the band around the supply line, and complex-demodulate + decimate ("zoom") for a band anywhere
// else (slot harmonics). Both use one Kaiser-window FIR evaluated only at the output instants (polyphase), so the
// cost is ~15–25 multiply-adds per input sample whatever the band, and the result keeps the full capture length T,
// hence the full resolution Δf = 1/T.

/** Zeroth-order modified Bessel function (power series), for the Kaiser window. */
function besselI0(x: number): number {
  let sum = 1;
  let term = 1;
  const q = (x * x) / 4;
  for (let k = 1; k < 60; k++) {
    term *= q / (k * k);
    sum += term;
    if (term < 1e-17 * sum) break;
  }
  return sum;
}

const STOPBAND_DB = 90; // keeps aliases ≥ 90 dB down, well below the −60 dB sidebands being measured

/** Linear-phase low-pass FIR (odd length, unity DC gain) by the Kaiser window method (Kaiser 1974 design rules). */
export function designLowPass(fs: number, passHz: number, stopHz: number, stopbandDb = STOPBAND_DB): Float64Array {
  const transition = Math.max(stopHz - passHz, 1e-9);
  const beta = stopbandDb > 50 ? 0.1102 * (stopbandDb - 8.7) : 0.5842 * (stopbandDb - 21) ** 0.4 + 0.07886 * (stopbandDb - 21);
  let len = Math.ceil((stopbandDb - 8) / (2.285 * ((2 * Math.PI * transition) / fs))) + 1;
  if (len % 2 === 0) len++;
  const m = (len - 1) / 2;
  const fc = (passHz + stopHz) / 2 / fs; // cycles/sample
  const h = new Float64Array(len);
  const i0b = besselI0(beta);
  let sum = 0;
  for (let i = 0; i < len; i++) {
    const t = i - m;
    const sincPart = t === 0 ? 2 * fc : Math.sin(2 * Math.PI * fc * t) / (Math.PI * t);
    const r = t / m;
    const kaiser = besselI0(beta * Math.sqrt(Math.max(0, 1 - r * r))) / i0b;
    h[i] = sincPart * kaiser;
    sum += h[i];
  }
  for (let i = 0; i < len; i++) h[i] /= sum;
  return h;
}

export interface Decimated {
  /** Real samples (decimateReal) or interleaved complex samples (zoomComplex). */
  data: Float64Array;
  sampleRate: number;
  factor: number;
  /** Index, in the input, of the first output sample (outputs m ↔ input index offset + m·factor). */
  offset: number;
  /** Demodulation frequency (zoomComplex only, else 0). */
  centerHz: number;
}

function mean(x: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i];
  return x.length ? s / x.length : 0;
}

/**
 * Keep [0, passHz] of a real signal at the lowest convenient rate (≥ 3·passHz). The mean is removed.
 * Output samples exist only where the filter fully overlaps the input (no edge transients).
 */
export function decimateReal(x: ArrayLike<number>, fs: number, passHz: number): Decimated {
  const mu = mean(x);
  const total = Math.max(1, Math.floor(fs / (3 * passHz)));
  if (total === 1) {
    const data = new Float64Array(x.length);
    for (let i = 0; i < x.length; i++) data[i] = x[i] - mu;
    return { data, sampleRate: fs, factor: 1, offset: 0, centerHz: 0 };
  }
  // Multistage: early stages decimate to ≥ 8·passHz with short filters (wide transition bands); the last stage
  // makes the sharp cut to ≥ 3·passHz at the low rate, where it is cheap. ~2× fewer operations than one stage.
  let cur: ArrayLike<number> = x;
  let rate = fs;
  let factor = 1;
  let offset = 0;
  for (;;) {
    const remaining = Math.floor(rate / (3 * passHz));
    if (remaining < 2) break;
    const d = remaining >= 6 ? Math.max(2, Math.floor(rate / (8 * passHz))) : remaining;
    const out = rate / d;
    const h = designLowPass(rate, passHz, out - passHz);
    const stage = firDecimate(cur, h, d);
    offset += stage.first * factor;
    factor *= d;
    rate = out;
    cur = stage.data;
  }
  const data = cur as Float64Array;
  for (let i = 0; i < data.length; i++) data[i] -= mu; // Σh = 1 at every stage, so removing the mean last is exact
  return { data, sampleRate: rate, factor, offset, centerHz: 0 };
}

/** y[o] = Σ h[j]·x[(first + o)·d + j − m], only where the filter fully overlaps the input. */
function firDecimate(x: ArrayLike<number>, h: Float64Array, d: number): { data: Float64Array; first: number } {
  const m = (h.length - 1) / 2;
  const first = Math.ceil(m / d);
  const last = Math.floor((x.length - 1 - m) / d);
  const count = Math.max(0, last - first + 1);
  const data = new Float64Array(count);
  // Two copies of the loop keep each one monomorphic (Float32Array input from files, Float64Array between stages).
  if (x instanceof Float32Array) firLoop32(x, h, d, first, count, m, data);
  else firLoop64(x instanceof Float64Array ? x : Float64Array.from(x), h, d, first, count, m, data);
  return { data, first: first * d };
}

// The taps are symmetric (linear phase: designLowPass builds h[m − t] = h[m + t] exactly), so each pair of taps is
// folded into one multiply: y = h[m]·x[s+m] + Σ_{j<m} h[j]·(x[s+j] + x[s+len−1−j]). Half the multiplies of the
// direct form; the sums differ from it only in rounding (~1e−16 relative).
function firLoop32(x: Float32Array, h: Float64Array, d: number, first: number, count: number, m: number, out: Float64Array): void {
  const last = 2 * m;
  const hm = h[m];
  for (let o = 0; o < count; o++) {
    const s = (first + o) * d - m;
    let a0 = hm * x[s + m];
    let a1 = 0;
    let j = 0;
    for (; j + 1 < m; j += 2) {
      a0 += h[j] * (x[s + j] + x[s + last - j]);
      a1 += h[j + 1] * (x[s + j + 1] + x[s + last - j - 1]);
    }
    for (; j < m; j++) a0 += h[j] * (x[s + j] + x[s + last - j]);
    out[o] = a0 + a1;
  }
}

function firLoop64(x: Float64Array, h: Float64Array, d: number, first: number, count: number, m: number, out: Float64Array): void {
  const last = 2 * m;
  const hm = h[m];
  for (let o = 0; o < count; o++) {
    const s = (first + o) * d - m;
    let a0 = hm * x[s + m];
    let a1 = 0;
    let j = 0;
    for (; j + 1 < m; j += 2) {
      a0 += h[j] * (x[s + j] + x[s + last - j]);
      a1 += h[j + 1] * (x[s + j + 1] + x[s + last - j - 1]);
    }
    for (; j < m; j++) a0 += h[j] * (x[s + j] + x[s + last - j]);
    out[o] = a0 + a1;
  }
}

/**
 * Complex zoom: shift centerHz to 0 Hz and keep ±halfBandHz, at a rate ≥ 4·halfBandHz. Implemented as a complex
 * band-pass FIR (the low-pass taps modulated to centerHz) evaluated at the output instants, followed by the
 * demodulation phase of each output instant — equivalent to demodulate-then-filter without a full-length copy.
 */
export function zoomComplex(x: ArrayLike<number>, fs: number, centerHz: number, halfBandHz: number): Decimated {
  const factor = Math.max(1, Math.floor(fs / (4 * halfBandHz)));
  const fsOut = fs / factor;
  const h = designLowPass(fs, halfBandHz, Math.max(fsOut - halfBandHz, halfBandHz * 1.5));
  const m = (h.length - 1) / 2;
  const len = h.length;
  const hr = new Float64Array(len);
  const hi = new Float64Array(len);
  const w = (2 * Math.PI * centerHz) / fs;
  for (let j = 0; j < len; j++) {
    // e^{−jω(j−m)} so that Σ hc[j]·x[n+j−m] = Σ h[j]·x[n+j−m]·e^{−jω(n+j−m)} · e^{+jωn}
    hr[j] = h[j] * Math.cos(-w * (j - m));
    hi[j] = h[j] * Math.sin(-w * (j - m));
  }
  const mu = mean(x);
  const first = Math.ceil(m / factor);
  const last = Math.floor((x.length - 1 - m) / factor);
  const count = Math.max(0, last - first + 1);
  const data = new Float64Array(2 * count);
  // hr is even and hi odd about the centre tap (h symmetric, cos even, sin odd), so the taps fold in pairs:
  // Σ hr[j]·v[j] = hr[m]·v[m] + Σ_{j<m} hr[j]·(v[j] + v[2m−j]), Σ hi[j]·v[j] = Σ_{j<m} hi[j]·(v[j] − v[2m−j]).
  // The mean is removed after the sum (Σ h·(x − μ) = Σ h·x − μ·Σ h), not from every sample.
  let sr = 0;
  let si = 0;
  for (let j = 0; j < len; j++) {
    sr += hr[j];
    si += hi[j];
  }
  const xs = x instanceof Float32Array || x instanceof Float64Array ? x : Float64Array.from(x);
  if (xs instanceof Float32Array) zoomLoop32(xs, hr, hi, factor, first, count, m, w, mu * sr, mu * si, data);
  else zoomLoop64(xs, hr, hi, factor, first, count, m, w, mu * sr, mu * si, data);
  return { data, sampleRate: fsOut, factor, offset: first * factor, centerHz };
}

function zoomLoop32(x: Float32Array, hr: Float64Array, hi: Float64Array, factor: number, first: number, count: number, m: number, w: number, mur: number, mui: number, data: Float64Array): void {
  const last = 2 * m;
  const hrm = hr[m];
  const TWO_PI = 2 * Math.PI;
  for (let o = 0; o < count; o++) {
    const n = (first + o) * factor;
    const s = n - m;
    let ar = hrm * x[s + m];
    let ai = 0;
    for (let j = 0; j < m; j++) {
      const a = x[s + j];
      const b = x[s + last - j];
      ar += hr[j] * (a + b);
      ai += hi[j] * (a - b);
    }
    ar -= mur;
    ai -= mui;
    // multiply by e^{−jωn} (phase reduced modulo 2π in double precision)
    const ph = -((w * n) % TWO_PI);
    const c = Math.cos(ph);
    const sn = Math.sin(ph);
    data[2 * o] = ar * c - ai * sn;
    data[2 * o + 1] = ar * sn + ai * c;
  }
}

function zoomLoop64(x: Float64Array, hr: Float64Array, hi: Float64Array, factor: number, first: number, count: number, m: number, w: number, mur: number, mui: number, data: Float64Array): void {
  const last = 2 * m;
  const hrm = hr[m];
  const TWO_PI = 2 * Math.PI;
  for (let o = 0; o < count; o++) {
    const n = (first + o) * factor;
    const s = n - m;
    let ar = hrm * x[s + m];
    let ai = 0;
    for (let j = 0; j < m; j++) {
      const a = x[s + j];
      const b = x[s + last - j];
      ar += hr[j] * (a + b);
      ai += hi[j] * (a - b);
    }
    ar -= mur;
    ai -= mui;
    const ph = -((w * n) % TWO_PI);
    const c = Math.cos(ph);
    const sn = Math.sin(ph);
    data[2 * o] = ar * c - ai * sn;
    data[2 * o + 1] = ar * sn + ai * c;
  }
}
