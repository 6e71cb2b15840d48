// Sub-bin peak interpolation (domain.md §2 "Peak-frequency interpolation"). Each returns δ, the fractional
// offset in bins from the local maximum k; the peak sits at (k + δ)·Δf.

export interface Complex {
  re: number;
  im: number;
}

function cdiv(a: Complex, b: Complex): Complex {
  const d = b.re * b.re + b.im * b.im;
  return { re: (a.re * b.re + a.im * b.im) / d, im: (a.im * b.re - a.re * b.im) / d };
}

/** Quadratic fit on log magnitude (J. O. Smith, CCRMA): δ and the interpolated peak in dB. */
export function quadraticDb(alphaDb: number, betaDb: number, gammaDb: number): { delta: number; peakDb: number } {
  const den = alphaDb - 2 * betaDb + gammaDb;
  const delta = den === 0 ? 0 : (0.5 * (alphaDb - gammaDb)) / den;
  return { delta, peakDb: betaDb - 0.25 * (alphaDb - gammaDb) * delta };
}

/** Jacobsen's estimator on complex bins (rectangular window): δ = Re[(X[k−1] − X[k+1])/(2X[k] − X[k−1] − X[k+1])]. */
export function jacobsen(xm1: Complex, x0: Complex, xp1: Complex): number {
  const num = { re: xm1.re - xp1.re, im: xm1.im - xp1.im };
  const den = { re: 2 * x0.re - xm1.re - xp1.re, im: 2 * x0.im - xm1.im - xp1.im };
  return cdiv(num, den).re;
}

/** Candan's bias correction of Jacobsen: δ_c = [tan(π/N)/(π/N)]·δ (Candan 2011). */
export function candan(xm1: Complex, x0: Complex, xp1: Complex, n: number): number {
  const a = Math.PI / n;
  return (Math.tan(a) / a) * jacobsen(xm1, x0, xp1);
}

/** Quinn's second estimator (Quinn 1997) on complex bins, rectangular window. */
export function quinn2(xm1: Complex, x0: Complex, xp1: Complex): number {
  const tau = (x: number) =>
    0.25 * Math.log(3 * x * x + 6 * x + 1) -
    (Math.sqrt(6) / 24) * Math.log((x + 1 - Math.sqrt(2 / 3)) / (x + 1 + Math.sqrt(2 / 3)));
  const ap = cdiv(xp1, x0).re;
  const am = cdiv(xm1, x0).re;
  const dp = -ap / (1 - ap);
  const dm = am / (1 - am);
  return (dp + dm) / 2 + tau(dp * dp) - tau(dm * dm);
}

/**
 * Grandke's two-point Hann estimator on magnitudes (Grandke 1983): with r = |X[k±1]|/|X[k]| on the larger
 * neighbour, δ = ±(2r − 1)/(r + 1). Exact for a pure tone under a Hann window.
 */
export function grandkeHann(magM1: number, mag0: number, magP1: number): number {
  if (mag0 <= 0) return 0;
  if (magP1 >= magM1) {
    const r = magP1 / mag0;
    return (2 * r - 1) / (r + 1);
  }
  const r = magM1 / mag0;
  return -(2 * r - 1) / (r + 1);
}

/** sinc(x) = sin(πx)/(πx). */
export function sinc(x: number): number {
  if (Math.abs(x) < 1e-12) return 1;
  return Math.sin(Math.PI * x) / (Math.PI * x);
}

/**
 * Hann amplitude correction: a tone δ bins off the centre of bin k reads |X[k]| = (A·Σw/2)·sinc(δ)/(1 − δ²), so
 * A = (2|X[k]|/Σw)·(1 − δ²)/sinc(δ).
 */
export function hannAmplitude(mag0: number, windowSum: number, delta: number): number {
  return ((2 * mag0) / windowSum) * ((1 - delta * delta) / sinc(delta));
}
