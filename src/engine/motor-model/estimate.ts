// A circuit estimated from the nameplate alone. The nameplate fixes rated output, current, slip and (given
// or assumed) efficiency; the usual assumptions below fill in the rest, then the circuit is refined
// numerically so it reproduces the rated point exactly. Every assumption is returned as a sentence for the screen.
// Cage rotors (design A–D) get a deep-bar rotor (circuit.ts, `rotorAtSlip`) whose standstill R2 and X2 are fitted
// to typical starting torque and current for the design letter; the running-point fits are not affected by it.

import type { Nameplate } from "../types.ts";
import { DEEP_BAR_XI_AT_STANDSTILL, deepBarWeights, evaluateAtSlip, torqueAtSlip } from "./circuit.ts";
import {
  BREAKDOWN_TORQUE_RATIO,
  LOCKED_ROTOR_CURRENT_RATIO,
  LOSS_SHARE,
  STATOR_LEAKAGE_SHARE,
  typicalBreakdownTorqueRatio,
  typicalEfficiency,
  typicalLockedRotorCurrentRatio,
  typicalLockedRotorTorqueRatio,
} from "./design.ts";
import { brentRoot, goldenMax } from "./search.ts";
import { syncRpm } from "./speed.ts";
import { thevenin } from "./thevenin.ts";
import {
  MotorModelError,
  type CircuitParams,
  type Connection,
  type DesignLetter,
  type MotorModelInput,
  type OperatingPoint,
  type ParamName,
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
  /** For each value, the assumption or fit behind it in one sentence (the motor page shows it beside the value). */
  basis: Partial<Record<ParamName, string>>;
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

/**
 * Torque at the running-region peak: the maximum near the closed-form s_max (between half and twice it).
 * For a single cage this is the breakdown torque; for a deep-bar rotor it is the breakdown torque whenever the
 * starting torque is lower (design A–C), and the running peak of design D, whose starting torque equals it.
 */
function runningPeakTorque(input: MotorModelInput): number {
  const sm = thevenin(input).exact.sMax;
  const hi = Math.min(1, 2 * sm);
  const lo = Math.min(sm / 2, hi / 2);
  return torqueAtSlip(input, goldenMax((s) => torqueAtSlip(input, s), lo, hi, 1e-12));
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
  const breakdownRatio = typicalBreakdownTorqueRatio(design, np.ratedKw);
  const fullLoadTorque = pOut / ((2 * Math.PI * np.ratedRpm) / 60);
  assumptions.push(`X1 : X2 = ${share} : ${(1 - share).toFixed(1)} (design ${design} split of the standard test method).`);
  assumptions.push(
    `Breakdown torque assumed ${breakdownRatio.toFixed(2)} × full-load torque (${
      breakdownRatio === BREAKDOWN_TORQUE_RATIO[design] ? "mid-range" : "towards the top of the range, as for small motors,"
    } for design ${design} in the NEMA design table); it sets X1 + X2.`,
  );

  // Deep-bar rotor for cage designs: standstill torque and current targets (typical values, from memory).
  const lrTorqueRatio = design === "wound" ? null : typicalLockedRotorTorqueRatio(design, np.ratedKw);
  const lrCurrentTarget = typicalLockedRotorCurrentRatio(design, { ratedKw: np.ratedKw, ratedVoltage: np.ratedVoltage, ratedCurrent: np.ratedCurrent, frequencyHz: f });
  const lrCurrentRatio = lrCurrentTarget?.ratio ?? null;
  const deepBar = lrTorqueRatio !== null && lrCurrentRatio !== null;

  // Starting guesses, then passes of nested one-dimensional solves (below).
  let xLeak = zBase / 6;
  const sinPhi = Math.sqrt(1 - pf * pf);
  let xm = zBase / Math.max(0.1, sinPhi - iPhase * xLeak / vPhase);
  let rc = (3 * vPhase * vPhase) / Math.max(coreW, 1e-6);
  let r2 = sRated * zBase;
  // Deep bar: standstill R2 and X2 as ratios of the running values, so they follow r2 and X1 + X2 as those are refit.
  let kR = 1;
  let kX = 1;
  type Fit = { r2: number; xm: number; xLeak: number; rc: number; kR: number; kX: number };
  const build = (p: Partial<Fit> = {}): MotorModelInput => {
    const v = { r2, xm, xLeak, rc, kR, kX, ...p };
    const x2 = (1 - share) * v.xLeak;
    const params: CircuitParams = { r1, x1: share * v.xLeak, r2: v.r2, x2, xm: v.xm, rc: coreW > 0 ? v.rc : null };
    if (deepBar) {
      params.rotorLockedR2 = v.kR * v.r2;
      params.rotorLockedX2 = v.kX * x2;
    }
    return { lineVoltage: np.ratedVoltage, frequencyHz: f, poles: np.poles, connection, params, rotationalLossW: rotationalW };
  };
  const logSolve = (g: (x: number) => number, lo: number, hi: number) => Math.exp(brentRoot((u) => g(Math.exp(u)), Math.log(lo), Math.log(hi)));

  const lrTorque = (lrTorqueRatio ?? 0) * fullLoadTorque;
  const lrCurrent = (lrCurrentRatio ?? 0) * np.ratedCurrent;
  // Standstill leakage of a deep-bar or double-cage rotor is rarely below about a quarter of its running value.
  const KX_MIN = 0.25;

  // Each target is met by a nested one-dimensional solve (an inner solve inside the function the outer one
  // brackets), never by alternating two solves: alternating R2 and Xm one after the other can circle for ever
  // on high-slip nameplates (the two are strongly coupled there) and stop with the rated output several per cent off.

  /** R2 that gives rated output at rated slip on the stable (low-slip) side of the torque peak; null when none can. */
  const solveR2 = (p: Partial<Fit>): number | null => {
    const th = thevenin(build(p)).exact;
    const r2Peak = sRated * Math.hypot(th.rth, th.xth + (1 - share) * (p.xLeak ?? xLeak));
    const outErr = (x: number) => evaluateAtSlip(build({ ...p, r2: x }), sRated).outputPowerW - pOut;
    if (outErr(r2Peak) < 0) return null;
    let hi = r2Peak * 2;
    while (outErr(hi) > 0 && hi < r2Peak * 1e6) hi *= 2;
    return logSolve(outErr, r2Peak, hi);
  };
  /**
   * R2 and Xm together: Xm so the model draws rated current at rated slip (more Xm, less magnetising current),
   * with R2 re-solved for rated output at every trial Xm. Too little Xm to reach rated output at all counts as
   * too much current (the search moves to more Xm).
   */
  const solveRatedPoint = (): { r2: number; xm: number; currentMatched: boolean } => {
    const curErr = (x: number) => {
      const r = solveR2({ xm: x });
      return r === null ? Infinity : evaluateAtSlip(build({ xm: x, r2: r }), sRated).statorCurrentA - np.ratedCurrent;
    };
    const xmLo = 0.05 * zBase;
    const xmHi = 1e3 * zBase;
    let x: number;
    let matched = true;
    if (curErr(xmHi) > 0) {
      x = xmHi;
      matched = false;
    } else if (curErr(xmLo) < 0) {
      x = xmLo;
      matched = false;
    } else x = logSolve(curErr, xmLo, xmHi);
    const r = solveR2({ xm: x });
    if (r === null) {
      throw new MotorModelError(
        `No rotor resistance gives ${np.ratedKw} kW at ${np.ratedRpm} rpm with these assumptions: check rated kW, voltage, current and rpm.`,
      );
    }
    return { r2: r, xm: x, currentMatched: matched };
  };

  /** Starting torque with standstill R2 = k·R2 for a trial standstill X2 ratio; torque rises with k up to the standstill peak. */
  const solveStartTorque = (kXTry: number): { kR: number; matched: boolean } => {
    const th = thevenin(build({})).exact; // the stator side only: independent of the rotor values
    const kRMax = Math.hypot(th.rth, th.xth + kXTry * (1 - share) * xLeak) / r2;
    const tErr = (k: number) => evaluateAtSlip(build({ kR: k, kX: kXTry }), 1).inducedTorqueNm - lrTorque;
    if (kRMax <= 1 || tErr(1) >= 0) return { kR: 1, matched: kRMax > 1 && Math.abs(tErr(1)) < 1e-6 * lrTorque };
    if (tErr(kRMax) <= 0) return { kR: kRMax, matched: false };
    return { kR: logSolve(tErr, 1, kRMax), matched: true };
  };
  /**
   * Standstill X2 for the starting current, with standstill R2 re-solved for the starting torque at every trial
   * (less reactance, more current, with the torque held). The torque has priority where both cannot be met.
   */
  const solveStart = (): { kR: number; kX: number; torqueMatched: boolean; currentMatched: boolean } => {
    const iErr = (k: number) => evaluateAtSlip(build({ kR: solveStartTorque(k).kR, kX: k }), 1).statorCurrentA - lrCurrent;
    let k: number;
    let matched = true;
    const atOne = iErr(1);
    if (atOne >= 0) {
      k = 1;
      matched = Math.abs(atOne) < 1e-6 * lrCurrent;
    } else if (iErr(KX_MIN) <= 0) {
      k = KX_MIN;
      matched = false;
    } else k = logSolve(iErr, KX_MIN, 1);
    const t = solveStartTorque(k);
    return { kR: t.kR, kX: k, torqueMatched: t.matched, currentMatched: matched };
  };

  // X1 + X2 so that the breakdown torque is the assumed multiple of full-load torque; τ_max falls steadily as
  // leakage reactance grows. Single cage: the exact Thevenin closed form is exact for this circuit. Deep bar: the
  // running peak of the full circuit, found numerically (R2(s), X2(s) differ slightly from r2, x2 there).
  const peak = (input: MotorModelInput) => (deepBar ? runningPeakTorque(input) : thevenin(input).exact.tauMax);
  const breakdownTarget = breakdownRatio * fullLoadTorque;

  // The targets interact only weakly (the breakdown hardly depends on R2, the rated point hardly on the standstill
  // values), so passes over them converge quickly.
  let currentMatched = true;
  let lrTorqueMatched = true;
  let lrCurrentMatched = true;
  let converged = false;
  for (let pass = 0; pass < 100 && !converged; pass++) {
    const before = [r2, xm, xLeak, rc, kR, kX];
    ({ r2, xm, currentMatched } = solveRatedPoint());

    // Rc so the core loss at the rated point is the assumed share.
    if (coreW > 0) rc *= evaluateAtSlip(build({}), sRated).coreLossW / coreW;

    const bdErr = (x: number) => peak(build({ xLeak: x })) - breakdownTarget;
    const xLo = 1e-4 * zBase;
    const xHi = 2 * zBase;
    if (bdErr(xLo) > 0 && bdErr(xHi) < 0) xLeak = logSolve(bdErr, xLo, xHi);

    if (deepBar) ({ kR, kX, torqueMatched: lrTorqueMatched, currentMatched: lrCurrentMatched } = solveStart());

    const moved = [r2, xm, xLeak, rc, kR, kX].reduce((m, v, i) => Math.max(m, Math.abs(v - before[i]) / Math.abs(before[i])), 0);
    converged = moved < 1e-10;
  }
  // The rated point comes first: solve it once more for the final leakage and standstill values, then check it.
  ({ r2, xm, currentMatched } = solveRatedPoint());
  const check = evaluateAtSlip(build({}), sRated);
  if (!(Math.abs(check.outputPowerW / pOut - 1) < 1e-6) || (currentMatched && !(Math.abs(check.statorCurrentA / np.ratedCurrent - 1) < 1e-6))) {
    throw new MotorModelError(
      `The estimate could not reproduce the rated point (model ${check.outputPowerW.toFixed(0)} W, ${check.statorCurrentA.toFixed(2)} A at the rated slip): ` +
        "check rated kW, voltage, current, rpm and efficiency.",
    );
  }
  const breakdownMatched = Math.abs(peak(build({})) / breakdownTarget - 1) < 1e-3;

  const input = build({});
  const ratedPoint = evaluateAtSlip(input, sRated);
  const outErrPct = (100 * (ratedPoint.outputPowerW - pOut)) / pOut;
  assumptions.push(
    `Refined numerically: R2 solved so the model gives ${np.ratedKw} kW at the rated slip ${sRated.toFixed(4)} ` +
      `(${ratedPoint.outputPowerW.toFixed(0)} W, ${outErrPct >= 0 ? "+" : ""}${outErrPct.toFixed(3)} %), Xm so it draws the rated ` +
      `${np.ratedCurrent} A (model ${ratedPoint.statorCurrentA.toFixed(1)} A), Rc for the assumed core loss and X1 + X2 for the assumed breakdown torque` +
      (deepBar ? "; then the standstill R2 and X2 of the deep-bar rotor for the assumed starting torque and current." : "."),
  );
  if (!currentMatched) {
    assumptions.push("The rated current could not be matched within plausible magnetising reactance: the nameplate figures may disagree.");
  }
  if (!breakdownMatched) {
    assumptions.push(
      `The assumed breakdown torque could not be reached with any leakage reactance: the model's is ${(peak(input) / fullLoadTorque).toFixed(2)} × full-load torque.`,
    );
  }
  if (deepBar) {
    const start = evaluateAtSlip(input, 1);
    const p = input.params;
    const startTorque = start.inducedTorqueNm / fullLoadTorque;
    const startCurrent = start.statorCurrentA / np.ratedCurrent;
    assumptions.push(
      `Starting torque assumed ${lrTorqueRatio} × full-load torque and starting current ${+(lrCurrentRatio as number).toFixed(2)} × rated current ` +
        `(typical values for design ${design}, from memory; the NEMA design table gives locked-rotor torque ` +
        `${design === "C" ? "200–250 %" : design === "D" ? "275 %" : "70–275 % by size"} and locked-rotor current 600–700 %, ` +
        `and NEMA MG 1 sets minimum torques and maximum currents by size` +
        (lrCurrentTarget?.nemaMaxA != null && lrCurrentTarget.ratio < LOCKED_ROTOR_CURRENT_RATIO[design as Exclude<DesignLetter, "wound">]
          ? `; the typical ${LOCKED_ROTOR_CURRENT_RATIO[design as Exclude<DesignLetter, "wound">]} × would exceed its ${lrCurrentTarget.nemaMaxA.toFixed(0)} A ` +
            `maximum for ${(np.ratedKw / 0.7457).toFixed(1)} hp at ${np.ratedVoltage} V (¶12.35.1), so that maximum is used`
          : "") +
        `). ` +
        `Model at standstill: ${startTorque.toFixed(2)} × torque, ${startCurrent.toFixed(2)} × current.`,
    );
    assumptions.push(
      `Deep-bar rotor (engineering approximation of deep-bar and double-cage rotors): R2 and X2 vary with rotor frequency s·f, ` +
        `R2(s) = R2₀ + (R2_LR − R2₀)·g_R(s), X2(s) = X2₀ − (X2₀ − X2_LR)·g_X(s), with g the normalised skin-effect factors of a ` +
        `rectangular bar, ξ = ${DEEP_BAR_XI_AT_STANDSTILL}·√s (0 at synchronous speed, 1 at standstill, ` +
        `${deepBarWeights(sRated).gR.toPrecision(2)} at the rated slip). ` +
        `Running R2₀ = ${p.r2.toFixed(4)} Ω, X2₀ = ${p.x2.toFixed(4)} Ω; standstill R2_LR = ${(p.rotorLockedR2 as number).toFixed(4)} Ω ` +
        `(${kR.toFixed(2)} ×), X2_LR = ${(p.rotorLockedX2 as number).toFixed(4)} Ω (${kX.toFixed(2)} ×), fitted to the starting torque and current. ` +
        "The rated point and breakdown are barely affected; the shape of the curve between standstill and breakdown (pull-up) is approximate.",
    );
    if (!lrTorqueMatched) {
      assumptions.push(
        kR === 1
          ? `Starting torque ${startTorque.toFixed(2)} ×, above the typical ${lrTorqueRatio} ×: the rated slip fixes the running rotor resistance, ` +
              "and a cage rotor's resistance only rises towards standstill, so this is the least the model can start with at this current."
          : `Starting torque ${startTorque.toFixed(2)} ×, below the typical ${lrTorqueRatio} ×: the most any rotor resistance gives at standstill with this stator.`,
      );
    }
    if (!lrCurrentMatched) {
      assumptions.push(
        kX === 1
          ? `Starting current ${startCurrent.toFixed(2)} ×, above the typical ${+(lrCurrentRatio as number).toFixed(2)} ×, already with the running rotor leakage at standstill.`
          : `Starting current ${startCurrent.toFixed(2)} ×, below the typical ${+(lrCurrentRatio as number).toFixed(2)} ×: the stator resistance and leakage (X1 from the ` +
              `assumed breakdown torque) and the rotor resistance the starting torque needs limit it, with the standstill rotor leakage already ` +
              `down to ${KX_MIN} × its running value.` +
              (design === "D" ? " Design D rotors (small high-resistance bars near the surface) are known for a low starting current." : ""),
      );
    }
  } else {
    assumptions.push(
      "Single-cage circuit with constant R2 (from the rated point), as for a wound rotor with its slip rings shorted; " +
        "starting with external rotor resistance gives more torque and less current than shown. The running region is the reliable part.",
    );
  }

  const est = "nameplate-estimate" as const;
  const split = `design ${design} split ${share} : ${(1 - share).toFixed(1)} of X1 + X2, which is set so breakdown torque is ${breakdownRatio.toFixed(2)} × full-load torque (assumed)`;
  const basis: Partial<Record<ParamName, string>> = {
    r1: `Stator copper loss ${statorCuW.toFixed(0)} W (what the full-load losses leave after core, friction and windage, and rotor copper) / (3·I²).`,
    x1: `X1: the ${split}.`,
    x2: `X2: the ${split}.`,
    r2: `Solved so the model gives the rated ${np.ratedKw} kW at the rated slip ${sRated.toFixed(4)}.`,
    xm: currentMatched
      ? `Solved so the model draws the rated ${np.ratedCurrent} A at the rated slip.`
      : `At the end of its plausible range: the rated ${np.ratedCurrent} A could not be matched.`,
    rc: `Set for an assumed core loss of ${coreW.toFixed(0)} W (${pct(coreW / losses, 0)} of the full-load losses, rule of thumb).`,
    rotationalLossW: `Friction, windage and stray load assumed ${pct(rotationalW / losses, 0)} of the ${losses.toFixed(0)} W full-load losses (rule of thumb), constant at every speed.`,
    ...(deepBar
      ? {
          rotorLockedR2: `Fitted to an assumed starting torque of ${lrTorqueRatio} × full-load torque (typical for design ${design}, from memory).`,
          rotorLockedX2: `Fitted to an assumed starting current of ${+(lrCurrentRatio as number).toFixed(2)} × rated current (typical for design ${design}, from memory).`,
        }
      : {}),
  };
  return {
    input,
    sources: {
      r1: est,
      x1: est,
      r2: est,
      x2: est,
      xm: est,
      rc: est,
      ...(deepBar ? { rotorLockedR2: est, rotorLockedX2: est } : {}),
      rotationalLossW: est,
    },
    basis,
    assumptions,
    ratedPoint,
  };
}
