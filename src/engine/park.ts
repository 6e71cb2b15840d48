// Park's (current space-) vector: i_d = √(2/3)·i_a − i_b/√6 − i_c/√6, i_q = (i_b − i_c)/√2. On a healthy,
// balanced motor its modulus is constant; rotor asymmetry modulates it at 2·s·f, and the modulation depth of the
// modulus equals the (positive-sequence) sideband ratio, so it reads in the same dB as the phase sidebands.
import { realSpectrum, peakNear, toDb } from "./spectrum.ts";

export function parkModulus(a: ArrayLike<number>, b: ArrayLike<number>, c: ArrayLike<number>): Float64Array {
  const n = Math.min(a.length, b.length, c.length);
  const out = new Float64Array(n);
  const k1 = Math.sqrt(2 / 3);
  const k2 = 1 / Math.sqrt(6);
  const k3 = 1 / Math.SQRT2;
  for (let i = 0; i < n; i++) {
    const d = k1 * a[i] - k2 * b[i] - k2 * c[i];
    const q = k3 * (b[i] - c[i]);
    out[i] = Math.hypot(d, q);
  }
  return out;
}

export interface ParkResult {
  twoSfHz: number;
  /** dB of the 2sf modulation below the modulus mean (comparable with the sideband depth). */
  depthDb: number | null;
  detected: boolean;
  prominenceDb: number;
}

/** 2sf line of the modulus, looked for within ±max(1.5 bins, 2f·0.0008) of the slip's prediction. */
export function parkAnalysis(a: ArrayLike<number>, b: ArrayLike<number>, c: ArrayLike<number>, fs: number, supplyHz: number, slip: number): ParkResult {
  const mod = parkModulus(a, b, c);
  let mean = 0;
  for (let i = 0; i < mod.length; i++) mean += mod[i];
  mean /= mod.length || 1;
  const spec = realSpectrum(mod, fs);
  const target = 2 * slip * supplyHz;
  const tol = Math.max(1.5 / spec.seconds, 2 * supplyHz * 0.0008);
  const p = peakNear(spec, target, tol);
  const detected = !!p && p.isLocalMax && p.prominenceDb >= 6;
  return { twoSfHz: detected ? p!.hz : target, depthDb: p ? -toDb(p.amp / mean) : null, detected, prominenceDb: p ? p.prominenceDb : 0 };
}
