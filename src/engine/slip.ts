// Slip (and so rotor speed) from several independent spectral estimators, each with its own confidence, and one
// fused value. Every search is confined to where the nameplate makes the answer plausible.
import type { Nameplate, SlipEstimate } from "./types.ts";
import { findPeak, peakNear, powerCentroidHz, requiredProminenceDb, type LineSpectrum, type Peak } from "./spectrum.ts";
import { inferRatedHz, ratedSlip, rpmFromSlip, slipFromRotorHz, slipFromSlotHarmonic, slotHarmonicHz } from "./formulas.ts";

export interface SlipRange {
  min: number;
  max: number;
  /** Expected full-load slip at this supply frequency. */
  nominal: number;
}

/**
 * Plausible slip: 0.1× … 2.5× the nameplate slip (covers light load to a heavily overloaded or hot rotor; NEMA
 * MG 1 allows ±20 % on nameplate slip itself). On a drive the slip *speed* s·f at a given torque stays roughly
 * constant (constant V/f), so the per-unit slip scales with f_rated/f. Common practice.
 */
export function plausibleSlipRange(nameplate: Nameplate, supplyHz: number): SlipRange {
  const ratedHz = inferRatedHz(nameplate.ratedRpm, nameplate.poles, nameplate.ratedHz);
  const sN = Math.max(1e-4, ratedSlip(nameplate.ratedRpm, nameplate.poles, nameplate.ratedHz));
  const nominal = (sN * ratedHz) / supplyHz;
  return { min: 0.1 * nominal, max: Math.min(0.3, 2.5 * nominal), nominal };
}

/** Confidence from how far a line stands above its local floor: 0 at 6 dB, 1 at 30 dB. Common practice. */
export function confidenceFromProminence(prominenceDb: number): number {
  return Math.max(0, Math.min(1, (prominenceDb - 6) / 24));
}

/** A line counts as found when it is a local maximum standing above what noise reaches by chance in the search. */
function found(p: Peak | null): p is Peak {
  return !!p && p.isLocalMax && p.prominenceDb >= requiredProminenceDb(p.searchCells);
}

/** Exclusion zones ±2 resolution bins around the supply harmonics k·f, which are not rotor lines. */
function harmonicExclusions(f: number, resHz: number, upToHz: number): Array<[number, number]> {
  const zones: Array<[number, number]> = [];
  for (let k = 1; k * f <= upToHz + f; k++) zones.push([k * f - 2 * resHz, k * f + 2 * resHz]);
  return zones;
}

/**
 * A line at m·f is smeared over m × (supply spread); when that exceeds two resolution bins the interpolated peak is
 * biased, so use the power centroid instead and lower the confidence.
 */
function dewander(spec: LineSpectrum, p: Peak, multiple: number, supplySpreadHz: number): { hz: number; factor: number } {
  const res = 1 / spec.seconds;
  const smear = multiple * supplySpreadHz;
  if (smear <= 2 * res) return { hz: p.hz, factor: 1 };
  // the tallest bin may sit at either deviation extreme, so the window spans a full smear width each side
  const first = powerCentroidHz(spec, p.hz, smear + 3 * res, p.floorAmp);
  return { hz: powerCentroidHz(spec, first, smear / 2 + 3 * res, p.floorAmp), factor: 0.7 };
}

function estimate(method: string, slip: number, f: number, poles: number, confidence: number, detail: string): SlipEstimate {
  return { method, slip, rpm: rpmFromSlip(f, poles, slip), confidence, detail };
}

