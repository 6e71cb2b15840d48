// Torque-speed and performance curves of the exact circuit, and the points a motor's page shows:
// starting (locked-rotor), pull-up and breakdown.

import { evaluateAtSlip, torqueAtSlip } from "./circuit.ts";
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
   * so this equals the starting torque; real motors can dip lower from space harmonics the circuit omits.
   */
  pullUp: TorquePoint;
  /** Maximum torque found numerically on 0 < s ≤ 1 of the exact circuit (at s = 1 when s_max > 1). */
  breakdown: TorquePoint & { beyondStandstill: boolean };
  /** Closed-form cross-check. */
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
  const grid = Array.from({ length: 101 }, (_, i) => sBreak + ((1 - sBreak) * i) / 100);
  const sPullUp = sBreak >= 1 ? 1 : gridThenGoldenMax((s) => -torqueAtSlip(input, s), grid);
  const th = thevenin(input);
  return {
    start,
    pullUp: pointAt(input, sPullUp),
    breakdown: { ...pointAt(input, sBreak), beyondStandstill: th.exact.sMax > 1 },
    thevenin: th,
  };
}
