// Broken rotor bars from the current spectrum: the (1 ± 2s)·f sidebands, their depth below the supply line,
// the grade, the broken-bar count, and the checks that make a result "not assessable" instead of wrong.
import { ROTOR_GRADE_NAMES, type BrokenBarResult, type RotorGrade } from "./types.ts";
import { peakNear, toDb, type LineSpectrum, type Peak } from "./spectrum.ts";
import { minCaptureSeconds, thomsonBrokenBars, HANN_SIDEBAND_BINS } from "./formulas.ts";
import type { SidebandPair } from "./slip.ts";

/**
 * Barhound grades from the Thomson & Fenger (2001) severity bands, N = dB of the lower sideband below f.
 * Convention (the source does not fix it): each band includes its lower bound, e.g. exactly 54.0 dB is R1.
 */
export const GRADE_BANDS: ReadonlyArray<{ grade: RotorGrade; minDb: number }> = [
  { grade: "R1", minDb: 54 },
  { grade: "R2", minDb: 48 },
  { grade: "R3", minDb: 42 },
  { grade: "R4", minDb: 36 },
  { grade: "R5", minDb: -Infinity },
];

export function gradeFromDepth(depthDb: number): RotorGrade {
  for (const b of GRADE_BANDS) if (depthDb >= b.minDb) return b.grade;
  return "R5";
}

/** The published seven-band wording (Thomson & Fenger 2001), lower bound inclusive. */
export function thomsonCondition(depthDb: number): string {
  if (depthDb >= 60) return "Excellent";
  if (depthDb >= 54) return "Good";
  if (depthDb >= 48) return "Moderate";
  if (depthDb >= 42) return "Bar crack may be developing or high-resistance joints";
  if (depthDb >= 36) return "Two bars likely cracked or broken, or high-resistance joints";
  if (depthDb >= 30) return "Multiple cracked or broken bars, end-ring problems indicated";
  return "Multiple broken bars and end rings, very severe";
}

/** Below this load the sidebands shrink and merge into the supply line's skirt (domain.md §2: "usual minimum
 *  ≥ 50 % of rated load"). */
export const LIGHT_LOAD_PCT = 50;
/** Minimum slip confidence to place the sidebands. */
export const MIN_SLIP_CONFIDENCE = 0.15;
/** A sideband "stands clearly out" when it is this far above its local floor. */
export const CLEAR_SIDEBAND_DB = 10;

export interface SidebandLine {
  hz: number;
  depthDb: number;
  prominenceDb: number;
  /** False: no local maximum near the predicted frequency; depthDb is then a lower bound (the floor there). */
  detected: boolean;
}

export interface SidebandMeasurement {
  lower: SidebandLine;
  upper: SidebandLine;
  predictedLowerHz: number;
  predictedUpperHz: number;
}

function line(p: Peak | null, predictedHz: number, supplyAmp: number): SidebandLine {
  if (!p) return { hz: predictedHz, depthDb: Infinity, prominenceDb: 0, detected: false };
  const detected = p.isLocalMax && p.prominenceDb >= 6;
  return { hz: detected ? p.hz : predictedHz, depthDb: -toDb(p.amp / supplyAmp), prominenceDb: p.prominenceDb, detected };
}

/**
 * Levels at (1 ± 2s)·f on the supply-subtracted spectrum. The window is ±max(1.5 resolution bins, 2f·0.0008)
 * around the prediction, i.e. about the fused-slip uncertainty.
 */
export function measureSidebands(residual: LineSpectrum, f: number, supplyAmp: number, slip: number): SidebandMeasurement {
  const res = 1 / residual.seconds;
  const tol = Math.max(1.5 * res, 2 * f * 0.0008);
  const lo = (1 - 2 * slip) * f;
  const up = (1 + 2 * slip) * f;
  return {
    lower: line(peakNear(residual, lo, tol), lo, supplyAmp),
    upper: line(peakNear(residual, up, tol), up, supplyAmp),
    predictedLowerHz: lo,
    predictedUpperHz: up,
  };
}

export interface RotorInput {
  supplyHz: number;
  supplyAmp: number;
  captureSeconds: number;
  /** Slip that places the sidebands, and where it came from. */
  slip: number | null;
  slipConfidence: number;
  /** True when the slip came from estimators other than the sideband pair itself. */
  slipIndependent: boolean;
  measurement: SidebandMeasurement | null;
  /** Strongest symmetric pair found anywhere in the plausible 2sf range (for the load-oscillation check). */
  strongestPair: SidebandPair | null;
  loadPct: number | null;
  /** Share of this channel's samples flat at the rails, when it clips (quality.ts isClipped); else null. */
  clippedFraction?: number | null;
  rotorBars?: number;
  poles: number;
  driveFed?: boolean;
}

function notAssessable(reason: string, extra: Partial<BrokenBarResult> = {}): BrokenBarResult {
  return {
    lowerHz: null,
    lowerDb: null,
    upperHz: null,
    upperDb: null,
    depthDb: null,
    grade: null,
    gradeName: "Not assessable",
    estimatedBrokenBars: null,
    assessable: false,
    reason,
    loadOscillationSuspected: false,
    confidence: 0,
    caveats: [],
    ...extra,
  };
}

const round = (v: number, d = 2) => Math.round(v * 10 ** d) / 10 ** d;