/** Eccentricity lines f ± fr (Dorrell et al. 1997). The lower line is skipped on 2-pole motors (it sits at s·f). */
export function eccentricityEstimate(spec: LineSpectrum, f: number, poles: number, range: SlipRange, supplySpreadHz = 0): SlipEstimate | null {
  const p = poles / 2;
  const frLo = (f * (1 - range.max)) / p;
  const frHi = (f * (1 - range.min)) / p;
  const res = 1 / spec.seconds;
  const exclude = harmonicExclusions(f, res, f + frHi);
  const upper = findPeak(spec, f + frLo, f + frHi, { exclude });
  const lower = p > 1 ? findPeak(spec, f - frHi, f - frLo, { exclude }) : null;
  const parts: Array<{ s: number; c: number; hz: number }> = [];
  const m = (1 - range.nominal) / p; // rotor-line multiple of f
  if (found(upper)) {
    const d = dewander(spec, upper, 1 + m, supplySpreadHz);
    parts.push({ s: slipFromRotorHz(f, poles, d.hz - f), c: confidenceFromProminence(upper.prominenceDb) * d.factor, hz: d.hz });
  }
  if (found(lower)) {
    const d = dewander(spec, lower, Math.abs(1 - m), supplySpreadHz);
    parts.push({ s: slipFromRotorHz(f, poles, f - d.hz), c: confidenceFromProminence(lower.prominenceDb) * d.factor, hz: d.hz });
  }
  if (!parts.length) return null;
  if (parts.length === 2 && Math.abs(parts[0].s - parts[1].s) < Math.max(5e-4, 3 * (res * p) / f)) {
    const c = 1 - (1 - parts[0].c) * (1 - parts[1].c);
    const s = (parts[0].s * parts[0].c + parts[1].s * parts[1].c) / (parts[0].c + parts[1].c || 1);
    return estimate("eccentricity", s, f, poles, c, `f − fr at ${parts[1].hz.toFixed(3)} Hz and f + fr at ${parts[0].hz.toFixed(3)} Hz agree`);
  }
  const best = parts.reduce((a, b) => (b.c > a.c ? b : a));
  return estimate("eccentricity", best.s, f, poles, best.c * 0.8, `one eccentricity line at ${best.hz.toFixed(3)} Hz`);
}

export interface SlotHarmonicBand {
  /** Center and half width of a zoom band that holds both principal slot harmonics (nw = ±1, k = 1). */
  centerHz: number;
  halfBandHz: number;
  bands: Array<{ nw: number; lo: number; hi: number }>;
}

export function slotHarmonicBand(f: number, poles: number, rotorBars: number, range: SlipRange, nyquist: number): SlotHarmonicBand | null {
  const bands = [-1, 1]
    .map((nw) => ({ nw, lo: slotHarmonicHz(f, poles, range.max, rotorBars, 1, nw), hi: slotHarmonicHz(f, poles, range.min, rotorBars, 1, nw) }))
    .filter((b) => b.hi < nyquist * 0.9 && b.lo > 0);
  if (!bands.length) return null;
  const lo = Math.min(...bands.map((b) => b.lo));
  const hi = Math.max(...bands.map((b) => b.hi));
  return { centerHz: (lo + hi) / 2, halfBandHz: (hi - lo) / 2 + 5, bands };
}

/** Principal rotor slot harmonics f·[R(1 − s)/p ± 1] (Hurst & Habetler 1996), on a zoom spectrum of that band. */
export function slotHarmonicEstimate(spec: LineSpectrum, band: SlotHarmonicBand, f: number, poles: number, rotorBars: number, supplySpreadHz = 0): { estimate: SlipEstimate | null; peaks: Array<{ nw: number; hz: number; amp: number }> } {
  const res = 1 / spec.seconds;
  const exclude = harmonicExclusions(f, res, band.centerHz + band.halfBandHz);
  const parts: Array<{ s: number; c: number; hz: number; nw: number; amp: number }> = [];
  for (const b of band.bands) {
    const pk = findPeak(spec, b.lo, b.hi, { exclude });
    if (!found(pk)) continue;
    const d = dewander(spec, pk, pk.hz / f, supplySpreadHz);
    parts.push({ s: slipFromSlotHarmonic(d.hz, f, poles, rotorBars, 1, b.nw), c: confidenceFromProminence(pk.prominenceDb) * d.factor, hz: d.hz, nw: b.nw, amp: pk.amp });
  }
  const peaks = parts.map((q) => ({ nw: q.nw, hz: q.hz, amp: q.amp }));
  if (!parts.length) return { estimate: null, peaks };
  const p = poles / 2;
  if (parts.length === 2 && Math.abs(parts[0].s - parts[1].s) < Math.max(3e-4, (3 * res * p) / (f * rotorBars))) {
    const c = 1 - (1 - parts[0].c) * (1 - parts[1].c);
    return { estimate: estimate("slot-harmonic", (parts[0].s + parts[1].s) / 2, f, poles, c, `RSH −1 at ${parts[0].hz.toFixed(2)} Hz and RSH +1 at ${parts[1].hz.toFixed(2)} Hz agree`), peaks };
  }
  const best = parts.reduce((a, b) => (b.c > a.c ? b : a));
  return { estimate: estimate("slot-harmonic", best.s, f, poles, best.c * 0.8, `RSH ${best.nw > 0 ? "+" : "−"}1 at ${best.hz.toFixed(2)} Hz`), peaks: peaks.filter((q) => q.hz === best.hz) };
}

export interface PhaseSlipEstimate {
  /** Current channel the estimate came from. */
  channel: string;
  estimate: SlipEstimate | null;
}

