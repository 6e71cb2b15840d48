// Standard induction-motor formulas (see shared/domain.md §1–§4, §6). Every function is pure and
// unit-explicit so the tests can check them against published values one by one.

/** Synchronous speed ns = 120·f/P [rpm] (Chapman; NEMA MG 1). */
export function syncRpm(supplyHz: number, poles: number): number {
  return (120 * supplyHz) / poles;
}

/** Slip s = (ns − n)/ns, per unit. */
export function slipFromRpm(syncSpeedRpm: number, rpm: number): number {
  return (syncSpeedRpm - rpm) / syncSpeedRpm;
}

/** Rotor speed n = ns·(1 − s) [rpm]. */
export function rpmFromSlip(supplyHz: number, poles: number, slip: number): number {
  return syncRpm(supplyHz, poles) * (1 - slip);
}

/** Rotor rotation frequency fr = f·(1 − s)/p [Hz], p = P/2 pole pairs. */
export function rotorHz(supplyHz: number, poles: number, slip: number): number {
  return (supplyHz * (1 - slip)) / (poles / 2);
}

/** Slip from the rotor rotation frequency: s = 1 − p·fr/f. */
export function slipFromRotorHz(supplyHz: number, poles: number, frHz: number): number {
  return 1 - ((poles / 2) * frHz) / supplyHz;
}

/** Broken-bar sidebands (1 ± 2ks)·f (Kliman et al. 1988). */
export function brokenBarSidebands(supplyHz: number, slip: number, k = 1): { lower: number; upper: number } {
  return { lower: (1 - 2 * k * slip) * supplyHz, upper: (1 + 2 * k * slip) * supplyHz };
}

/** Pole-pass frequency Fp = P·(ns − n)/60 = 2·s·f [Hz]. */
export function polePassHz(supplyHz: number, slip: number): number {
  return 2 * slip * supplyHz;
}

/** Eccentricity sidebands f·[1 ± m(1 − s)/p] (Dorrell, Thomson & Roach 1997); m = 1 gives f ± fr. */
export function eccentricityHz(supplyHz: number, poles: number, slip: number, m = 1): { lower: number; upper: number } {
  const fr = rotorHz(supplyHz, poles, slip);
  return { lower: supplyHz - m * fr, upper: supplyHz + m * fr };
}

/**
 * Rotor slot harmonic f·[(k·R ± nd)(1 − s)/p + nw] (Hurst & Habetler 1996; Nandi et al. 2005).
 * nw is signed (±1, ±3 …); nd is the eccentricity order (0 = none).
 */
export function slotHarmonicHz(supplyHz: number, poles: number, slip: number, rotorBars: number, k = 1, nw = 1, nd = 0): number {
  const p = poles / 2;
  return supplyHz * (((k * rotorBars + nd) * (1 - slip)) / p + nw);
}

/** Inverse of slotHarmonicHz: s = 1 − p·(f_rsh/f − nw)/(k·R + nd). */
export function slipFromSlotHarmonic(rshHz: number, supplyHz: number, poles: number, rotorBars: number, k = 1, nw = 1, nd = 0): number {
  const p = poles / 2;
  return 1 - (p * (rshHz / supplyHz - nw)) / (k * rotorBars + nd);
}

/** Slip from the spacing of the broken-bar pair: Δ = 2sf → s = Δ/(2f). */
export function slipFromSidebandSpacing(spacingHz: number, supplyHz: number): number {
  return spacingHz / (2 * supplyHz);
}

/**
 * Rated supply frequency: the given one, else the 50/60 Hz whose synchronous speed is the smallest one above the
 * nameplate speed (a 4-pole 1450 rpm motor is a 50 Hz motor, 1750 rpm a 60 Hz one). Common practice.
 */
export function inferRatedHz(ratedRpm: number, poles: number, ratedHz?: number): number {
  if (ratedHz && ratedHz > 0) return ratedHz;
  for (const hz of [50, 60]) if (ratedRpm < syncRpm(hz, poles)) return hz;
  return 60;
}

/** Nameplate (full-load) slip s_n = (ns_rated − n_r)/ns_rated. */
export function ratedSlip(ratedRpm: number, poles: number, ratedHz?: number): number {
  const hz = inferRatedHz(ratedRpm, poles, ratedHz);
  return slipFromRpm(syncRpm(hz, poles), ratedRpm);
}

