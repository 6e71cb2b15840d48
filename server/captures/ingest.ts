import crypto from "node:crypto";
import type { Readable } from "node:stream";
import type { AppContext } from "../context.ts";
import { blobStoreOf, type BlobSource } from "../blob/index.ts";
import { queueOf } from "../queue.ts";
import { publishEvent } from "./publish.ts";
import { HttpError, missingParent } from "../errors.ts";

export interface ChannelInfo {
  name: string;
  kind: string;
  unit: string;
  position?: string | null;
}

/** What the caller already knows about the recording (from parsing it); the worker fills in what is missing. */
export interface CaptureMeta {
  sampleRate?: number | null;
  durationS?: number | null;
  channels?: ChannelInfo[] | null;
}

export interface StoreCaptureInput {
  assetId: number;
  measurementPointId?: number | null;
  takenAt: Date | string;
  takenByUserId?: number | null;
  gatewayId?: number | null;
  source: "upload" | "stream";
  fileName: string;
  /** "csv" | "wav" | "stream" (raw samples written as WAV by the gateway module, say). */
  format: string;
  /** The recording: bytes in memory, a file on disk, or a readable stream. Exactly one. */
  bytes?: Uint8Array;
  path?: string;
  /** With `path`: a temp file the caller no longer needs, which the blob store may move instead of copy. */
  movePath?: boolean;
  stream?: Readable;
  notes?: string | null;
  meta?: CaptureMeta;
}

export interface StoredCapture {
  id: number;
  status: "queued" | "received";
  fileName: string;
}

const EXT: Record<string, string> = { csv: "csv", wav: "wav" };

function sourceOf(input: StoreCaptureInput): BlobSource {
  if (input.bytes) return input.bytes;
  if (input.path) return { path: input.path, move: input.movePath === true };
  if (input.stream) return input.stream;
  throw new Error("storeCaptureAndQueue: give bytes, path or stream");
}

/**
 * Store one capture and queue its analysis: blob first, then the row and its job in one transaction. When any step
 * fails the steps already done are undone (blob deleted, row and job rolled back), so a failed ingest leaves nothing
 * half-stored. Used by uploads (POST /api/captures) and by the gateway stream module.
 */
export async function storeCaptureAndQueue(ctx: AppContext, input: StoreCaptureInput): Promise<StoredCapture> {
  const [one] = await storeCapturesAndQueue(ctx, [input]);
  return one;
}

/**
 * All-or-nothing for several files: every blob, row and job is written, or none is. The rows are inserted `queued`
 * and their jobs sent in the same transaction (pg-boss `insert` on the knex transaction, as `requeueAnalyses` does),
 * so a crash between the two cannot leave a capture that no job will ever take.
 */
export async function storeCapturesAndQueue(ctx: AppContext, inputs: StoreCaptureInput[]): Promise<StoredCapture[]> {
  const blob = blobStoreOf(ctx);
  const queue = queueOf(ctx);
  const keys: string[] = [];
  // The ids inserted, set inside the transaction: when its commit fails without saying whether it happened (a
  // connection lost at COMMIT), the rows are deleted again below, which is a no-op after a rollback.
  let ids: number[] = [];
  try {
    for (const input of inputs) {
      const ext = EXT[input.format] ?? "bin";
      const key = `captures/${input.assetId}/${crypto.randomUUID()}.${ext}`;
      keys.push(key); // pushed before the write: a failed put may still leave something to remove on S3
      const { size } = await blob.put(key, sourceOf(input));
      (input as StoreCaptureInput & { _size?: number })._size = size;
    }
    await ctx.db.transaction(async (trx) => {
      const out: number[] = [];
      for (const [i, input] of inputs.entries()) {
        const [row] = await trx("captures")
          .insert({
            asset_id: input.assetId,
            measurement_point_id: input.measurementPointId ?? null,
            taken_at: new Date(input.takenAt),
            taken_by_user_id: input.takenByUserId ?? null,
            gateway_id: input.gatewayId ?? null,
            source: input.source,
            file_name: input.fileName.slice(0, 300),
            format: input.format,
            sample_rate: input.meta?.sampleRate ?? null,
            duration_s: input.meta?.durationS ?? null,
            channel_count: input.meta?.channels?.length ?? null,
            channels: input.meta?.channels ? JSON.stringify(input.meta.channels) : null,
            byte_size: (input as StoreCaptureInput & { _size?: number })._size ?? null,
            blob_key: keys[i],
            // Queued at once: its job is written in this transaction, so no worker sees one without the other.
            status: "queued",
            queued_at: trx.fn.now(),
            notes: input.notes ?? null,
            analysis_version: 1,
          })
          .returning("id");
        out.push(row.id);
      }
      ids = out;
      await queue.sendAnalyses(out.map((id) => ({ captureId: id, version: 1 })), { trx });
    });
  } catch (err) {
    if (ids.length) await ctx.db("captures").whereIn("id", ids).delete().catch(() => {});
    for (const key of keys) await blob.delete(key).catch(() => {});
    throw err;
  }
  // Stored and queued from here on: nothing below may throw (a caller would take it for a failed ingest).
  // The row's status now: a fast worker may already have moved the capture on.
  const rows: { id: number; status: StoredCapture["status"] }[] = await ctx.db("captures").whereIn("id", ids).select("id", "status").catch(() => []);
  const statusOf = new Map(rows.map((r) => [r.id, r.status]));
  const out = ids.map((id, i) => ({ id, status: statusOf.get(id) ?? "queued", fileName: inputs[i].fileName.slice(0, 300) }));
  for (const [i, c] of out.entries()) await publishEvent(ctx, "capture:status", { id: c.id, assetId: inputs[i].assetId, status: c.status });
  return out;
}

