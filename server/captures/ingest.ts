import crypto from "node:crypto";
import type { Readable } from "node:stream";
import type { AppContext } from "../context.ts";
import { blobStoreOf, type BlobSource } from "../blob/index.ts";
import { queueOf } from "../queue.ts";
import { publishEvent } from "./publish.ts";

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
  if (input.path) return { path: input.path };
  if (input.stream) return input.stream;
  throw new Error("storeCaptureAndQueue: give bytes, path or stream");
}

/**
 * Store one capture and queue its analysis: blob first, then the row, then the job. When any step fails the
 * steps already done are undone (blob deleted, row deleted), so a failed ingest leaves nothing half-stored.
 * Used by uploads (POST /api/captures) and by the gateway stream module.
 */
export async function storeCaptureAndQueue(ctx: AppContext, input: StoreCaptureInput): Promise<StoredCapture> {
  const [one] = await storeCapturesAndQueue(ctx, [input]);
  return one;
}

/** All-or-nothing for several files: every blob and row is written, or none is. */
export async function storeCapturesAndQueue(ctx: AppContext, inputs: StoreCaptureInput[]): Promise<StoredCapture[]> {
  const blob = blobStoreOf(ctx);
  const queue = queueOf(ctx);
  const keys: string[] = [];
  let ids: number[] = [];
  try {
    for (const input of inputs) {
      const ext = EXT[input.format] ?? "bin";
      const key = `captures/${input.assetId}/${crypto.randomUUID()}.${ext}`;
      keys.push(key); // pushed before the write: a failed put may still leave something to remove on S3
      const { size } = await blob.put(key, sourceOf(input));
      (input as StoreCaptureInput & { _size?: number })._size = size;
    }
    ids = await ctx.db.transaction(async (trx) => {
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
            status: "received",
            notes: input.notes ?? null,
            analysis_version: 1,
          })
          .returning("id");
        out.push(row.id);
      }
      return out;
    });
    for (const id of ids) await queue.sendAnalysis({ captureId: id, version: 1 });
    // Only "received" moves to "queued": a fast worker may already have moved the capture on.
    await ctx.db("captures").whereIn("id", ids).andWhere({ status: "received" }).update({ status: "queued", queued_at: ctx.db.fn.now(), updated_at: ctx.db.fn.now() });
  } catch (err) {
    // A job already sent for a deleted row finds no capture and completes as a no-op.
    if (ids.length) await ctx.db("captures").whereIn("id", ids).delete().catch(() => {});
    for (const key of keys) await blob.delete(key).catch(() => {});
    throw err;
  }
  const rows = await ctx.db("captures").whereIn("id", ids).select("id", "status", "asset_id", "file_name");
  const byId = new Map(rows.map((r) => [r.id, r]));
  for (const id of ids) await publishEvent(ctx, "capture:status", { id, assetId: byId.get(id)?.asset_id, status: byId.get(id)?.status });
  return ids.map((id) => ({ id, status: byId.get(id)?.status ?? "queued", fileName: byId.get(id)?.file_name }));
}

/**
 * Queue a new analysis version of an existing capture (requeue after failure, re-analysis after a nameplate
 * change). The version is reserved on the row first, so the job writes exactly that version once.
 */
export async function requeueAnalysis(ctx: AppContext, captureId: number, opts: { newVersion: boolean }): Promise<{ id: number; status: string; version: number } | null> {
  const queue = queueOf(ctx);
  const row = await ctx.db.transaction(async (trx) => {
    const cap = await trx("captures").where({ id: captureId }).forUpdate().first();
    if (!cap) return null;
    const done = await trx("analyses").where({ capture_id: captureId }).max<{ max: number | null }>("version as max").first();
    const latest = done?.max ?? 0;
    // A failed capture never written keeps its version; an analysed one gets the next.
    const version = opts.newVersion || latest >= cap.analysis_version ? Math.max(latest, cap.analysis_version) + 1 : cap.analysis_version;
    await trx("captures").where({ id: captureId }).update({ analysis_version: version, status: "queued", error: null, queued_at: trx.fn.now(), updated_at: trx.fn.now() });
    return { id: captureId, assetId: cap.asset_id as number, version };
  });
  if (!row) return null;
  await queue.sendAnalysis({ captureId, version: row.version });
  await publishEvent(ctx, "capture:status", { id: captureId, assetId: row.assetId, status: "queued" });
  return { id: captureId, status: "queued", version: row.version };
}
