import type { Knex } from "knex";
import type { BlobStore } from "../blob/store.ts";
import type { AnalysisJobData } from "../queue.ts";
import type { AnalysisTaskOutput } from "./engine-io.ts";
import { nameplateOf } from "./engine-io.ts";
import { writeAnalysisResult } from "./result.ts";
import { notifyQuietly } from "./publish.ts";
import { spectrumBlobKey } from "./spectrum-store.ts";
import { analysisMotorModelOf, ctRatioOf, motorModelParams } from "./motor-model.ts";
import type { AnalysisTaskInput } from "../../workers/analysis-task.ts";

export interface JobDeps {
  db: Knex;
  blob: BlobStore;
  /** Runs the CPU work (a piscina thread in the worker; in-process in unit tests). */
  runTask(input: AnalysisTaskInput): Promise<AnalysisTaskOutput>;
  /** Test hook: wait this long after marking the capture analysing (set only when NODE_ENV=test). */
  delayMs?: number;
}

export interface JobAttempt {
  retryCount: number;
  retryLimit: number;
}

/** A failure no retry can fix: the file itself cannot be read as a capture. */
export class PermanentJobError extends Error {}

export type JobOutcome = "analysed" | "already-analysed" | "stale" | "gone" | "failed";

/**
 * The analysis job body: read the blob, parse, analyse with the motor's nameplate, write the result once.
 * Throws for a failure that a retry may fix (pg-boss retries with backoff); marks the capture failed, with the
 * reason, when the failure is permanent or the last retry failed.
 */
export async function runAnalysisJob(deps: JobDeps, job: AnalysisJobData, attempt: JobAttempt): Promise<JobOutcome> {
  const { db } = deps;
  const cap = await db("captures").where({ id: job.captureId }).first();
  if (!cap) return "gone";
  const done = await db("analyses").where({ capture_id: cap.id, version: job.version }).first("id");
  if (done) {
    // The previous run committed but died before completing the job: make sure the status says so.
    await db("captures").where({ id: cap.id }).whereNot({ status: "analysed" }).andWhere("analysis_version", job.version).update({ status: "analysed", error: null });
    return "already-analysed";
  }
  if (cap.analysis_version > job.version) return "stale";

  await db("captures")
    .where({ id: cap.id })
    .whereNotExists(db("analyses").where({ capture_id: cap.id, version: job.version }).select(db.raw("1")))
    .update({ status: "analysing", attempts: db.raw("attempts + 1"), updated_at: db.fn.now() });
  await notifyQuietly(db, "capture:status", { id: cap.id, assetId: cap.asset_id, status: "analysing" });
  try {
    if (deps.delayMs) await new Promise((r) => setTimeout(r, deps.delayMs));
    const asset = await db("assets").where({ id: cap.asset_id }).first();
    if (!asset) throw new PermanentJobError("The motor of this capture no longer exists.");
    let bytes: Buffer;
    try {
      bytes = await deps.blob.get(cap.blob_key);
    } catch (err) {
      if ((err as { code?: string }).code === "ENOENT" || (err as { name?: string }).name === "NoSuchKey")
        throw new PermanentJobError("The capture file is missing from storage.");
      throw err;
    }
    const nameplate = nameplateOf(asset);
    // The motor's model (saved measured circuit, else the nameplate estimate), with the CT ratio of the capture's point.
    const point = cap.measurement_point_id ? await db("measurement_points").where({ id: cap.measurement_point_id }).first("kind", "ct_ratio") : null;
    const motorModel = analysisMotorModelOf(asset, ctRatioOf(point));
    const out = await deps.runTask({ bytes: new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), fileName: cap.file_name ?? "capture", sampleRate: cap.sample_rate ?? undefined, nameplate, motorModel });
    // A parse error is the file's fault: retrying will not help.
    if (out.parseError) throw new PermanentJobError(out.parseError.message);
    // Before the result, so a capture shown analysed already has its stored spectra. Not fatal: the viewer recomputes.
    for (const s of out.spectra ?? []) {
      await deps.blob.put(spectrumBlobKey(cap.blob_key, s.channel), s.bytes).catch((err) => console.error(`[worker] capture ${cap.id}: could not store the ${s.channel} spectrum:`, (err as Error).message));
    }
    const w = await writeAnalysisResult(db, {
      captureId: cap.id,
      version: job.version,
      engineVersion: out.engineVersion,
      nameplateVersion: asset.nameplate_version,
      params: { nameplate, nameplateVersion: asset.nameplate_version, engineVersion: out.engineVersion, motorModel: motorModelParams(asset, motorModel) },
      result: out.result,
      meta: out.meta,
    });
    if (!w.written) return w.analysisId ? "already-analysed" : "stale";
    await notifyQuietly(db, "capture:status", { id: cap.id, assetId: cap.asset_id, status: "analysed" });
    for (const f of w.findings) await notifyQuietly(db, "finding:new", { id: f.id, assetId: cap.asset_id, kind: f.kind, level: f.level });
    return "analysed";
  } catch (err) {
    const permanent = err instanceof PermanentJobError;
    const last = attempt.retryCount >= attempt.retryLimit;
    const reason = (err as Error).message || String(err);
    if (permanent || last) {
      await markFailed(db, cap.id, job.version, reason);
      await notifyQuietly(db, "capture:status", { id: cap.id, assetId: cap.asset_id, status: "failed", error: reason });
      return "failed";
    }
    // Back to queued while pg-boss waits out the retry delay; the reason stays visible.
    await db("captures").where({ id: cap.id, analysis_version: job.version }).update({ status: "queued", error: `Attempt ${attempt.retryCount + 1} failed, retrying: ${reason}`, updated_at: db.fn.now() });
    await notifyQuietly(db, "capture:status", { id: cap.id, assetId: cap.asset_id, status: "queued" });
    throw err;
  }
}

async function markFailed(db: Knex, captureId: number, version: number, reason: string) {
  // Only the newest requested version may mark the capture failed; an analysed capture stays analysed.
  await db("captures")
    .where({ id: captureId, analysis_version: version })
    .whereNot({ status: "analysed" })
    .update({ status: "failed", error: reason.slice(0, 2000), updated_at: db.fn.now() });
}
