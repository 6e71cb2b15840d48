import type { Knex } from "knex";

export const CAPTURE_SORT: Record<string, string> = {
  takenAt: "c.taken_at",
  createdAt: "c.created_at",
  status: "c.status",
  assetTag: "a.tag",
  fileName: "c.file_name",
  durationS: "c.duration_s",
  id: "c.id",
};

export function captureBase(db: Knex) {
  return db("captures as c")
    .join("assets as a", "a.id", "c.asset_id")
    .join("areas as ar", "ar.id", "a.area_id")
    .leftJoin("users as u", "u.id", "c.taken_by_user_id")
    .leftJoin("analyses as an", (j) => j.on("an.capture_id", "c.id").andOnVal("an.is_current", true));
}

export const captureSelect = (q: Knex.QueryBuilder) =>
  q.select(
    "c.*",
    "a.tag as asset_tag",
    "a.name as asset_name",
    "ar.site_id as site_id",
    "u.name as taken_by_name",
    "an.id as current_analysis_id",
    "an.rotor_grade as an_rotor_grade",
    "an.rotor_assessable as an_rotor_assessable",
    "an.sideband_db as an_sideband_db",
    "an.load_pct as an_load_pct",
    "an.vibration_zone as an_vibration_zone",
  );

export function captureOut(r: Record<string, any>) {
  return {
    id: r.id,
    assetId: r.asset_id,
    assetTag: r.asset_tag,
    assetName: r.asset_name,
    siteId: r.site_id,
    measurementPointId: r.measurement_point_id,
    takenAt: r.taken_at,
    takenBy: r.taken_by_user_id ? { id: r.taken_by_user_id, name: r.taken_by_name } : null,
    gatewayId: r.gateway_id,
    source: r.source,
    fileName: r.file_name,
    format: r.format,
    sampleRate: r.sample_rate,
    durationS: r.duration_s,
    byteSize: r.byte_size === null || r.byte_size === undefined ? null : Number(r.byte_size),
    channels: r.channels ?? [],
    status: r.status,
    error: r.error,
    notes: r.notes,
    attempts: r.attempts,
    createdAt: r.created_at,
    queuedAt: r.queued_at,
    analysedAt: r.analysed_at,
    // The current analysis's headline readings, for lists (the full result is only on GET /captures/:id).
    readings: r.current_analysis_id
      ? { rotorGrade: r.an_rotor_grade, rotorAssessable: r.an_rotor_assessable, sidebandDb: r.an_sideband_db, loadPct: r.an_load_pct, vibrationZone: r.an_vibration_zone }
      : null,
  };
}

/** One capture with its current analysis (the engine's result merged with the row's id and versions). */
export async function loadCapture(db: Knex, id: number) {
  const row = await captureSelect(captureBase(db).where("c.id", id)).first();
  if (!row) return null;
  const versions = await db("analyses").where({ capture_id: id }).orderBy("version").select("id", "version", "is_current", "engine_version", "nameplate_version", "created_at");
  const current = await db("analyses").where({ capture_id: id, is_current: true }).first();
  return {
    ...captureOut(row),
    analysis: current
      ? { ...current.result, id: current.id, version: current.version, engineVersion: current.engine_version, nameplateVersion: current.nameplate_version, analysedAt: current.created_at }
      : null,
    analyses: versions.map((v) => ({ id: v.id, version: v.version, isCurrent: v.is_current, engineVersion: v.engine_version, nameplateVersion: v.nameplate_version, createdAt: v.created_at })),
  };
}
