// The exact per-phase equivalent circuit (IEEE Std 112 form): V_φ → R1 + jX1 → (Rc ∥ jXm) → R2/s + jX2.
// Solved with complex arithmetic, no approximations; the Thevenin forms live in thevenin.ts.
// Optionally the rotor is a deep-bar (skin-effect) rotor whose R2 and X2 depend on the rotor frequency s·f:
// see `rotorAtSlip`. Without `rotorLockedR2` / `rotorLockedX2` the rotor constants are constant, as in the textbooks.

import { abs, add, complex, conj, div, mul, parallel, sub, type Complex } from "./complex.ts";
import { rpmFromSlip, syncRadPerS } from "./speed.ts";
import { MotorModelError, type CircuitParams, type MotorModelInput, type OperatingPoint } from "./types.ts";

/** Phase voltage: V_line/√3 across each star phase, the full line voltage across each delta phase. */
export function phaseVoltage(input: MotorModelInput): number {
  return input.connection === "star" ? input.lineVoltage / Math.sqrt(3) : input.lineVoltage;
}

/** Line current from phase current: ×√3 for delta, unchanged for star. */
export function lineFromPhaseCurrent(input: MotorModelInput, phaseCurrentA: number): number {
  return input.connection === "delta" ? phaseCurrentA * Math.sqrt(3) : phaseCurrentA;
}

/** The shunt branch Rc ∥ jXm. */
export function shuntImpedance(input: MotorModelInput): Complex {
  const { xm, rc } = input.params;
  const magnetising = complex(0, xm);
  return hasCoreResistance(input) ? (parallel(complex(rc as number), magnetising) as Complex) : magnetising;
}

export function hasCoreResistance(input: MotorModelInput): boolean {
  const rc = input.params.rc;
  return rc !== undefined && rc !== null && Number.isFinite(rc) && rc > 0;
}

/**
 * Reduced bar height ξ = h·√(π·f_r·μ0/ρ) of the rotor bar at standstill, where the rotor frequency equals the
 * supply frequency. ξ = 3.5 is a deep bar (about 45 mm of cast aluminium at 50 Hz, penetration depth ≈ 13 mm
 * warm). It only sets the shape of the transition between running and standstill values (the fitted or entered
 * standstill values set its size): lower values leave R2 near its running value up to mid-speed and give a deep
 * pull-up dip, higher ones a monotonic curve. Engineering approximation; typical value, from memory.
 */
export const DEEP_BAR_XI_AT_STANDSTILL = 3.5;

const given = (v: number | null | undefined): v is number => v !== undefined && v !== null && Number.isFinite(v);

/** True when the circuit carries standstill rotor values, i.e. R2 and X2 depend on slip. */
export function hasDeepBarRotor(params: CircuitParams): boolean {
  return given(params.rotorLockedR2) || given(params.rotorLockedX2);
}

/**
 * Resistance and reactance factors of a rectangular bar in an open slot (classical skin-effect result):
 * K_R = ξ·(sinh 2ξ + sin 2ξ)/(cosh 2ξ − cos 2ξ), K_X = (3/(2ξ))·(sinh 2ξ − sin 2ξ)/(cosh 2ξ − cos 2ξ).
 * Both are 1 at ξ = 0; K_R − 1 ≈ 4ξ⁴/45 and 1 − K_X ≈ 8ξ⁴/315 for small ξ (used below ξ = 0.05, where the
 * closed forms lose digits to cancellation).
 */
export function skinEffectFactors(xi: number): { kr: number; kx: number } {
  const x = Math.abs(xi);
  if (x < 0.05) return { kr: 1 + (4 * x ** 4) / 45, kx: 1 - (8 * x ** 4) / 315 };
  const d = Math.cosh(2 * x) - Math.cos(2 * x);
  return { kr: (x * (Math.sinh(2 * x) + Math.sin(2 * x))) / d, kx: (3 / (2 * x)) * ((Math.sinh(2 * x) - Math.sin(2 * x)) / d) };
}

const STANDSTILL_FACTORS = skinEffectFactors(DEEP_BAR_XI_AT_STANDSTILL);

/**
 * Weights g_R(s), g_X(s) of the standstill values: 0 at s = 0 (DC rotor current), 1 at |s| = 1, the normalised
 * skin-effect factors at rotor frequency |s|·f, ξ(s) = ξ₁·√|s|:
 * g_R = (K_R(ξ) − 1)/(K_R(ξ₁) − 1), g_X = (1 − K_X(ξ))/(1 − K_X(ξ₁)).
 * They rise as s² at low slip (g_R ≈ 5·10⁻⁴ at s = 0.01, ≈ 0.05 at s = 0.1), so the running region is barely
 * changed. Beyond standstill (plugging, |s| > 1) they are held at 1 so R2 and X2 stay between their two values.
 */
export function deepBarWeights(slip: number): { gR: number; gX: number } {
  const a = Math.min(1, Math.abs(slip));
  if (a === 1) return { gR: 1, gX: 1 };
  const { kr, kx } = skinEffectFactors(DEEP_BAR_XI_AT_STANDSTILL * Math.sqrt(a));
  return { gR: (kr - 1) / (STANDSTILL_FACTORS.kr - 1), gX: (1 - kx) / (1 - STANDSTILL_FACTORS.kx) };
}

/**
 * Rotor resistance and leakage reactance at a slip. Single cage (no standstill values): r2, x2 at every slip.
 * Deep bar: R2(s) = R2₀ + (R2_LR − R2₀)·g_R(s), X2(s) = X2₀ − (X2₀ − X2_LR)·g_X(s), with R2₀ = r2, X2₀ = x2
 * (running values) and R2_LR, X2_LR the standstill values. An engineering approximation of deep-bar and
 * double-cage rotors: one bar shape for all motors, endpoints fitted or entered.
 */