export function assessRotor(inp: RotorInput): BrokenBarResult {
  const f = inp.supplyHz;
  if (inp.slip === null || !inp.measurement) return notAssessable("speed not found: no slip estimator found its line");
  if (inp.slipConfidence < MIN_SLIP_CONFIDENCE) return notAssessable(`speed not found: slip confidence ${inp.slipConfidence.toFixed(2)} is too low`);
  const m = inp.measurement;
  const levels: Partial<BrokenBarResult> = {
    lowerHz: round(m.lower.hz, 4),
    lowerDb: Number.isFinite(m.lower.depthDb) ? round(m.lower.depthDb) : null,
    upperHz: round(m.upper.hz, 4),
    upperDb: Number.isFinite(m.upper.depthDb) ? round(m.upper.depthDb) : null,
  };
  const need = minCaptureSeconds(f, inp.slip);
  if (inp.captureSeconds < need) {
    return notAssessable(
      `capture too short: ${inp.captureSeconds.toFixed(1)} s gives Δf = ${(1 / inp.captureSeconds).toFixed(3)} Hz, but 2sf = ${(2 * inp.slip * f).toFixed(3)} Hz needs ≥ ${HANN_SIDEBAND_BINS} bins (Hann rule), so ≥ ${need.toFixed(1)} s`,
      levels,
    );
  }
  // Load oscillation: a clear pair that is not where the independent slip puts the rotor sidebands.
  const pair = inp.strongestPair;
  if (inp.slipIndependent && pair) {
    const expected = 2 * inp.slip * f;
    const res = 1 / inp.captureSeconds;
    const off = Math.abs(pair.spacingHz - expected) > Math.max(2 * res, 0.1 * expected);
    const pairDepth = -toDb(Math.min(pair.lower.amp, pair.upper.amp) / inp.supplyAmp);
    const predictedDepth = Math.min(m.lower.depthDb, m.upper.depthDb);
    if (off && pairDepth < 54 && pairDepth + 6 < predictedDepth && !(m.lower.detected && m.lower.depthDb < 54 && m.lower.prominenceDb >= CLEAR_SIDEBAND_DB)) {
      return notAssessable(
        `load oscillation suspected: sidebands at f ± ${pair.spacingHz.toFixed(3)} Hz (${pairDepth.toFixed(1)} dB below f) do not sit at 2sf = ${expected.toFixed(3)} Hz from the independent slip estimate`,
        { ...levels, loadOscillationSuspected: true, caveats: ["A load-torque or process oscillation modulates the current; it is not a rotor fault. Re-measure at steady load."] },
      );
    }
  }
  const depth = m.lower.depthDb;
  const caveats: string[] = [];
  let confidence = inp.slipConfidence;
  if (!m.lower.detected) {
    // nothing at (1 − 2s)f: depth is at least the floor there
    if (!Number.isFinite(depth) || depth < 54) return notAssessable(`noise floor too high: only ${Number.isFinite(depth) ? depth.toFixed(1) : "?"} dB below f at f − 2sf`, levels);
    caveats.push(`No line at f − 2sf; the floor there is ${depth.toFixed(1)} dB below f.`);
  }
  const clear = m.lower.detected && depth < 54 && m.lower.prominenceDb >= CLEAR_SIDEBAND_DB;
  if (inp.loadPct !== null && inp.loadPct < LIGHT_LOAD_PCT) {
    if (!clear) return notAssessable(`light load: ${inp.loadPct.toFixed(0)} % of rated (< ${LIGHT_LOAD_PCT} %) hides rotor sidebands; a clean spectrum does not prove a sound rotor`, levels);
    caveats.push(`Light load (${inp.loadPct.toFixed(0)} %): sidebands shrink at light load, so the real severity may be worse than graded.`);
    confidence *= 0.5;
  }
  if (inp.clippedFraction) {
    // Flat tops add harmonics and intermodulation products and lower the supply line: the depth read is not the
    // rotor's. A clean spectrum proves nothing; a sideband that stands out is still reported, with less trust.
    const pct = `${(inp.clippedFraction * 100).toFixed(2)} % of samples flat at the rails`;
    if (!clear) return notAssessable(`the current clips (${pct}): clipping distorts the spectrum, so a clean one does not prove a sound rotor; increase the range and re-measure`, levels);
    caveats.push(`The current clips (${pct}): the sideband depth read is not reliable and the real severity may be worse than graded; increase the range and re-measure.`);
    confidence *= 0.5;
  }
  if (!inp.slipIndependent) {
    caveats.push("Slip only from the sideband pair itself: a load oscillation near 2sf cannot be ruled out.");
    confidence *= 0.6;
  }
  if (inp.driveFed) caveats.push("Inverter-fed: drive control loops can create sidebands that mimic a rotor fault.");
  if (m.upper.detected) caveats.push(`Upper sideband ${m.upper.depthDb.toFixed(1)} dB below f (depends on drive inertia).`);
  if (inp.loadPct !== null && inp.loadPct < 75 && inp.loadPct >= LIGHT_LOAD_PCT) caveats.push("The severity bands are read near full load; at part load sidebands read smaller.");
  const grade = gradeFromDepth(depth);
  const p = inp.poles / 2;
  const bars = inp.rotorBars && m.lower.detected ? round(thomsonBrokenBars(inp.rotorBars, p, depth), 1) : inp.rotorBars ? 0 : null;
  if (!clear && m.lower.detected) confidence *= 0.8;
  return {
    lowerHz: levels.lowerHz ?? null,
    lowerDb: levels.lowerDb ?? null,
    upperHz: levels.upperHz ?? null,
    upperDb: levels.upperDb ?? null,
    depthDb: round(depth),
    grade,
    gradeName: ROTOR_GRADE_NAMES[grade],
    estimatedBrokenBars: bars,
    assessable: true,
    reason: null,
    loadOscillationSuspected: false,
    confidence: round(Math.max(0, Math.min(1, confidence)), 3),
    caveats,
  };
}
