// Stream sessions: the stream_sessions row is the truth about progress (next_seq, bytes_received); the frames
// themselves go to <dataDir>/streams/<sessionId>.part.
//
// Why positional writes instead of appending: a chunk is written at offset bytes_received and only then is the row
// advanced. If the process dies between the two, the file holds a tail the row does not count; the resent chunk
// overwrites exactly that tail, and assembly reads only bytes_received bytes. Appending would leave the tail
// in place and shift every later frame. At "end" the frames are converted block by block into
// <sessionId>.assembling.wav beside the part file, which the blob store then takes (never read whole into memory).

import crypto from "node:crypto";
import fs from "node:fs/promises";
import { constants as fsConstants } from "node:fs";
import path from "node:path";
import type { Knex } from "knex";
import type { Config } from "../config.ts";
import type { SampleFormat, SessionClosedReason, StreamChannel } from "./protocol.ts";

export interface StreamSession {
  id: string;
  gateway_id: number;
  asset_id: number;
  measurement_point_id: number | null;
  sample_rate: number;
  channels: StreamChannel[];
  sample_format: SampleFormat;
  next_seq: number;
  bytes_received: number;
  status: "open" | "ended" | "aborted";
  /** Who gave an aborted session up: the gateway ("abort") or the stale-session sweep. */
  aborted_by: "gateway" | "sweep" | null;
  abort_reason: string | null;
  capture_id: number | null;
  taken_at: Date | null;
  created_at: Date;
}

export function streamsDir(config: Config): string {
  return path.resolve(config.dataDir, "streams");
}

export function partPath(config: Config, sessionId: string): string {
  return path.join(streamsDir(config), `${sessionId}.part`);
}

/**
 * Where "end" writes the session's WAV before handing it to the blob store (which moves it into place). One per
 * session: the row lock lets only one "end" assemble at a time, and a retried one overwrites what a crash left.
 */
export function assemblyPath(config: Config, sessionId: string): string {
  return path.join(streamsDir(config), `${sessionId}.assembling.wav`);
}

function fromRow(row: Record<string, unknown>): StreamSession {
  // bigint columns come back as strings from pg.
  return { ...(row as unknown as StreamSession), bytes_received: Number(row.bytes_received), sample_rate: Number(row.sample_rate) };
}

export async function getSession(db: Knex | Knex.Transaction, id: string, opts: { forUpdate?: boolean } = {}): Promise<StreamSession | null> {
  const q = db("stream_sessions").where({ id }).first();
  if (opts.forUpdate) q.forUpdate();
  const row = await q;
  return row ? fromRow(row) : null;
}

export interface NewSession {
  gatewayId: number;
  assetId: number;
  measurementPointId?: number;
  sampleRate: number;
  channels: StreamChannel[];
  sampleFormat: SampleFormat;
  takenAt?: string;
}

export async function createSession(db: Knex, config: Config, s: NewSession): Promise<StreamSession> {
  const id = crypto.randomUUID();
  await fs.mkdir(streamsDir(config), { recursive: true });
  await fs.writeFile(partPath(config, id), new Uint8Array(0));
  const [row] = await db("stream_sessions")
    .insert({
      id,
      gateway_id: s.gatewayId,
      asset_id: s.assetId,
      measurement_point_id: s.measurementPointId ?? null,
      sample_rate: s.sampleRate,
      channels: JSON.stringify(s.channels),
      sample_format: s.sampleFormat,
      taken_at: s.takenAt ? new Date(s.takenAt) : new Date(),
    })
    .returning("*");
  return fromRow(row);
}

/** Write a chunk's bytes at `offset` of the session's part file (creating the file if it went missing). */
export async function writeChunkAt(config: Config, sessionId: string, offset: number, data: Uint8Array): Promise<void> {
  await fs.mkdir(streamsDir(config), { recursive: true });
  const fh = await fs.open(partPath(config, sessionId), fsConstants.O_WRONLY | fsConstants.O_CREAT);
  try {
    let done = 0;
    while (done < data.length) {
      const { bytesWritten } = await fh.write(data, done, data.length - done, offset + done);
      done += bytesWritten;
    }
  } finally {
    await fh.close();
  }
}

/**
 * Advance the session past chunk `seq` if it still expects that chunk. Returns false when another connection
 * (a resumed stream on another server process, say) got there first; the caller then treats the chunk as stored.
 */
export async function recordChunk(db: Knex, sessionId: string, seq: number, bytes: number): Promise<boolean> {
  const n = await db("stream_sessions")
    .where({ id: sessionId, next_seq: seq, status: "open" })
    .update({ next_seq: seq + 1, bytes_received: db.raw("bytes_received + ?", [bytes]), updated_at: db.fn.now() });
  return n === 1;
}

/** Delete the session's frames (and a WAV an interrupted "end" may have left). */
export async function removePart(config: Config, sessionId: string): Promise<void> {
  await fs.rm(partPath(config, sessionId), { force: true });
  await fs.rm(assemblyPath(config, sessionId), { force: true });
}

/**
 * Mark sessions that have not moved for `olderThanHours` as aborted and delete their part files, so a gateway that
 * never came back does not leave frames on disk for ever. A resume of an aborted session is refused with a clear
 * message; the gateway then starts a new one.
 */
export async function abandonStaleSessions(db: Knex, config: Config, olderThanHours: number): Promise<number> {
  const rows: { id: string }[] = await db("stream_sessions")
    .where({ status: "open" })
    .andWhere("updated_at", "<", db.raw(`now() - make_interval(hours => ?)`, [olderThanHours]))
    .update({ status: "aborted", aborted_by: "sweep", updated_at: db.fn.now() })
    .returning("id");
  for (const r of rows) await removePart(config, r.id).catch(() => {});
  return rows.length;
}

/**
 * The gateway gives an open session up: mark it aborted and delete its part file. Returns the session as it was
 * before (under its row lock), so the caller can tell an ended or already aborted one; only an open one is changed.
 */
export async function abortSession(db: Knex, config: Config, sessionId: string, reason: string | undefined): Promise<StreamSession> {
  const before = await db.transaction(async (trx) => {
    const s = (await getSession(trx, sessionId, { forUpdate: true }))!;
    if (s.status === "open")
      await trx("stream_sessions").where({ id: s.id }).update({ status: "aborted", aborted_by: "gateway", abort_reason: reason || null, updated_at: trx.fn.now() });
    return s;
  });
  // After the commit: a chunk arriving meanwhile finds the session aborted and is not counted.
  if (before.status === "open") await removePart(config, sessionId);
  return before;
}

/** "was abandoned by the gateway (the file changed)" or "was abandoned after 48 h without progress". */
export function abandonedText(s: Pick<StreamSession, "aborted_by" | "abort_reason">, staleHours: number): string {
  if (s.aborted_by === "gateway") return `was abandoned by the gateway${s.abort_reason ? ` (${s.abort_reason})` : ""}`;
  return `was abandoned after ${staleHours} h without progress`;
}

/** The stable `reason` of a "session-closed" refusal of a session that is no longer open (protocol.ts). */
export function closedReason(s: Pick<StreamSession, "status" | "aborted_by" | "capture_id">): SessionClosedReason {
  if (s.status === "aborted") return s.aborted_by === "gateway" ? "aborted-by-gateway" : "aborted-by-sweep";
  return s.capture_id === null ? "ended-capture-deleted" : "ended";
}
