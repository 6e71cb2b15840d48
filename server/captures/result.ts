import type { Knex } from "knex";
import type { AnalysisResult } from "../../src/engine/types.ts";
import type { CaptureMeta } from "./ingest.ts";
import { decideFindings, type Levels } from "./findings.ts";

export interface ResultToWrite {
  captureId: number;
  version: number;
  engineVersion: string;
  nameplateVersion: number;
  params: Record<string, unknown>;
  result: AnalysisResult;
  meta: CaptureMeta;
}

export interface WriteOutcome {
  /** False when this version was already written (a retried or duplicate job): nothing changed. */
  written: boolean;
  analysisId: number | null;
  assetId: number;
  findings: { id: number; kind: string; level: string }[];
}

const num = (v: unknown) => (typeof v === "number" && Number.isFinite(v) ? v : null);

/** The analyses row's reading columns from the engine's result. */
export function readingsOf(r: AnalysisResult) {
  return {
    supply_hz: num(r.supplyHz),
    slip: num(r.slip),
    rpm: num(r.rpm),
    load_pct: num(r.loadPct),
    sideband_db: num(r.brokenBar?.depthDb),
    rotor_grade: r.brokenBar?.assessable ? (r.brokenBar.grade ?? null) : null,
    rotor_assessable: !!r.brokenBar?.assessable,
    vibration_rms: num(r.vibration?.velocityRmsMmS),
    vibration_zone: r.vibration?.zone ?? null,
  };
}

/**
 * Write one analysis result exactly once. In one transaction: lock the capture row (`select … for update`, so two
 * runs of the same job serialise here), return early if this (capture, version) exists, otherwise move
 * `is_current`, insert the row, mark the capture analysed and raise findings. A killed worker never commits half.
 */
export async function writeAnalysisResult(db: Knex, w: ResultToWrite): Promise<WriteOutcome> {
  return db.transaction(async (trx) => {
    const cap = await trx("captures").where({ id: w.captureId }).forUpdate().first();
    if (!cap) return { written: false, analysisId: null, assetId: 0, findings: [] };
    const existing = await trx("analyses").where({ capture_id: w.captureId, version: w.version }).first("id");
    if (existing) {
      // A concurrent duplicate run may have set "analysing" after the first run committed: put it back.
      if (cap.status !== "analysed" && cap.analysis_version === w.version)
        await trx("captures").where({ id: w.captureId }).update({ status: "analysed", error: null, updated_at: trx.fn.now() });
      return { written: false, analysisId: existing.id, assetId: cap.asset_id, findings: [] };
    }
    // A newer version was asked for (re-analysis queued meanwhile) or written: this result is stale.
    const newer = await trx("analyses").where({ capture_id: w.captureId }).andWhere("version", ">", w.version).first("id");
    if (newer || cap.analysis_version > w.version) return { written: false, analysisId: null, assetId: cap.asset_id, findings: [] };

    const readings = readingsOf(w.result);
    await trx("analyses").where({ capture_id: w.captureId, is_current: true }).update({ is_current: false });
    const [row] = await trx("analyses")
      .insert({
        capture_id: w.captureId,
        asset_id: cap.asset_id,
        version: w.version,
        is_current: true,
        engine_version: String(w.engineVersion).slice(0, 20),
        nameplate_version: w.nameplateVersion,
        params: JSON.stringify(w.params),
        result: JSON.stringify(w.result),
        taken_at: cap.taken_at,
        ...readings,
      })
      .onConflict(["capture_id", "version"])
      .ignore()
      .returning("id");
    if (!row) return { written: false, analysisId: null, assetId: cap.asset_id, findings: [] };

    await trx("captures")
      .where({ id: w.captureId })
      .update({
        status: "analysed",
        error: null,
        analysed_at: trx.fn.now(),
        updated_at: trx.fn.now(),
        sample_rate: cap.sample_rate ?? w.meta.sampleRate ?? null,
        duration_s: cap.duration_s ?? w.meta.durationS ?? null,
        channel_count: cap.channel_count ?? w.meta.channels?.length ?? null,
        channels: cap.channels ? JSON.stringify(cap.channels) : w.meta.channels ? JSON.stringify(w.meta.channels) : null,
      });

    const findings = await raiseFindings(trx, { assetId: cap.asset_id, captureId: w.captureId, analysisId: row.id, takenAt: cap.taken_at, readings });
    return { written: true, analysisId: row.id, assetId: cap.asset_id, findings };
  });
}

async function raiseFindings(
  trx: Knex.Transaction,
  a: { assetId: number; captureId: number; analysisId: number; takenAt: Date; readings: ReturnType<typeof readingsOf> },
) {
  // "Previous" = the motor's most recent current analysis of another capture taken before this one.
  const earlier = () =>
    trx("analyses")
      .where({ asset_id: a.assetId, is_current: true })
      .whereNot({ capture_id: a.captureId })
      .andWhere((q) => q.where("taken_at", "<", a.takenAt).orWhere((q2) => q2.where("taken_at", "=", a.takenAt).andWhere("capture_id", "<", a.captureId)))
      .orderBy([{ column: "taken_at", order: "desc" }, { column: "capture_id", order: "desc" }]);
  const prevRotor = await earlier().whereNotNull("rotor_grade").first("rotor_grade", "taken_at");
  const prevZone = await earlier().whereNotNull("vibration_zone").first("vibration_zone", "taken_at");
  const current: Levels = {
    rotorGrade: a.readings.rotor_grade,
    sidebandDb: a.readings.sideband_db,
    loadPct: a.readings.load_pct,
    vibrationZone: a.readings.vibration_zone,
    vibrationRms: a.readings.vibration_rms,
  };
  const drafts = decideFindings(
    current,
    prevRotor ? { rotorGrade: prevRotor.rotor_grade, vibrationZone: null, takenAt: prevRotor.taken_at } : null,
    prevZone ? { rotorGrade: null, vibrationZone: prevZone.vibration_zone, takenAt: prevZone.taken_at } : null,
  );
  const out: { id: number; kind: string; level: string }[] = [];
  for (const d of drafts) {
    // Re-analysing a capture must not raise the same finding twice.
    const same = await trx("findings").where({ capture_id: a.captureId, kind: d.kind, level: d.level }).first("id");
    if (same) continue;
    const [f] = await trx("findings")
      .insert({ asset_id: a.assetId, analysis_id: a.analysisId, capture_id: a.captureId, kind: d.kind, level: d.level, previous_level: d.previousLevel, summary: d.summary, status: "open" })
      .returning("id");
    out.push({ id: f.id, kind: d.kind, level: d.level });
  }
  return out;
}