/**
 * What an upload answers when the ingest failed for a reason of the server's (database, queue or blob store down,
 * a lost connection): 503, code "unavailable", saying nothing was stored (true: the ingest undid its steps) and to
 * try again. A refusal that is already an HttpError, or a motor deleted meanwhile (the 409 of `missingParent`), is
 * passed on as it is.
 */
export function ingestFailure(err: unknown): unknown {
  if (err instanceof HttpError || missingParent(err)) return err;
  return Object.assign(
    new HttpError(503, "The server could not store the upload just now (its database, job queue or file store did not answer). Nothing was stored: send the files again in a moment.", undefined, "unavailable"),
    { cause: err },
  );
}

/**
 * Queue a new analysis version of an existing capture (requeue after failure, re-analysis after a nameplate
 * change). The version is reserved on the row first, so the job writes exactly that version once.
 */
export async function requeueAnalysis(ctx: AppContext, captureId: number, opts: { newVersion: boolean }): Promise<{ id: number; status: string; version: number } | null> {
  const [one] = await requeueAnalyses(ctx, { captureIds: [captureId] }, opts);
  return one ?? null;
}

/**
 * Queue the next analysis of many captures at once (every stored capture of a motor, or a list of ids): one UPDATE
 * reserves every version and one INSERT queues every job, both in one transaction, so either all are queued or
 * none is. A failed capture never written keeps its version (unless `newVersion`); an analysed one gets the next.
 */
export async function requeueAnalyses(
  ctx: AppContext,
  which: { assetId: number } | { captureIds: number[] },
  opts: { newVersion: boolean },
): Promise<{ id: number; status: string; version: number }[]> {
  const queue = queueOf(ctx);
  if ("captureIds" in which && !which.captureIds.length) return [];
  const rows = await ctx.db.transaction(async (trx) => {
    // A motor's re-analysis takes its stored captures; named captures are taken as they are (as before).
    const target = trx("captures").select("id");
    if ("assetId" in which) target.where({ asset_id: which.assetId }).whereNotNull("blob_key");
    else target.whereIn("id", which.captureIds);
    // Rows locked in id order, so two re-analyses of one motor at once cannot deadlock; the second waits.
    const { rows } = await trx.raw<{ rows: { id: number; asset_id: number; analysis_version: number; taken_at: Date }[] }>(
      `with target as (select id from captures where id in ? order by id for update),
            latest as (select t.id, coalesce((select max(a.version) from analyses a where a.capture_id = t.id), 0) as v from target t)
       update captures c set
         analysis_version = case when ?::boolean or l.v >= c.analysis_version then greatest(l.v, c.analysis_version) + 1 else c.analysis_version end,
         status = 'queued', error = null, queued_at = now(), updated_at = now()
       from latest l where c.id = l.id
       returning c.id, c.asset_id, c.analysis_version, c.taken_at`,
      [target, opts.newVersion],
    );
    // Oldest capture first, as a person would re-analyse them.
    rows.sort((a, b) => +a.taken_at - +b.taken_at || a.id - b.id);
    await queue.sendAnalyses(rows.map((r) => ({ captureId: r.id, version: r.analysis_version })), { trx });
    return rows;
  });
  for (const r of rows) await publishEvent(ctx, "capture:status", { id: r.id, assetId: r.asset_id, status: "queued" });
  return rows.map((r) => ({ id: r.id, status: "queued", version: r.analysis_version }));
}
