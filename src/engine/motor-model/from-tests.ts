// Circuit constants from the no-load and locked-rotor tests, the standard test method for polyphase
// induction motors (IEEE Std 112 style, as taught in machines texts):
//  - locked rotor: R_LR = P/(3·I²) = R1 + R2, X_LR = √(Z² − R²) scaled to rated frequency = X1 + X2, split by design letter;
//  - no load: |Z| ≈ X1 + Xm, and P − 3·I²·R1 = rotational loss (friction, windage and core, lumped);
//  - DC test: R1 (when given; otherwise R1 = R2 = R_LR/2 is assumed).
// The standard method neglects the magnetising branch at standstill and the rotor at no load; `refine`
// removes both approximations with the complex impedances (a few fixed-point passes).
// The locked-rotor test measures R2 and X2 at the rotor frequency of the test (s = 1, so f_r = test frequency):
// on a deep-bar rotor that is why the standard method asks for about 25 % of rated frequency, near the rotor
// frequency at full load. The result is a single-cage circuit (no rotorLockedR2/X2): its R2 and X2 are the
// running values; the notes say how far the test frequency sits from running conditions.

import { complex, inv, sub, type Complex } from "./complex.ts";
import { DEEP_BAR_XI_AT_STANDSTILL, deepBarWeights } from "./circuit.ts";
import { STATOR_LEAKAGE_SHARE } from "./design.ts";
import { MotorModelError, type CircuitParams, type Connection, type DesignLetter, type ParamName, type ParamSources } from "./types.ts";

/** One test reading: line voltage (V), line current (A), total three-phase input power (W), frequency (Hz). */
export interface TestReading {
  V: number;
  I: number;
  P: number;
  f: number;
}

export interface TestData {
  /** At rated voltage and frequency, shaft uncoupled. Its frequency is taken as the rated frequency. */
  noLoad: TestReading;
  /** Rotor blocked, reduced voltage so about rated current flows; often at reduced frequency (e.g. 25 % of rated). */
  lockedRotor: TestReading;
  /** Stator resistance per phase (of the connection given), Ω, from a DC test. */
  statorResistanceDc?: number;
  designLetter: DesignLetter;
  /** Winding connection used for the per-phase values. Default "star". */
  connection?: Connection;
  /** Remove the two approximations of the standard method. Default false. */
  refine?: boolean;
}

export interface FromTestsResult {
  params: CircuitParams;
  /** Friction, windage and core loss from the no-load test, W (core loss is lumped here, so rc is null). */
  rotationalLossW: number;
  sources: ParamSources;
  /** For each value, the test it comes from (or "entered" for the DC resistance) and how, in one sentence. */
  detail: Partial<Record<ParamName, { source: TestValueSource; basis: string }>>;
  notes: string[];
}

/** Which reading a value came from, as the motor page names it. */
export type TestValueSource = "no-load test" | "locked-rotor test" | "entered";

function perPhase(r: TestReading, connection: Connection): { v: number; i: number; cos: number } {
  if (!(r.V > 0 && r.I > 0 && r.P >= 0 && r.f > 0)) throw new MotorModelError("Test readings need V > 0, I > 0, P ≥ 0 and f > 0.");
  const v = connection === "star" ? r.V / Math.sqrt(3) : r.V;
  const i = connection === "star" ? r.I : r.I / Math.sqrt(3);
  const cos = r.P / (3 * v * i);
  if (cos > 1) throw new MotorModelError(`Test power ${r.P} W exceeds √3·V·I: check the readings.`);
  return { v, i, cos };
}

/** Impedance per phase seen at the terminals, V/I∠φ. */
const terminalImpedance = (m: { v: number; i: number; cos: number }): Complex =>
  complex((m.v / m.i) * m.cos, (m.v / m.i) * Math.sqrt(1 - m.cos * m.cos));

