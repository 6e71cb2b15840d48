// A circuit estimated from the nameplate alone. The nameplate fixes rated output, current, slip and (given
// or assumed) efficiency; the usual assumptions below fill in the rest, then the circuit is refined
// numerically so it reproduces the rated point exactly. Every assumption is returned as a sentence for the screen.

import type { Nameplate } from "../types.ts";
import { evaluateAtSlip } from "./circuit.ts";
import { BREAKDOWN_TORQUE_RATIO, LOSS_SHARE, STATOR_LEAKAGE_SHARE, typicalEfficiency } from "./design.ts";
import { bisect } from "./search.ts";
import { syncRpm } from "./speed.ts";
import { thevenin } from "./thevenin.ts";
import {
  MotorModelError,
  type CircuitParams,
  type Connection,
  type DesignLetter,
  type MotorModelInput,
  type OperatingPoint,
  type ParamSources,
} from "./types.ts";

export type NameplateForModel = Pick<Nameplate, "poles" | "ratedRpm" | "ratedHz"> &
  Required<Pick<Nameplate, "ratedKw" | "ratedVoltage" | "ratedCurrent">> & {
    /** Full-load efficiency, per unit (0.945) or percent (94.5). */
    efficiency?: number;
    /** Full-load power factor, per unit. */
    powerFactor?: number;
    designLetter?: DesignLetter;
    connection?: Connection;
  };

export interface NameplateEstimate {
  input: MotorModelInput;
  sources: ParamSources;
  assumptions: string[];
  /** The model evaluated at rated slip, to show how well it reproduces the nameplate. */
  ratedPoint: OperatingPoint;
}

const pct = (x: number, digits = 1) => `${(100 * x).toFixed(digits)} %`;

/** Rated frequency from the nameplate, or the one of 50/60 Hz whose synchronous speed sits just above rated rpm. */
function ratedFrequency(np: NameplateForModel, assumptions: string[]): number {
  if (np.ratedHz) return np.ratedHz;
  const candidates = [50, 60].filter((f) => syncRpm(f, np.poles) > np.ratedRpm);
  if (!candidates.length) throw new MotorModelError("Rated speed is above synchronous speed at 50 and 60 Hz: check poles and rated rpm.");
  const f = candidates.reduce((a, b) => (syncRpm(a, np.poles) - np.ratedRpm <= syncRpm(b, np.poles) - np.ratedRpm ? a : b));
  assumptions.push(`Rated frequency not given: ${f} Hz assumed (its synchronous speed is nearest above the rated ${np.ratedRpm} rpm).`);
  return f;
}

function validate(np: NameplateForModel): void {
  const bad: string[] = [];
  for (const k of ["ratedKw", "ratedVoltage", "ratedCurrent", "ratedRpm"] as const) if (!(np[k] > 0)) bad.push(`${k} must be > 0`);
  if (!(Number.isInteger(np.poles) && np.poles >= 2 && np.poles % 2 === 0)) bad.push("poles must be an even integer ≥ 2");
  if (bad.length) throw new MotorModelError(`Invalid nameplate: ${bad.join("; ")}`);
}

