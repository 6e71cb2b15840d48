// The exact per-phase equivalent circuit (IEEE Std 112 form): V_φ → R1 + jX1 → (Rc ∥ jXm) → R2/s + jX2.
// Solved with complex arithmetic, no approximations; the Thevenin forms live in thevenin.ts.

import { abs, add, complex, conj, div, mul, parallel, sub, type Complex } from "./complex.ts";
import { rpmFromSlip, syncRadPerS } from "./speed.ts";
import { MotorModelError, type MotorModelInput, type OperatingPoint } from "./types.ts";

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

/** Rotor branch R2/s + jX2; null (open circuit) at synchronous speed, where no rotor current flows. */
function rotorImpedance(input: MotorModelInput, slip: number): Complex | null {
  if (slip === 0) return null;
  return complex(input.params.r2 / slip, input.params.x2);
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
  const { r1, x1, r2 } = input.params;
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
  // P_ag = 3·I2²·R2/s; at s = 0 the rotor branch is open and carries no power.
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
