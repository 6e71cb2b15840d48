// Thevenin equivalent of the stator side seen from the rotor branch, and the closed-form breakdown
// (maximum) torque it gives. Two forms, labelled, because textbooks quote the approximate one:
//  - approximate (Chapman): V_th = V_φ·Xm/√(R1² + (X1+Xm)²), R_th ≈ R1·(Xm/(X1+Xm))², X_th ≈ X1; Rc ignored;
//  - exact: Z_th = Z1·Z_shunt/(Z1 + Z_shunt), V_th = V_φ·Z_shunt/(Z1 + Z_shunt), with Rc when present.
// The exact form gives the same torque as the full circuit, so it cross-checks the numeric search.
// Deep-bar rotor (standstill values given): the Thevenin source is the stator side only, so it is unchanged;
// the closed forms for s_max and τ_max use the running-point rotor values r2, x2 (breakdown sits at low rotor
// frequency, where R2(s), X2(s) are within a few per cent of them), so they are a close estimate there, not an
// identity; `theveninTorque` and `tauStart` use R2(s), X2(s) at their slip and stay exact at every slip.

import { abs, add, complex, div, mul } from "./complex.ts";
import { phaseVoltage, rotorAtSlip, shuntImpedance } from "./circuit.ts";
import { rpmFromSlip, syncRadPerS } from "./speed.ts";
import type { MotorModelInput } from "./types.ts";

export interface TheveninForm {
  form: "approximate" | "exact";
  /** How this form was built, for the screen. */
  label: string;
  vth: number;
  rth: number;
  xth: number;
  /**
   * Slip of maximum torque, R2/√(R_th² + (X_th + X2)²), with the running-point R2, X2. May exceed 1 for a
   * high-resistance rotor.
   */
  sMax: number;
  rpmAtMax: number;
  /** Breakdown torque 3·V_th² / (2ω_s·[R_th + √(R_th² + (X_th + X2)²)]), N·m, running-point X2. */
  tauMax: number;
  /** Torque at standstill (s = 1) from the same form, N·m, with the standstill R2, X2 of a deep-bar rotor. */
  tauStart: number;
}

export interface TheveninResult {
  approximate: TheveninForm;
  exact: TheveninForm;
}

/**
 * Torque of the Thevenin form at slip s: 3·V_th²·(R2/s) / (ω_s·[(R_th + R2/s)² + (X_th + X2)²]), with the
 * rotor values at that slip (constant for a single-cage circuit).
 */
export function theveninTorque(input: MotorModelInput, th: Pick<TheveninForm, "vth" | "rth" | "xth">, slip: number): number {
  const { r2, x2 } = rotorAtSlip(input.params, slip);
  const omegaSync = syncRadPerS(input.frequencyHz, input.poles);
  const rr = r2 / slip;
  return (3 * th.vth ** 2 * rr) / (omegaSync * ((th.rth + rr) ** 2 + (th.xth + x2) ** 2));
}

function closeForm(input: MotorModelInput, form: TheveninForm["form"], label: string, vth: number, rth: number, xth: number): TheveninForm {
  const { r2, x2 } = input.params;
  const omegaSync = syncRadPerS(input.frequencyHz, input.poles);
  const root = Math.hypot(rth, xth + x2);
  const sMax = r2 / root;
  const base = { vth, rth, xth };
  return {
    form,
    label,
    ...base,
    sMax,
    rpmAtMax: rpmFromSlip(input.frequencyHz, input.poles, sMax),
    tauMax: (3 * vth ** 2) / (2 * omegaSync * (rth + root)),
    tauStart: theveninTorque(input, base, 1),
  };
}

export function thevenin(input: MotorModelInput): TheveninResult {
  const { r1, x1, xm } = input.params;
  const vPhase = phaseVoltage(input);

  const vthApprox = (vPhase * xm) / Math.hypot(r1, x1 + xm);
  const rthApprox = r1 * (xm / (x1 + xm)) ** 2;
  const approximate = closeForm(
    input,
    "approximate",
    "Approximate Thevenin form (textbook): R_th ≈ R1·(Xm/(X1+Xm))², X_th ≈ X1, core-loss resistance ignored",
    vthApprox,
    rthApprox,
    x1,
  );

  const z1 = complex(r1, x1);
  const zShunt = shuntImpedance(input);
  const sum = add(z1, zShunt);
  const zth = div(mul(z1, zShunt), sum);
  const vth = abs(div(mul(complex(vPhase), zShunt), sum));
  const exact = closeForm(
    input,
    "exact",
    "Exact Thevenin form: Z_th = Z1·Z_shunt/(Z1 + Z_shunt), including Rc when given",
    vth,
    zth.re,
    zth.im,
  );
  return { approximate, exact };
}