/**
 * Slip tolerance within which two phases' estimates of one method count as the same line: three resolution bins
 * of the line, converted to slip through d(line Hz)/d(slip) (f/p for f ± fr, R·f/p for a slot harmonic), with a
 * floor — the same rule the single-phase estimators use to pair their two lines.
 */
export function phaseAgreementTolerance(method: string, resolutionHz: number, f: number, poles: number, rotorBars?: number): number {
  const p = poles / 2;
  if (method === "slot-harmonic") return Math.max(3e-4, (3 * resolutionHz * p) / (f * (rotorBars ?? 28)));
  return Math.max(5e-4, (3 * resolutionHz * p) / f);
}

/**
 * One estimate of a method from the current phases (up to three). The rotor lines are in every phase, each with
 * its own noise, so a phase whose line is buried (noisy or weak clamp) or that picked a wrong peak must not decide
 * the result. Centre = confidence-weighted median of the phases that found the line; the phases within `tolSlip`
 * of it are averaged, weighted by confidence. Confidence is the best agreeing phase's (the phases watch the same
 * line, so agreement is not independent evidence the way two methods are), × 0.9 when a phase disagreed.
 * Barhound convention (common practice: read all three phases; no published combining rule).
 */
export function combinePhaseEstimates(perPhase: PhaseSlipEstimate[], f: number, poles: number, tolSlip: number): SlipEstimate | null {
  const got = perPhase.filter((q): q is { channel: string; estimate: SlipEstimate } => !!q.estimate && q.estimate.confidence > 0);
  if (!got.length) return null;
  if (got.length === 1 && perPhase.length === 1) return got[0].estimate;
  const sorted = [...got].sort((a, b) => a.estimate.slip - b.estimate.slip);
  const total = sorted.reduce((t, q) => t + q.estimate.confidence, 0);
  let acc = 0;
  let centre = sorted[sorted.length - 1];
  for (const q of sorted) {
    acc += q.estimate.confidence;
    if (acc >= total / 2) {
      centre = q;
      break;
    }
  }
  const agree = got.filter((q) => Math.abs(q.estimate.slip - centre.estimate.slip) <= tolSlip);
  const w = agree.reduce((t, q) => t + q.estimate.confidence, 0);
  const slip = agree.reduce((t, q) => t + q.estimate.slip * q.estimate.confidence, 0) / w;
  const best = agree.reduce((a, b) => (b.estimate.confidence > a.estimate.confidence ? b : a));
  const confidence = best.estimate.confidence * (agree.length < got.length ? 0.9 : 1);
  const names = agree.map((q) => q.channel).join(", ");
  const detail = `${agree.length} of ${perPhase.length} phases agree (${names}); best ${best.channel}: ${best.estimate.detail ?? ""}`.trim();
  return estimate(best.estimate.method, slip, f, poles, confidence, detail);
}

export interface VibrationSpeed {
  oneX: Peak | null;
  polePassLower: Peak | null;
  polePassUpper: Peak | null;
  estimates: SlipEstimate[];
}

/** Vibration 1× (rotation) peak and the pole-pass sidebands 1× ± 2sf around it. */
export function vibrationSpeedEstimates(spec: LineSpectrum, f: number, poles: number, range: SlipRange): VibrationSpeed {
  const p = poles / 2;
  const res = 1 / spec.seconds;
  const lo = (f * (1 - range.max)) / p;
  const hi = (f * (1 - range.min)) / p;
  const exclude = harmonicExclusions(f, res, hi);
  const oneX = findPeak(spec, lo, hi, { exclude });
  const out: VibrationSpeed = { oneX: found(oneX) ? oneX : null, polePassLower: null, polePassUpper: null, estimates: [] };
  if (!out.oneX) return out;
  const fr = out.oneX.hz;
  out.estimates.push(estimate("vibration-1x", slipFromRotorHz(f, poles, fr), f, poles, confidenceFromProminence(out.oneX.prominenceDb), `1× at ${fr.toFixed(3)} Hz`));
  // pole-pass sidebands: the 1× main lobe must not be taken for one, so start ≥ 3 resolution bins away
  const fpLo = Math.max(2 * range.min * f, 3 * res);
  const fpHi = 2 * range.max * f;
  if (fpHi > fpLo) {
    const l = findPeak(spec, fr - fpHi, fr - fpLo);
    const u = findPeak(spec, fr + fpLo, fr + fpHi);
    if (found(l) && found(u)) {
      const fpL = fr - l.hz;
      const fpU = u.hz - fr;
      if (Math.abs(fpL - fpU) < Math.max(3 * res, 0.05 * fpL)) {
        out.polePassLower = l;
        out.polePassUpper = u;
        const fp = (fpL + fpU) / 2;
        const c = Math.min(confidenceFromProminence(l.prominenceDb), confidenceFromProminence(u.prominenceDb)) * 0.8;
        out.estimates.push(estimate("pole-pass", fp / (2 * f), f, poles, c, `pole-pass Fp = ${fp.toFixed(3)} Hz around 1×`));
      }
    }
  }
  return out;
}

