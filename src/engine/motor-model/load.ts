// Model-based load at a measured slip, and plausibility checks of an operating point against the model.

import { evaluateAtSlip } from "./circuit.ts";
import { breakdownSlip } from "./curves.ts";
import type { ModelFlag, MotorModelInput } from "./types.ts";

export interface ModelLoad {
  outputPowerW: number;
  /** Shaft output as a share of rated output, %. */
  loadPct: number;
  /** Shaft (load) torque, N·m; null at standstill. */
  torqueNm: number | null;
  efficiency: number;
}

/** Load from the equivalent circuit at the given slip (e.g. a slip read from the current spectrum). */
export function loadFromSlip(input: MotorModelInput, slip: number, ratedOutputW: number): ModelLoad {
  const p = evaluateAtSlip(input, slip);
  return {
    outputPowerW: p.outputPowerW,
    loadPct: ratedOutputW > 0 ? (100 * p.outputPowerW) / ratedOutputW : NaN,
    torqueNm: p.loadTorqueNm,
    efficiency: p.efficiency,
  };
}

/**
 * Relative difference between measured and modelled line current above which an operating point is flagged: ±25 %.
 * A screening margin, common practice (no standard sets one): wide enough that the nameplate estimate's typical
 * assumptions (magnetising current, loss split) and an ordinary deviation of the supply voltage from rated during
 * the capture do not raise it on a sound motor, narrow enough that the usual data errors do: a wrong rated current
 * or voltage, star and delta mixed up (a factor √3 or 3), a CT ratio left out (a factor of the ratio).
 */
export const CURRENT_MISMATCH_LIMIT = 0.25;

const NAMEPLATE_HINT = "This often means wrong nameplate data (rated speed, poles, voltage, current or frequency) behind the model.";
const MEASURED_HINT = "Check the measured circuit values, the CT ratio and the nameplate voltage and poles the model runs at.";

export interface CheckOptions {
  /** The model's breakdown slip, when the caller already has it (it depends only on the circuit). */
  breakdownSlip?: number;
  /** Where the circuit came from: sets the hint at the end of each message. Default "nameplate-estimate". */
  source?: "nameplate-estimate" | "measured";
}

export function checkOperatingPoint(input: MotorModelInput, slip: number, measuredCurrentA?: number | null, options: CheckOptions = {}): ModelFlag[] {
  const hint = options.source === "measured" ? MEASURED_HINT : NAMEPLATE_HINT;
  const flags: ModelFlag[] = [];
  if (!(slip > 0 && slip < 1)) {
    flags.push({
      code: "slip-out-of-range",
      severity: "warning",
      message: `Slip ${slip.toFixed(4)} is outside normal motoring (0 < s < 1). ${hint}`,
    });
    return flags;
  }
  const sBreak = options.breakdownSlip ?? breakdownSlip(input);
  if (slip > sBreak) {
    flags.push({
      code: "beyond-breakdown",
      severity: "warning",
      message:
        `Slip ${slip.toFixed(4)} is beyond the model's breakdown slip ${sBreak.toFixed(4)}: ` +
        `a motor cannot run steadily there. ${hint}`,
    });
  }
  if (measuredCurrentA !== undefined && measuredCurrentA !== null && Number.isFinite(measuredCurrentA)) {
    const modelA = evaluateAtSlip(input, slip).statorCurrentA;
    const rel = (measuredCurrentA - modelA) / modelA;
    if (Math.abs(rel) > CURRENT_MISMATCH_LIMIT) {
      flags.push({
        code: "current-mismatch",
        severity: "warning",
        message:
          `Measured current ${measuredCurrentA.toFixed(1)} A is ${rel > 0 ? "+" : ""}${(100 * rel).toFixed(0)} % from the ` +
          `model's ${modelA.toFixed(1)} A at this slip (limit ±${100 * CURRENT_MISMATCH_LIMIT} %). ${hint}`,
      });
    }
  }
  return flags;
}
