// Torque-speed and performance curves of the exact circuit, and the points a motor's page shows:
// starting (locked-rotor), pull-up and breakdown. A deep-bar rotor (standstill R2/X2 given) is evaluated with
// its slip-dependent R2(s), X2(s) at every sample, so the curves show its higher starting torque and current.

import { evaluateAtSlip, hasDeepBarRotor, torqueAtSlip } from "./circuit.ts";
import { gridThenGoldenMax, logGrid } from "./search.ts";
import { thevenin, type TheveninResult } from "./thevenin.ts";
import type { MotorModelInput } from "./types.ts";

export interface CurveOptions {
  /** Number of samples from standstill to synchronous speed, ≥ 2. Default 200. */
  points?: number;
}

/** Columnar arrays ordered from standstill (s = 1, rpm 0) to synchronous speed (s = 0): rpm ascends, ready to plot. */
export interface MotorCurves {
  slip: number[];
  rpm: number[];
  torqueNm: number[];
  /** Line current, A. */
  currentA: number[];
  powerFactor: number[];
  inputPowerW: number[];
  outputPowerW: number[];
  efficiency: number[];
}

export function curves(input: MotorModelInput, options: CurveOptions = {}): MotorCurves {
  const n = Math.max(2, Math.round(options.points ?? 200));
  const out: MotorCurves = { slip: [], rpm: [], torqueNm: [], currentA: [], powerFactor: [], inputPowerW: [], outputPowerW: [], efficiency: [] };
  for (let i = 0; i < n; i++) {
    // Even steps in speed (= in slip), the usual axis of a torque-speed plot; the last sample is exactly s = 0.
    const slip = 1 - i / (n - 1);
    const p = evaluateAtSlip(input, slip);
    out.slip.push(slip);
    out.rpm.push(p.rpm);
    out.torqueNm.push(p.inducedTorqueNm);
    out.currentA.push(p.statorCurrentA);
    out.powerFactor.push(p.powerFactor);
    out.inputPowerW.push(p.inputPowerW);
    out.outputPowerW.push(p.outputPowerW);
    out.efficiency.push(p.efficiency);
  }
  return out;
}

export interface TorquePoint {
  slip: number;
  rpm: number;
  torqueNm: number;
  /** Line current at this point, A. */
  currentA: number;
}

export interface KeyPoints {
  /** Locked rotor, s = 1. */
  start: TorquePoint;
  /**
   * Minimum torque between standstill and breakdown. A single-cage circuit has a monotonic curve there,
   * so this equals the starting torque. A deep-bar rotor's torque can dip below its starting torque on the
   * way up (its rotor resistance falls with speed), and then this is that minimum; real motors can dip lower
   * still from space harmonics the circuit omits.
   */
  pullUp: TorquePoint;
  /**
   * Maximum torque found numerically on 0 < s ≤ 1 of the exact circuit (at s = 1 when the curve still rises
   * there: s_max > 1 for a single cage, or a deep-bar rotor whose starting torque is its largest).
   */
  breakdown: TorquePoint & { beyondStandstill: boolean };
  /** Closed-form cross-check (running-point rotor values for s_max and τ_max; see thevenin.ts). */
  thevenin: TheveninResult;
}

function pointAt(input: MotorModelInput, slip: number): TorquePoint {
  const p = evaluateAtSlip(input, slip);
  return { slip, rpm: p.rpm, torqueNm: p.inducedTorqueNm, currentA: p.statorCurrentA };
}

/** Slip of maximum induced torque on (0, 1] by numeric maximisation of the exact circuit. */
export function breakdownSlip(input: MotorModelInput): number {
  return gridThenGoldenMax((s) => torqueAtSlip(input, s), logGrid(1e-5, 1, 241));
}

export function keyPoints(input: MotorModelInput): KeyPoints {
  const sBreak = breakdownSlip(input);
  const start = pointAt(input, 1);
  // Pull-up: minimise torque on [s_break, 1] (maximise its negative).
  // The last sample is exactly standstill (rounding must not step past s = 1).
  const grid = Array.from({ length: 101 }, (_, i) => (i === 100 ? 1 : sBreak + ((1 - sBreak) * i) / 100));
  const sPullUp = sBreak >= 1 ? 1 : Math.min(1, gridThenGoldenMax((s) => -torqueAtSlip(input, s), grid));
  const th = thevenin(input);
  return {
    start,
    pullUp: pointAt(input, sPullUp),
    breakdown: {
      ...pointAt(input, sBreak),
      // Single cage: the closed form says it exactly. Deep bar: the numeric maximum sits at standstill.
      beyondStandstill: hasDeepBarRotor(input.params) ? sBreak >= 1 - 1e-9 : th.exact.sMax > 1,
    },
    thevenin: th,
  };
}