export function fromTests(data: TestData): FromTestsResult {
  const connection = data.connection ?? "star";
  const share = STATOR_LEAKAGE_SHARE[data.designLetter];
  const fRated = data.noLoad.f;
  const fRatio = data.lockedRotor.f / fRated; // reactances at the locked-rotor test frequency = X·fRatio
  const nl = perPhase(data.noLoad, connection);
  const lr = perPhase(data.lockedRotor, connection);
  const notes: string[] = [];

  const zLr = terminalImpedance(lr);
  const rLr = zLr.re;
  const xLr = zLr.im / fRatio;
  notes.push(
    `Locked-rotor test: R1 + R2 = ${rLr.toFixed(4)} Ω, X1 + X2 = ${xLr.toFixed(4)} Ω per phase` +
      (fRatio !== 1 ? ` (reactance scaled from ${data.lockedRotor.f} Hz to ${fRated} Hz).` : "."),
  );

  const dc = data.statorResistanceDc;
  const hasDc = dc !== undefined && dc > 0;
  let r1 = hasDc ? dc : rLr / 2;
  notes.push(hasDc ? `R1 = ${r1.toFixed(4)} Ω from the DC resistance entered.` : "No DC resistance given: R1 = R2 assumed.");
  let r2 = rLr - r1;
  if (!(r2 > 0)) throw new MotorModelError("DC stator resistance is not smaller than the locked-rotor resistance: check the readings.");
  let x1 = share * xLr;
  let x2 = (1 - share) * xLr;
  notes.push(`X1 : X2 split ${share} : ${(1 - share).toFixed(1)} for design ${data.designLetter} (standard rule of thumb).`);
  let xm = nl.v / nl.i - x1;

  if (data.refine) {
    const zNl = terminalImpedance(nl);
    for (let pass = 0; pass < 50; pass++) {
      // No load: what is left after Z1 is the shunt branch; its susceptance gives Xm (its conductance is the loss).
      const yShunt = inv(sub(zNl, complex(r1, x1)));
      xm = -1 / yShunt.im;
      // Locked rotor at the test frequency: remove Z1, then the magnetising branch in parallel, leaving Z2.
      const zPar = sub(zLr, complex(r1, x1 * fRatio));
      const y2 = sub(inv(zPar), inv(complex(0, xm * fRatio)));
      const z2 = inv(y2);
      const next = { r2: z2.re, x2: z2.im / fRatio };
      if (!hasDc) r1 = next.r2;
      const x1Next = (next.x2 * share) / (1 - share);
      const moved = Math.abs(next.r2 - r2) + Math.abs(next.x2 - x2) + Math.abs(x1Next - x1);
      r2 = next.r2;
      x2 = next.x2;
      x1 = x1Next;
      if (moved < 1e-12) break;
    }
    notes.push("Refined: magnetising branch kept in the locked-rotor test and the stator drop removed from the no-load test.");
  }
  if (!(xm > 0 && r2 > 0 && x2 > 0)) throw new MotorModelError("Test readings give a non-physical circuit: check the readings.");

  const g = deepBarWeights(fRatio);
  notes.push(
    `The locked-rotor test measures R2 and X2 at its own rotor frequency, ${data.lockedRotor.f} Hz (s = 1); they are used as the ` +
      `running values (constant R2, X2). On a deep-bar rotor (the model's skin-effect shape, ξ = ${DEEP_BAR_XI_AT_STANDSTILL} at ` +
      `${fRated} Hz) that frequency lies ${(100 * g.gR).toFixed(0)} % of the way from running to standstill resistance` +
      (fRatio >= 0.999
        ? ": a test at rated frequency measures the standstill values, so R2 reads high and X2 low for running; a test at about 25 % of rated frequency is closer to running conditions."
        : fRatio <= 0.3
          ? ", much nearer running than standstill conditions (why the standard method tests at about 25 % of rated frequency)."
          : ": a test at about 25 % of rated frequency would be closer to running conditions."),
  );
  const rotationalLossW = data.noLoad.P - 3 * nl.i * nl.i * r1;
  notes.push(`Rotational loss (friction, windage and core, lumped) = ${rotationalLossW.toFixed(0)} W from the no-load test.`);
  const test = "no-load/locked-rotor test" as const;
  const refined = data.refine ? " (refined: magnetising branch kept)" : "";
  const lrSplit = `${data.designLetter === "wound" ? "wound-rotor" : `design ${data.designLetter}`} split ${share} : ${(1 - share).toFixed(1)} of X1 + X2`;
  const detail: FromTestsResult["detail"] = {
    r1: hasDc
      ? { source: "entered", basis: "DC stator resistance entered (DC test)." }
      : { source: "locked-rotor test", basis: "No DC test: R1 = R2 assumed, half the locked-rotor resistance." },
    r2: { source: "locked-rotor test", basis: `Locked-rotor resistance P/(3·I²) less R1${refined}.` },
    x1: { source: "locked-rotor test", basis: `Locked-rotor reactance at ${fRated} Hz, the ${lrSplit}${refined}.` },
    x2: { source: "locked-rotor test", basis: `Locked-rotor reactance at ${fRated} Hz, the ${lrSplit}${refined}.` },
    xm: { source: "no-load test", basis: `No-load reactance less X1 from the locked-rotor test${data.refine ? " (refined: the shunt branch after the stator impedance)" : ""}.` },
    rotationalLossW: { source: "no-load test", basis: "No-load input power less the stator copper loss 3·I²·R1: friction, windage and core, lumped." },
  };
  return {
    params: { r1, x1, r2, x2, xm, rc: null },
    rotationalLossW: Math.max(0, rotationalLossW),
    sources: { r1: hasDc ? "entered" : test, x1: test, r2: test, x2: test, xm: test, rotationalLossW: test },
    detail,
    notes,
  };
}