/**
 * Slip-method load, % of rated (U.S. DOE motor-load fact sheet): Load = slip / [(ns − n_r)·(V_r/V)²].
 * Written with slip *speeds* s·f so the same form serves drive-fed motors, where at constant V/f the torque
 * follows the slip speed (s·f vs s_fl·f_rated); on mains f ≈ f_rated and it is the fact sheet's formula exactly.
 */
export function slipMethodLoadPct(args: {
  slip: number;
  supplyHz: number;
  ratedSlip: number;
  ratedHz: number;
  measuredVoltage?: number;
  ratedVoltage?: number;
}): number {
  let ratio = (args.slip * args.supplyHz) / (args.ratedSlip * args.ratedHz);
  if (args.measuredVoltage && args.ratedVoltage) ratio *= (args.measuredVoltage / args.ratedVoltage) ** 2;
  return ratio * 100;
}

/** DOE fact sheet form in rpm (for the check values): Load = (ns − n)/((ns − n_r)·(V_r/V)²) × 100. */
export function slipMethodLoadPctRpm(ns: number, ratedRpm: number, measuredRpm: number, voltageRatio = 1): number {
  return ((ns - measuredRpm) / ((ns - ratedRpm) * (1 / voltageRatio) ** 2)) * 100;
}

/** Current-method load ≈ (I/I_r)·(V/V_r) × 100 % (DOE fact sheet; poor below ~50 % load). */
export function currentMethodLoadPct(currentA: number, ratedCurrentA: number, measuredVoltage?: number, ratedVoltage?: number): number {
  const v = measuredVoltage && ratedVoltage ? measuredVoltage / ratedVoltage : 1;
  return (currentA / ratedCurrentA) * v * 100;
}

/** Thomson & Fenger (2001) broken-bar count: n ≈ 2R/(10^(N/20) + 2p), N = dB of the lower sideband below f. */
export function thomsonBrokenBars(rotorBars: number, polePairs: number, depthDb: number): number {
  return (2 * rotorBars) / (10 ** (depthDb / 20) + 2 * polePairs);
}

/** Inverse of the Thomson form: depth in dB for n broken bars, N = 20·log10(2R/n − 2p). */
export function thomsonDepthDb(rotorBars: number, polePairs: number, brokenBars: number): number {
  return 20 * Math.log10((2 * rotorBars) / brokenBars - 2 * polePairs);
}

/** Bellini et al. (2001): I_(1−2s)/I_f ≈ sin α/(2p(2π − α)), α = 2π·p·n/R → depth in dB. */
export function belliniDepthDb(rotorBars: number, polePairs: number, brokenBars: number): number {
  const alpha = (2 * Math.PI * polePairs * brokenBars) / rotorBars;
  const ratio = Math.sin(alpha) / (2 * polePairs * (2 * Math.PI - alpha));
  return -20 * Math.log10(ratio);
}

/** Bellini form inverted numerically (monotone for α < π/2) by bisection. */
export function belliniBrokenBars(rotorBars: number, polePairs: number, depthDb: number): number {
  let lo = 1e-6;
  let hi = rotorBars / (4 * polePairs); // α = π/2
  if (belliniDepthDb(rotorBars, polePairs, hi) > depthDb) return hi;
  for (let i = 0; i < 80; i++) {
    const mid = 0.5 * (lo + hi);
    if (belliniDepthDb(rotorBars, polePairs, mid) > depthDb) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** Velocity amplitude from acceleration at one frequency: v = a/(2πf). Units: m/s² → m/s. */
export function velocityFromAcceleration(accel: number, hz: number): number {
  return accel / (2 * Math.PI * hz);
}

export const STANDARD_GRAVITY = 9.80665; // m/s² per g (CGPM 1901 definition)

/** Hann rule (domain.md §2, §8): to see a sideband ~60 dB down, 2sf ≥ 8·Δf with Δf = 1/T → T ≥ 8/(2sf). */
export const HANN_SIDEBAND_BINS = 8;
export function minCaptureSeconds(supplyHz: number, slip: number, bins = HANN_SIDEBAND_BINS): number {
  return bins / (2 * slip * supplyHz);
}
