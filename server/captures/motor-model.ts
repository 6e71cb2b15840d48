// A motor's equivalent circuit (measured constants when stored on the asset, else estimated from the
// nameplate), its curves and key points, and its analysed operating points placed on the curves.
import type { Knex } from "knex";
import { HttpError } from "../errors.ts";
import {
  curves,
  estimateFromNameplate,
  evaluateAtSlip,
  keyPoints,
  MotorModelError,
  type MotorModelInput,
} from "../../src/engine/motor-model/index.ts";

// An estimate depends only on the nameplate: keep the last few per motor and nameplate version.
const estimates = new Map<string, ReturnType<typeof estimateFromNameplate>>();
function cachedEstimate(asset: Record<string, any>, np: Parameters<typeof estimateFromNameplate>[0]) {
  const key = `${asset.id}:${asset.nameplate_version}:${JSON.stringify(np)}`;
  let est = estimates.get(key);
  if (!est) {
    est = estimateFromNameplate(np);
    if (estimates.size >= 200) estimates.delete(estimates.keys().next().value!);
    estimates.set(key, est);
  }
  return est;
}

export async function motorModelOf(db: Knex, asset: Record<string, any>) {
  let input: MotorModelInput;
  let sources: unknown = null;
  let assumptions: string[] = [];
  try {
    const stored = asset.motor_model as { input?: MotorModelInput; sources?: unknown } | null;
    if (stored?.input) {
      input = stored.input;
      sources = stored.sources ?? "entered";
    } else {
      if (!asset.rated_kw || !asset.rated_voltage || !asset.rated_current)
        throw new HttpError(422, "The motor model needs rated kW, voltage and current on the nameplate; add them to the motor first.", undefined, "nameplate-incomplete");
      const est = cachedEstimate(asset, {
        poles: asset.poles,
        ratedRpm: asset.rated_rpm,
        ratedHz: asset.rated_hz ?? undefined,
        ratedKw: asset.rated_kw,
        ratedVoltage: asset.rated_voltage,
        ratedCurrent: asset.rated_current,
        efficiency: asset.efficiency_pct ?? undefined,
        powerFactor: asset.power_factor ?? undefined,
        designLetter: asset.design_letter ?? undefined,
        connection: asset.connection ?? undefined,
      });
      input = est.input;
      sources = est.sources;
      assumptions = est.assumptions;
    }
    const rows = await db("analyses").where({ asset_id: asset.id, is_current: true }).whereNotNull("slip").orderBy("taken_at").limit(500).select("taken_at", "slip");
    const operatingPoints = rows
      .filter((r) => r.slip > 0 && r.slip < 1)
      .map((r) => {
        const p = evaluateAtSlip(input, r.slip);
        return { takenAt: r.taken_at, slip: r.slip, rpm: p.rpm, torqueNm: p.loadTorqueNm, currentA: p.statorCurrentA };
      });
    return { input, sources, assumptions, curves: curves(input, { points: 200 }), keyPoints: keyPoints(input), operatingPoints };
  } catch (err) {
    if (err instanceof MotorModelError) throw new HttpError(422, err.message, undefined, "motor-model");
    throw err;
  }
}