export function rotorAtSlip(params: CircuitParams, slip: number): { r2: number; x2: number } {
  const { r2, x2, rotorLockedR2, rotorLockedX2 } = params;
  if (!hasDeepBarRotor(params)) return { r2, x2 };
  const { gR, gX } = deepBarWeights(slip);
  return {
    r2: given(rotorLockedR2) ? r2 + (rotorLockedR2 - r2) * gR : r2,
    x2: given(rotorLockedX2) ? x2 - (x2 - rotorLockedX2) * gX : x2,
  };
}

/** Rotor branch R2(s)/s + jX2(s); null (open circuit) at synchronous speed, where no rotor current flows. */
function rotorImpedance(input: MotorModelInput, slip: number): Complex | null {
  if (slip === 0) return null;
  const rotor = rotorAtSlip(input.params, slip);
  return complex(rotor.r2 / slip, rotor.x2);
}

/** Rejects inputs no circuit can be built from; the API validates the same rules before calling. */
export function assertValidInput(input: MotorModelInput): void {
  const { r1, x1, r2, x2, xm } = input.params;
  const bad: string[] = [];
  if (!(input.lineVoltage > 0)) bad.push("lineVoltage must be > 0");
  if (!(input.frequencyHz > 0)) bad.push("frequencyHz must be > 0");
  if (!(Number.isInteger(input.poles) && input.poles >= 2 && input.poles % 2 === 0)) bad.push("poles must be an even integer ≥ 2");
  for (const [name, v] of Object.entries({ r1, x1, x2 })) if (!(v >= 0 && Number.isFinite(v))) bad.push(`${name} must be ≥ 0`);
  for (const [name, v] of Object.entries({ r2, xm })) if (!(v > 0 && Number.isFinite(v))) bad.push(`${name} must be > 0`);
  const { rotorLockedR2, rotorLockedX2 } = input.params;
  if (rotorLockedR2 !== undefined && rotorLockedR2 !== null && !(rotorLockedR2 > 0 && Number.isFinite(rotorLockedR2))) bad.push("rotorLockedR2 must be > 0");
  if (rotorLockedX2 !== undefined && rotorLockedX2 !== null && !(rotorLockedX2 >= 0 && Number.isFinite(rotorLockedX2))) bad.push("rotorLockedX2 must be ≥ 0");
  if ((input.rotationalLossW ?? 0) < 0) bad.push("rotationalLossW must be ≥ 0");
  if (bad.length) throw new MotorModelError(`Invalid motor model: ${bad.join("; ")}`);
}

/**
 * Every quantity of the exact circuit at one slip. Slip 1 is standstill, 0 synchronous speed; values
 * above 1 (plugging) and below 0 (generating) are computed too, but efficiency is only defined for motoring.
 */
export function evaluateAtSlip(input: MotorModelInput, slip: number): OperatingPoint {
  assertValidInput(input);
  if (!Number.isFinite(slip)) throw new MotorModelError("slip must be a finite number");
  const { r1, x1 } = input.params;
  const r2 = rotorAtSlip(input.params, slip).r2;
  const vPhase = complex(phaseVoltage(input)); // reference phasor, angle 0
  const z1 = complex(r1, x1);
  const zShunt = shuntImpedance(input);
  const zRotor = rotorImpedance(input, slip);
  const zAirGap = parallel(zShunt, zRotor) as Complex;
  const zIn = add(z1, zAirGap);

  const i1 = div(vPhase, zIn);
  const e1 = sub(vPhase, mul(i1, z1)); // air-gap (magnetising) voltage
  const i2 = zRotor ? abs(div(e1, zRotor)) : 0;
  const iPhase = abs(i1);

  const inputPowerW = 3 * mul(vPhase, conj(i1)).re;
  const statorCopperLossW = 3 * iPhase * iPhase * r1;
  const coreLossW = hasCoreResistance(input) ? (3 * abs(e1) ** 2) / (input.params.rc as number) : 0;
  // P_ag = 3·I2²·R2(s)/s; at s = 0 the rotor branch is open and carries no power.
  const airGapPowerW = slip === 0 ? 0 : (3 * i2 * i2 * r2) / slip;
  const rotorCopperLossW = slip * airGapPowerW;
  const convertedPowerW = (1 - slip) * airGapPowerW;
  const rotationalLossW = input.rotationalLossW ?? 0;
  const outputPowerW = convertedPowerW - rotationalLossW;

  const omegaSync = syncRadPerS(input.frequencyHz, input.poles);
  const omegaMech = omegaSync * (1 - slip);
  const inducedTorqueNm = airGapPowerW / omegaSync;
  const loadTorqueNm = omegaMech === 0 ? null : outputPowerW / omegaMech;

  return {
    slip,
    rpm: rpmFromSlip(input.frequencyHz, input.poles, slip),
    statorCurrentA: lineFromPhaseCurrent(input, iPhase),
    phaseCurrentA: iPhase,
    powerFactor: zIn.re / abs(zIn),
    inputPowerW,
    statorCopperLossW,
    coreLossW,
    airGapPowerW,
    rotorCopperLossW,
    convertedPowerW,
    outputPowerW,
    inducedTorqueNm,
    loadTorqueNm,
    efficiency: outputPowerW > 0 && inputPowerW > 0 ? outputPowerW / inputPowerW : 0,
  };
}

/** Induced torque only: the hot path of the numeric searches. */
export function torqueAtSlip(input: MotorModelInput, slip: number): number {
  return evaluateAtSlip(input, slip).inducedTorqueNm;
}
