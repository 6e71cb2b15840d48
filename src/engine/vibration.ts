// Vibration: broadband velocity r.m.s. in the ISO 20816-3 band, integrated from acceleration in the frequency
// domain, the zone for the machine group and support, and the 1×, 2×, 2×line-frequency and pole-pass lines.
import type { Channel, Nameplate, VibrationResult } from "./types.ts";
import { realSpectrum, findPeak, lineVelocityMmS, unitScale, type LineSpectrum, type Peak, type SignalQuantity } from "./spectrum.ts";
import { decimateReal } from "./zoom.ts";
import { nextPow2 } from "./fft.ts";

export type Zone = "A" | "B" | "C" | "D";

/**
 * Zone boundaries A/B, B/C, C/D in mm/s r.m.s. — ISO 10816-3:2009 Tables A.1/A.2, believed unchanged in
 * ISO 20816-3:2022. FROM MEMORY (domain.md §6 tags them [M]): verify against the standard before relying on them.
 */
export const ZONE_LIMITS_MM_S: Record<1 | 2, Record<"rigid" | "flexible", [number, number, number]>> = {
  1: { rigid: [2.3, 4.5, 7.1], flexible: [3.5, 7.1, 11.0] },
  2: { rigid: [1.4, 2.8, 4.5], flexible: [2.3, 4.5, 7.1] },
};

/** Zone for a velocity r.m.s.; a value exactly on a boundary falls in the worse zone (lower bound inclusive). */
export function isoZone(velocityRmsMmS: number, group: 1 | 2, support: "rigid" | "flexible"): Zone {
  const [ab, bc, cd] = ZONE_LIMITS_MM_S[group][support];
  if (velocityRmsMmS < ab) return "A";
  if (velocityRmsMmS < bc) return "B";
  if (velocityRmsMmS < cd) return "C";
  return "D";
}

/** Measurement band: 10–1000 Hz, or 2–1000 Hz for machines at ≤ 600 r/min (ISO 20816-3, from memory). */
export function isoBand(rpm: number): [number, number] {
  return rpm <= 600 ? [2, 1000] : [10, 1000];
}

/** Group from rated power when not given: > 300 kW → group 1, else group 2 (ISO 20816-3 group definitions [M]). */
export function machineGroup(nameplate: Nameplate): 1 | 2 {
  if (nameplate.machineGroup) return nameplate.machineGroup;
  return nameplate.ratedKw && nameplate.ratedKw > 300 ? 1 : 2;
}

type Quantity = SignalQuantity;

/** Factor from channel unit to SI (m/s² or m/s) and which quantity it is (shared with the display spectrum). */
export { unitScale };

/**
 * Velocity r.m.s. (mm/s) over [loHz, hiHz] from a Welch-averaged Hann spectrum: v_rms = √(Σ (a_k/(2πf_k))²/ENBW)
 * with a_k the per-bin r.m.s. amplitude (Parseval; Heinzel et al. 2002; domain.md §6).
 */
export function velocityRmsFromSpectrum(spec: LineSpectrum, quantity: Quantity, scale: number, band: [number, number]): number {
  let sum = 0;
  for (let k = 1; k < spec.amp.length; k++) {
    const hz = spec.hz0 + k * spec.df;
    if (hz < band[0] || hz > band[1]) continue;
    const aRms = (spec.amp[k] * scale) / Math.SQRT2;
    const v = quantity === "acceleration" ? aRms / (2 * Math.PI * hz) : aRms;
    sum += v * v;
  }
  // With zero padding (rho > 1) bins are rho times denser: the ENBW in FFT bins is enbw·rho.
  return Math.sqrt(sum / (spec.enbw * spec.rho)) * 1000;
}

export interface VibrationAnalysis {
  result: VibrationResult;
  /** Fine low-band spectrum (for speed lines and the markers). */
  lowSpectrum: LineSpectrum;
  /** Level of a peak in mm/s r.m.s. */
  toMmS: (p: Peak) => number;
  twoLine: Peak | null;
  twoX: Peak | null;
}

/** Pass band edge of the fine low-band vibration spectrum, Hz (400, or fs/2.5 at low sample rates). */
export function vibrationLowPassHz(fs: number, passHz = 400): number {
  return Math.min(passHz, fs / 2.5);
}

export function vibrationLowBand(ch: Channel, fs: number, passHz = 400): LineSpectrum {
  const dec = decimateReal(ch.data, fs, vibrationLowPassHz(fs, passHz));
  return realSpectrum(dec.data, dec.sampleRate);
}

/**
 * Broadband value and the 2×LF line. 1× and pole-pass come from slip.ts (vibrationSpeedEstimates) on lowSpectrum;
 * the caller passes them back in to fill the result.
 */
export function analyzeVibration(ch: Channel, fs: number, nameplate: Nameplate, supplyHz: number, lowSpectrum: LineSpectrum, oneX: Peak | null, polePassHz: number | null): VibrationAnalysis {
  const { scale, quantity } = unitScale(ch.unit);
  const band = isoBand(nameplate.ratedRpm);
  // Welch segments long enough to resolve the band's lower edge (≥ 5 bins below it)
  const segSeconds = band[0] <= 2 ? 4 : 1;
  const seg = Math.min(ch.data.length, nextPow2(Math.round(fs * segSeconds)));
  const welch = realSpectrum(ch.data, fs, { segment: seg });
  const hi: [number, number] = [band[0], Math.min(band[1], fs / 2)];
  const v = velocityRmsFromSpectrum(welch, quantity, scale, hi);
  const group = machineGroup(nameplate);
  const support = nameplate.support ?? "rigid";
  const toMmS = (p: Peak) => lineVelocityMmS(p.amp, p.hz, ch.unit);
  const res = 1 / lowSpectrum.seconds;
  const twoLine = findPeak(lowSpectrum, 2 * supplyHz - Math.max(3 * res, 0.2), 2 * supplyHz + Math.max(3 * res, 0.2));
  const twoLineOk = twoLine && twoLine.isLocalMax && twoLine.prominenceDb >= 10 ? twoLine : null;
  let twoX: Peak | null = null;
  if (oneX) {
    const t = findPeak(lowSpectrum, 2 * oneX.hz - 2 * res, 2 * oneX.hz + 2 * res);
    twoX = t && t.isLocalMax && t.prominenceDb >= 10 ? t : null;
  }
  const result: VibrationResult = {
    channel: ch.name,
    velocityRmsMmS: Math.round(v * 1000) / 1000,
    bandHz: hi,
    zone: isoZone(v, group, support),
    machineGroup: group,
    support,
    oneXHz: oneX ? oneX.hz : null,
    oneXMmS: oneX ? toMmS(oneX) : null,
    twoLineHz: twoLineOk ? twoLineOk.hz : null,
    twoLineMmS: twoLineOk ? toMmS(twoLineOk) : null,
    polePassHz,
  };
  return { result, lowSpectrum, toMmS, twoLine: twoLineOk, twoX };
}
