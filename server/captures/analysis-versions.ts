// Every stored analysis of a capture (the versions a re-analysis keeps, server/captures/result.ts) and one
// version's full result, for GET /captures/:id/analyses and GET /captures/:id/analyses/:analysisId.
import type { Knex } from "knex";

const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

/** One analysis version with what it was computed from and its readings (the analyses row's columns). */
export function analysisVersionOut(r: Record<string, any>) {
  return {
    id: r.id,
    version: r.version,
    isCurrent: r.is_current,
    engineVersion: r.engine_version,
    nameplateVersion: r.nameplate_version,
    /** As the worker stored it: `{ nameplate, nameplateVersion, engineVersion }`. */
    params: r.params ?? {},
    createdAt: r.created_at,
    supplyHz: num(r.supply_hz),
    slip: num(r.slip),
    rpm: num(r.rpm),
    loadPct: num(r.load_pct),
    sidebandDb: num(r.sideband_db),
    rotorGrade: r.rotor_grade,
    rotorAssessable: r.rotor_assessable,
    /** Why the rotor was not assessable (from the stored result), null when it was. */
    rotorReason: r.rotor_assessable ? null : (r.rotor_reason ?? null),
    vibrationRms: num(r.vibration_rms),
    vibrationZone: r.vibration_zone,
  };
}

/** True when the capture exists. */
export async function captureExists(db: Knex, captureId: number) {
  return !!(await db("captures").where({ id: captureId }).first("id"));
}

/** Every analysis of a capture, newest version first (without the full results). */
export async function listAnalysisVersions(db: Knex, captureId: number) {
  const rows = await db("analyses")
    .where({ capture_id: captureId })
    .orderBy("version", "desc")
    .select(
      "id", "version", "is_current", "engine_version", "nameplate_version", "params", "created_at",
      "supply_hz", "slip", "rpm", "load_pct", "sideband_db", "rotor_grade", "rotor_assessable", "vibration_rms", "vibration_zone",
      db.raw("result->'brokenBar'->>'reason' as rotor_reason"),
    );
  return rows.map(analysisVersionOut);
}

/**
 * One stored analysis of the capture in the shape of the capture detail's `analysis` (the engine's result merged
 * with the row's id and versions, as loadCapture in capture-service.ts), plus `isCurrent`; null when the analysis
 * is not this capture's.
 */
export async function loadAnalysisVersion(db: Knex, captureId: number, analysisId: number) {
  const row = await db("analyses").where({ id: analysisId, capture_id: captureId }).first();
  if (!row) return null;
  return {
    ...row.result,
    id: row.id,
    version: row.version,
    engineVersion: row.engine_version,
    nameplateVersion: row.nameplate_version,
    analysedAt: row.created_at,
    isCurrent: row.is_current,
  };
}