export interface SidebandPair {
  lower: Peak;
  upper: Peak;
  spacingHz: number;
}

/**
 * Strongest roughly symmetric pair f ± Δ with Δ in the plausible 2sf range, on the supply-subtracted spectrum.
 * Scored by the weaker of the two lines so that one strong unrelated line does not win.
 */
export function strongestSidebandPair(spec: LineSpectrum, f: number, range: SlipRange, excludeSpacing?: [number, number]): SidebandPair | null {
  const res = 1 / spec.seconds;
  const dLo = Math.max(2 * range.min * f, 4 * res);
  const dHi = 2 * range.max * f;
  if (dHi <= dLo) return null;
  const amp = spec.amp;
  const at = (hz: number) => {
    const k = Math.round((hz - spec.hz0) / spec.df);
    return Math.max(amp[k - 1] ?? 0, amp[k] ?? 0, amp[k + 1] ?? 0);
  };
  let bestD = -1;
  let bestScore = 0;
  for (let d = dLo; d <= dHi; d += spec.df) {
    if (excludeSpacing && d >= excludeSpacing[0] && d <= excludeSpacing[1]) continue;
    const score = Math.min(at(f - d), at(f + d));
    if (score > bestScore) {
      bestScore = score;
      bestD = d;
    }
  }
  if (bestD < 0) return null;
  const tol = 2 * res;
  const lower = peakNear(spec, f - bestD, tol);
  const upper = peakNear(spec, f + bestD, tol);
  if (!found(lower) || !found(upper)) return null;
  return { lower, upper, spacingHz: (upper.hz - lower.hz) / 2 };
}

export function sidebandPairEstimate(pair: SidebandPair, f: number, poles: number): SlipEstimate {
  const c = 0.6 * Math.min(confidenceFromProminence(pair.lower.prominenceDb), confidenceFromProminence(pair.upper.prominenceDb));
  return estimate("broken-bar-pair", pair.spacingHz / (2 * f), f, poles, c, `pair at ${pair.lower.hz.toFixed(3)} / ${pair.upper.hz.toFixed(3)} Hz`);
}

/** d(line frequency)/d(slip) per method: how precisely a line pins the slip down, used to weight the fusion. */
function sensitivity(method: string, f: number, poles: number, rotorBars?: number): number {
  const p = poles / 2;
  switch (method) {
    case "slot-harmonic":
      return (f * (rotorBars ?? 28)) / p;
    case "broken-bar-pair":
    case "pole-pass":
      return 2 * f;
    default:
      return f / p;
  }
}

export interface FusedSlip {
  slip: number;
  confidence: number;
  members: string[];
}

/**
 * Fuse: group the estimates that agree (within max(0.0015, 10 %) of each other), keep the group with the most
 * confidence, and average it weighted by confidence × sensitivity² (a slot harmonic moves R/p times faster with
 * slip than f ± fr, so it pins slip down R/p times more precisely). Combined confidence 1 − Π(1 − cᵢ).
 */
export function fuseSlip(estimates: SlipEstimate[], f: number, poles: number, rotorBars?: number): FusedSlip | null {
  const usable = estimates.filter((e) => e.confidence > 0.02 && e.method !== "nameplate");
  if (!usable.length) return null;
  let bestGroup: SlipEstimate[] = [];
  let bestWeight = -1;
  for (const a of usable) {
    const tol = Math.max(0.0015, 0.1 * Math.abs(a.slip));
    const group = usable.filter((b) => Math.abs(b.slip - a.slip) <= tol);
    const weight = group.reduce((s, e) => s + e.confidence, 0);
    if (weight > bestWeight) {
      bestWeight = weight;
      bestGroup = group;
    }
  }
  let num = 0;
  let den = 0;
  for (const e of bestGroup) {
    const w = e.confidence * sensitivity(e.method, f, poles, rotorBars) ** 2;
    num += w * e.slip;
    den += w;
  }
  const confidence = 1 - bestGroup.reduce((pr, e) => pr * (1 - e.confidence), 1);
  return { slip: num / den, confidence, members: bestGroup.map((e) => e.method) };
}