export function estimateFromNameplate(np: NameplateForModel): NameplateEstimate {
  validate(np);
  const assumptions: string[] = [];
  const design = np.designLetter ?? "B";
  if (!np.designLetter) assumptions.push("Design letter not given: design B assumed (the usual general-purpose design).");
  const f = ratedFrequency(np, assumptions);
  const ns = syncRpm(f, np.poles);
  const sRated = (ns - np.ratedRpm) / ns;
  if (!(sRated > 0 && sRated < 0.25)) {
    throw new MotorModelError(`Rated slip ${sRated.toFixed(4)} from ${np.ratedRpm} rpm and ${ns} rpm synchronous is not plausible: check poles, rated rpm and frequency.`);
  }
  const pOut = np.ratedKw * 1000;
  const apparent = Math.sqrt(3) * np.ratedVoltage * np.ratedCurrent;

  // Efficiency and power factor: the model matches rated output, rated current and efficiency; PF then follows.
  const etaGiven = np.efficiency === undefined ? undefined : np.efficiency > 1 ? np.efficiency / 100 : np.efficiency;
  let eta: number;
  if (etaGiven !== undefined) eta = etaGiven;
  else if (np.powerFactor !== undefined) {
    eta = pOut / (apparent * np.powerFactor);
    assumptions.push(`Efficiency not given: ${pct(eta)} follows from output, current, voltage and the ${np.powerFactor} power factor.`);
  } else {
    eta = typicalEfficiency(np.ratedKw);
    assumptions.push(`Efficiency not given: ${pct(eta)} assumed, a typical full-load value for a ${np.ratedKw} kW motor.`);
  }
  if (!(eta > 0.5 && eta < 0.995)) throw new MotorModelError(`Efficiency ${pct(eta)} is not plausible: check rated kW, voltage, current and power factor.`);
  const pIn = pOut / eta;
  const pf = pIn / apparent;
  if (!(pf > 0.3 && pf < 0.99)) {
    throw new MotorModelError(`The nameplate implies a power factor of ${pf.toFixed(3)}, which is not plausible: check rated kW, voltage and current.`);
  }
  if (np.powerFactor !== undefined && etaGiven !== undefined && Math.abs(np.powerFactor - pf) > 0.03) {
    assumptions.push(
      `Nameplate power factor ${np.powerFactor} disagrees with output, current and efficiency (they imply ${pf.toFixed(3)}); ` +
        "the model follows the current and efficiency.",
    );
  }

  const connection: Connection = np.connection ?? "star";
  if (!np.connection) {
    assumptions.push(
      "Connection not given: a star-equivalent circuit is used. Line currents, powers and torques are the same as for a delta " +
        "winding; only the ohms per phase differ (delta ohms = 3 × star ohms).",
    );
  }
  const vPhase = connection === "star" ? np.ratedVoltage / Math.sqrt(3) : np.ratedVoltage;
  const iPhase = connection === "star" ? np.ratedCurrent : np.ratedCurrent / Math.sqrt(3);
  const zBase = vPhase / iPhase;

  // Loss split at the rated point. Rotor copper loss is fixed by slip; stator copper takes what is left.
  const losses = pIn - pOut;
  let coreW = LOSS_SHARE.core * losses;
  let rotationalW = LOSS_SHARE.rotational * losses;
  let rotorCuW = 0;
  let statorCuW = 0;
  for (let pass = 0; pass < 20; pass++) {
    rotorCuW = (sRated / (1 - sRated)) * (pOut + rotationalW);
    statorCuW = losses - coreW - rotationalW - rotorCuW;
    const floor = LOSS_SHARE.statorCopperMin * losses;
    if (statorCuW >= floor - 1e-9) break;
    const room = losses - rotorCuW - floor;
    if (room <= 0) {
      throw new MotorModelError(
        `Rated slip ${pct(sRated, 2)} alone needs more rotor loss than the ${pct(eta)} efficiency allows: check rated rpm and efficiency.`,
      );
    }
    const k = room / (coreW + rotationalW);
    coreW *= k;
    rotationalW *= k;
  }
  assumptions.push(
    `Loss split at full load (rule of thumb): total losses ${losses.toFixed(0)} W; core ${coreW.toFixed(0)} W and friction, ` +
      `windage and stray load ${rotationalW.toFixed(0)} W (${pct(coreW / losses, 0)} and ${pct(rotationalW / losses, 0)}); ` +
      `rotor copper ${rotorCuW.toFixed(0)} W from the rated slip (s·P_ag); stator copper the remaining ${statorCuW.toFixed(0)} W.`,
  );
  assumptions.push("Friction, windage and stray load loss held constant at every speed; core loss modelled by Rc in parallel with Xm.");
  const r1 = statorCuW / (3 * iPhase * iPhase);
  assumptions.push(`R1 = stator copper loss / (3·I²) = ${r1.toFixed(4)} Ω per phase.`);

  const share = STATOR_LEAKAGE_SHARE[design];
  const breakdownRatio = BREAKDOWN_TORQUE_RATIO[design];
  const fullLoadTorque = pOut / ((2 * Math.PI * np.ratedRpm) / 60);
  assumptions.push(`X1 : X2 = ${share} : ${(1 - share).toFixed(1)} (design ${design} split of the standard test method).`);
  assumptions.push(
    `Breakdown torque assumed ${breakdownRatio} × full-load torque (mid-range for design ${design} in the NEMA design table); it sets X1 + X2.`,
  );

  // Starting guesses, then Gauss–Seidel passes of one-dimensional solves.
  let xLeak = zBase / 6;
  const sinPhi = Math.sqrt(1 - pf * pf);
  let xm = zBase / Math.max(0.1, sinPhi - iPhase * xLeak / vPhase);
  let rc = (3 * vPhase * vPhase) / Math.max(coreW, 1e-6);
  let r2 = sRated * zBase;
  const build = (p: Partial<CircuitParams>): MotorModelInput => ({
    lineVoltage: np.ratedVoltage,
    frequencyHz: f,
    poles: np.poles,
    connection,
    params: { r1, x1: share * xLeak, r2, x2: (1 - share) * xLeak, xm, rc: coreW > 0 ? rc : null, ...p },
    rotationalLossW: rotationalW,
  });
  const split = (x: number) => ({ x1: share * x, x2: (1 - share) * x });
  const logSolve = (g: (x: number) => number, lo: number, hi: number) => Math.exp(bisect((u) => g(Math.exp(u)), Math.log(lo), Math.log(hi)));

  let currentMatched = true;
  for (let pass = 0; pass < 200; pass++) {
    const before = [r2, xm, xLeak, rc];

    // R2 so that output at rated slip equals rated output, on the stable (low-slip) side of the torque peak.
    const th = thevenin(build({})).exact;
    const r2Peak = sRated * Math.hypot(th.rth, th.xth + (1 - share) * xLeak);
    const outErr = (x: number) => evaluateAtSlip(build({ r2: x }), sRated).outputPowerW - pOut;
    if (outErr(r2Peak) < 0) {
      throw new MotorModelError(
        `No rotor resistance gives ${np.ratedKw} kW at ${np.ratedRpm} rpm with these assumptions: check rated kW, voltage, current and rpm.`,
      );
    }
    let hi = r2Peak * 2;
    while (outErr(hi) > 0 && hi < r2Peak * 1e6) hi *= 2;
    r2 = logSolve(outErr, r2Peak, hi);

    // Xm so that the model draws rated current at rated slip (more Xm, less magnetising current).
    const curErr = (x: number) => evaluateAtSlip(build({ xm: x }), sRated).statorCurrentA - np.ratedCurrent;
    const xmLo = 0.05 * zBase;
    const xmHi = 1e3 * zBase;
    if (curErr(xmHi) > 0) {
      xm = xmHi;
      currentMatched = false;
    } else if (curErr(xmLo) < 0) {
      xm = xmLo;
      currentMatched = false;
    } else {
      xm = logSolve(curErr, xmLo, xmHi);
      currentMatched = true;
    }

    // Rc so the core loss at the rated point is the assumed share.
    if (coreW > 0) {
      const modelCore = evaluateAtSlip(build({}), sRated).coreLossW;
      rc *= modelCore / coreW;
    }

    // X1 + X2 so that the breakdown torque is the assumed multiple of full-load torque. The exact Thevenin
    // closed form is exact for this circuit, and τ_max falls steadily as leakage reactance grows.
    const bdErr = (x: number) => thevenin(build(split(x))).exact.tauMax - breakdownRatio * fullLoadTorque;
    const xLo = 1e-4 * zBase;
    const xHi = 2 * zBase;
    if (bdErr(xLo) > 0 && bdErr(xHi) < 0) xLeak = logSolve(bdErr, xLo, xHi);

    const moved = [r2, xm, xLeak, rc].reduce((m, v, i) => Math.max(m, Math.abs(v - before[i]) / Math.abs(before[i])), 0);
    if (moved < 1e-11) break;
  }

  const input = build({});
  const ratedPoint = evaluateAtSlip(input, sRated);
  const outErrPct = (100 * (ratedPoint.outputPowerW - pOut)) / pOut;
  assumptions.push(
    `Refined numerically: R2 solved so the model gives ${np.ratedKw} kW at the rated slip ${sRated.toFixed(4)} ` +
      `(${ratedPoint.outputPowerW.toFixed(0)} W, ${outErrPct >= 0 ? "+" : ""}${outErrPct.toFixed(3)} %), Xm so it draws the rated ` +
      `${np.ratedCurrent} A (model ${ratedPoint.statorCurrentA.toFixed(1)} A), Rc for the assumed core loss and X1 + X2 for the assumed breakdown torque.`,
  );
  if (!currentMatched) {
    assumptions.push("The rated current could not be matched within plausible magnetising reactance: the nameplate figures may disagree.");
  }
  assumptions.push(
    "Single-cage circuit with constant R2 (from the rated point): near standstill, deep-bar and double-cage rotors gain rotor " +
      "resistance and lose leakage reactance, so their real starting torque and current are usually higher than shown; the running region is the reliable part.",
  );

  const est = "nameplate-estimate" as const;
  return {
    input,
    sources: { r1: est, x1: est, r2: est, x2: est, xm: est, rc: est, rotationalLossW: est },
    assumptions,
    ratedPoint,
  };
}
