// Load (% of rated) from slip and from current (U.S. DOE motor-load fact sheet methods).
import type { Nameplate } from "./types.ts";
import { currentMethodLoadPct, inferRatedHz, ratedSlip, slipMethodLoadPct } from "./formulas.ts";

export interface LoadEstimate {
  method: "slip" | "current";
  loadPct: number;
  detail: string;
}

export interface LoadResult {
  loadPct: number | null;
  loadMethod: string | null;
  estimates: LoadEstimate[];
}

export function estimateLoad(args: {
  slip: number | null;
  slipConfidence: number;
  supplyHz: number | null;
  nameplate: Nameplate;
  measuredVoltage?: number;
  /** Mean r.m.s. of the current phases (A). */
  currentRmsA: number | null;
}): LoadResult {
  const np = args.nameplate;
  const estimates: LoadEstimate[] = [];
  if (args.slip !== null && args.supplyHz) {
    const ratedHz = inferRatedHz(np.ratedRpm, np.poles, np.ratedHz);
    const sN = ratedSlip(np.ratedRpm, np.poles, np.ratedHz);
    const voltage = args.measuredVoltage && np.ratedVoltage ? { measuredVoltage: args.measuredVoltage, ratedVoltage: np.ratedVoltage } : {};
    const pct = slipMethodLoadPct({ slip: args.slip, supplyHz: args.supplyHz, ratedSlip: sN, ratedHz, ...voltage });
    const drive = Math.abs(args.supplyHz - ratedHz) > 1;
    estimates.push({
      method: "slip",
      loadPct: pct,
      detail: `${drive ? "slip speed s·f vs rated s·f" : "slip vs nameplate slip"}${voltage.measuredVoltage ? ", voltage-corrected (V/V_r)²" : ""}`,
    });
  }
  if (args.currentRmsA !== null && np.ratedCurrent) {
    const v = args.measuredVoltage && np.ratedVoltage ? [args.measuredVoltage, np.ratedVoltage] : [undefined, undefined];
    estimates.push({ method: "current", loadPct: currentMethodLoadPct(args.currentRmsA, np.ratedCurrent, v[0], v[1]), detail: "I/I_r (not proportional to load below ~50 %)" });
  }
  // The slip method is preferred when the slip is trusted: current includes the large, nearly constant
  // magnetising share and reads high at part load.
  const slipEst = estimates.find((e) => e.method === "slip");
  const curEst = estimates.find((e) => e.method === "current");
  const chosen = slipEst && (args.slipConfidence >= 0.3 || !curEst) ? slipEst : curEst ?? null;
  return { loadPct: chosen ? Math.round(chosen.loadPct * 10) / 10 : null, loadMethod: chosen ? chosen.method : null, estimates };
}
