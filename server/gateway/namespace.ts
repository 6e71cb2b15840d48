// The "/gateway" socket.io namespace: site gateways stream captures here (protocol in ./protocol.ts).
//
// Each gateway socket joins the room "gateway:<id>", so revoking a token can disconnect the device on whichever
// server process it is connected to (the room broadcast goes through the PostgreSQL adapter).

import fs from "node:fs/promises";
import type { Namespace, Server, Socket } from "socket.io";
import type { AppContext } from "../context.ts";
import type { Config } from "../config.ts";
import type { StoreCaptureInput } from "../captures/ingest.ts";
import {
  BYTES_PER_SAMPLE,
  FLOAT_FORMATS,
  GATEWAY_NAMESPACE,
  MAX_CHUNK_BYTES,
  abortMessage,
  beginMessage,
  chunkMessage,
  endMessage,
  findNonFiniteSample,
  frameBytes,
  type AbortAck,
  type Ack,
  type BeginAck,
  type ChunkAck,
  type EndAck,
  type SampleFormat,
  type StreamError,
  type StreamErrorCode,
  type StreamErrorReasonOf,
} from "./protocol.ts";
import { gatewayFromToken, type GatewayRow } from "./tokens.ts";
import {
  abandonStaleSessions,
  abandonedText,
  abortSession,
  assemblyPath,
  closedReason,
  createSession,
  getSession,
  partPath,
  recordChunk,
  removePart,
  writeChunkAt,
  type StreamSession,
} from "./session-store.ts";
import { MAX_WAV_DATA_BYTES, writeStreamWav } from "./assemble.ts";

/** Where a finished stream goes: storeCaptureAndQueue of server/captures/ingest.ts (tests may pass their own). */
export type StoreCaptureFn = (ctx: AppContext, input: StoreCaptureInput) => Promise<{ id: number; status: string }>;

export const gatewayRoom = (gatewayId: number) => `gateway:${gatewayId}`;

/** An open session untouched this long is abandoned (its part file deleted); a gateway resumes well within it. */
export const STALE_SESSION_HOURS = 48;

/**
 * The most frame bytes one stream session may hold: the upload limit (UPLOAD_LIMIT_MB, 512 MB by default), as for a
 * file uploaded in the browser, and never more than the 32-bit float WAV it becomes can hold (4 GiB).
 */
export function streamLimitBytes(config: Pick<Config, "uploadLimitBytes">, format: SampleFormat): number {
  const wavBytesPerStreamByte = 4 / BYTES_PER_SAMPLE[format];
  return Math.min(config.uploadLimitBytes, Math.floor(MAX_WAV_DATA_BYTES / wavBytesPerStreamByte));
}

/**
 * A refusal that becomes a stream:error event and an error acknowledgement. A gateway acts on `code` and `extra.reason`
 * (typed per code), never on the message, so the message may be reworded freely.
 */
class StreamRefusal<C extends StreamErrorCode = StreamErrorCode> extends Error {
  constructor(
    public code: C,
    message: string,
    public extra: Omit<Partial<StreamError>, "code" | "reason" | "message"> & { reason?: StreamErrorReasonOf<C> } = {},
  ) {
    super(message);
  }
}

interface GatewaySocketData {
  gateway: GatewayRow;
}

export function attachGatewayNamespace(io: Server, ctx: AppContext, resolveStore: () => Promise<StoreCaptureFn>): { nsp: Namespace; close(): void } {
  const nsp = io.of(GATEWAY_NAMESPACE);
  const { db, config } = ctx;

  // Housekeeping: now and hourly. Every server process may run it; the conditional update makes that harmless.
  const sweep = () => void abandonStaleSessions(db, config, STALE_SESSION_HOURS).catch(() => {});
  sweep();
  const sweeper = setInterval(sweep, 3600_000);
  sweeper.unref();

  // Handshake: a valid, unrevoked gateway token. The refusal text reaches the device as connect_error.message.
  nsp.use(async (socket, next) => {
    try {
      const found = await gatewayFromToken(db, (socket.handshake.auth as { token?: unknown } | undefined)?.token);
      // data.code stays "unauthorized" (what older gateways look for); data.reason tells them apart.
      if ("problem" in found) return next(Object.assign(new Error(found.problem), { data: { code: "unauthorized", reason: found.reason } }));
      (socket.data as GatewaySocketData).gateway = found.gateway;
      next();
    } catch (err) {
      next(err as Error);
    }
  });

  // Requests for one session are handled one after another in this process, so a gateway that sends chunks
  // without waiting for each ack still gets them appended in order (socket.io runs async handlers concurrently).
  const queues = new Map<string, Promise<unknown>>();
  const serial = <T>(key: string, job: () => Promise<T>): Promise<T> => {
    const prev = queues.get(key) ?? Promise.resolve();
    const run = prev.then(job, job);
    const tail = run.catch(() => {});
    queues.set(key, tail);
    void tail.then(() => {
      if (queues.get(key) === tail) queues.delete(key);
    });
    return run;
  };

  nsp.on("connection", (socket: Socket) => {
    const gateway = (socket.data as GatewaySocketData).gateway;
    void socket.join(gatewayRoom(gateway.id));
    void touch(gateway.id);

    const handle =
      <T>(kind: string, work: (raw: unknown) => Promise<T>) =>
      async (raw: unknown, ack?: (answer: Ack<T>) => void) => {
        const reply = typeof ack === "function" ? ack : () => {};
        try {
          reply(await work(raw));
        } catch (err) {
          const refusal =
            err instanceof StreamRefusal ? err : new StreamRefusal("server", `The server could not handle "${kind}": ${(err as Error).message}`);
          if (!(err instanceof StreamRefusal)) console.error(`gateway ${gateway.id} ${kind} failed`, err);
          const sessionId = (raw as { sessionId?: unknown } | null)?.sessionId;
          const error: StreamError = {
            code: refusal.code,
            message: refusal.message,
            ...(typeof sessionId === "string" ? { sessionId } : {}),
            ...refusal.extra,
          };
          socket.emit("stream:error", error);
          reply({ error });
        }
      };

    socket.on("begin", handle<BeginAck>("begin", (raw) => begin(gateway, raw)));
    socket.on("chunk", handle<ChunkAck>("chunk", (raw) => chunk(gateway, raw)));
    socket.on("end", handle<EndAck>("end", (raw) => end(gateway, raw)));
    socket.on("abort", handle<AbortAck>("abort", (raw) => abort(gateway, raw)));
    // An event this server does not handle still gets an answer, so a newer gateway need not wait for a timeout.
    socket.onAny((event: string, ...args: unknown[]) => {
      const ack = args[args.length - 1];
      if (KNOWN_EVENTS.has(event) || typeof ack !== "function") return;
      const error: StreamError = { code: "unknown-event", message: `This server does not handle "${event}" (it handles ${[...KNOWN_EVENTS].join(", ")}).` };
      (ack as (answer: Ack<never>) => void)({ error });
    });
  });

  async function touch(gatewayId: number) {
    await db("gateways").where({ id: gatewayId }).update({ last_seen_at: db.fn.now() }).catch(() => {});
  }

  // A socket that was connected before its token was revoked is disconnected by the revoke route; checking again at
  // begin and end also covers a revoke whose broadcast this process missed.
  async function assertNotRevoked(gateway: GatewayRow) {
    const row = await db("gateways").where({ id: gateway.id }).first("revoked_at");
    if (!row || row.revoked_at) throw new StreamRefusal("revoked", `The token of gateway "${gateway.name}" was revoked; nothing more is accepted from it.`);
  }

  async function ownSession(gateway: GatewayRow, sessionId: string): Promise<StreamSession> {
    const s = await getSession(db, sessionId);
    // Another gateway's session is reported as unknown, not as forbidden, so session ids cannot be probed.
    if (!s || s.gateway_id !== gateway.id)
      throw new StreamRefusal("unknown-session", `There is no stream session ${sessionId} for this gateway. Send "begin" to start a new one.`);
    return s;
  }

  async function begin(gateway: GatewayRow, raw: unknown): Promise<BeginAck> {
    const r = beginMessage.safeParse(raw);
    if (!r.success) throw new StreamRefusal("bad-request", `"begin" is not valid: ${describeIssues(r.error.issues)}`);
    const msg = r.data;
    // The WAV stores count × scale as a 32-bit float: a scale that makes the largest count overflow to Infinity would
    // only fail when the capture is analysed.
    if (msg.sampleFormat !== "f32le") {
      const largest = 2 ** (BYTES_PER_SAMPLE[msg.sampleFormat] * 8 - 1);
      const ch = msg.channels.findIndex((c) => !Number.isFinite(Math.fround(largest * (c.scale ?? 1))));
      if (ch >= 0)
        throw new StreamRefusal(
          "bad-request",
          `"begin" is not valid: channels.${ch}.scale: ${msg.channels[ch].scale} units per count would make a ${msg.sampleFormat} count beyond the range of 32-bit floats (±3.4e38).`,
        );
    }
    await assertNotRevoked(gateway);
    void touch(gateway.id);

    if (msg.resumeSessionId) {
      const s = await ownSession(gateway, msg.resumeSessionId);
      if (s.status === "aborted")
        throw new StreamRefusal(
          "session-closed",
          `Stream session ${s.id} ${abandonedText(s, STALE_SESSION_HOURS)}; send "begin" without resumeSessionId to start again.`,
          { reason: closedReason(s) },
        );
      const same =
        s.sample_format === msg.sampleFormat && s.sample_rate === msg.sampleRate && s.channels.length === msg.channels.length && s.asset_id === msg.assetId;
      if (!same)
        throw new StreamRefusal(
          "resume-mismatch",
          `Stream session ${s.id} was begun for motor ${s.asset_id} with ${s.channels.length} channel(s), ${s.sample_format} at ${s.sample_rate} Hz; ` +
            `the resume asks for motor ${msg.assetId} with ${msg.channels.length} channel(s), ${msg.sampleFormat} at ${msg.sampleRate} Hz.`,
          { sessionId: s.id },
        );
      // An ended session answers with its final nextSeq; "end" then re-acknowledges its capture. The extra fields tell
      // a gateway restarted from saved state where the server stands; clients that do not know them ignore them.
      return { sessionId: s.id, nextSeq: s.next_seq, status: s.status, bytesReceived: s.bytes_received, captureId: s.capture_id };
    }

    const asset = await db("assets as a").join("areas as ar", "ar.id", "a.area_id").where("a.id", msg.assetId).first("a.id", "a.tag", "ar.site_id");
    if (!asset)
      throw new StreamRefusal("unknown-asset", `There is no motor with id ${msg.assetId}. Check the asset id configured on the gateway.`, { reason: "unknown-motor" });
    if (gateway.site_id !== null && asset.site_id !== gateway.site_id)
      throw new StreamRefusal("wrong-site", `Motor ${asset.tag} is not on this gateway's site; a gateway may only stream captures for motors on its own site.`);
    if (msg.measurementPointId !== undefined) {
      const point = await db("measurement_points").where({ id: msg.measurementPointId, asset_id: msg.assetId }).first("id");
      if (!point)
        throw new StreamRefusal("unknown-asset", `Measurement point ${msg.measurementPointId} does not belong to motor ${asset.tag}.`, { reason: "unknown-point" });
    }
    const s = await createSession(db, config, {
      gatewayId: gateway.id,
      assetId: msg.assetId,
      measurementPointId: msg.measurementPointId,
      sampleRate: msg.sampleRate,
      channels: msg.channels,
      sampleFormat: msg.sampleFormat,
      takenAt: msg.takenAt,
    });
    return { sessionId: s.id, nextSeq: 0 };
  }

  async function chunk(gateway: GatewayRow, raw: unknown): Promise<ChunkAck> {
    const r = chunkMessage.safeParse(raw);
    if (!r.success) throw new StreamRefusal("bad-request", `"chunk" is not valid: ${describeIssues(r.error.issues)}`);
    const { sessionId, seq } = r.data;
    const data = toBuffer(r.data.data);
    return serial(sessionId, async () => {
      const s = await ownSession(gateway, sessionId);
      if (s.status === "aborted")
        throw new StreamRefusal("session-closed", `Stream session ${s.id} ${abandonedText(s, STALE_SESSION_HOURS)}; it takes no more chunks.`, { seq, reason: closedReason(s) });
      if (s.status !== "open") throw new StreamRefusal("session-closed", `Stream session ${s.id} has ended; it takes no more chunks.`, { seq, reason: closedReason(s) });
      // A resend of a chunk already stored (its ack was lost with the connection): acknowledge it again, store nothing.
      if (seq < s.next_seq) return { seq, duplicate: true };
      if (seq > s.next_seq)
        throw new StreamRefusal(
          "gap",
          `Chunk ${seq} arrived but chunk ${s.next_seq} is the next one expected; chunks ${s.next_seq}–${seq - 1} are missing. Resend from chunk ${s.next_seq}.`,
          { seq, nextSeq: s.next_seq },
        );
      const fb = frameBytes(s.channels.length, s.sample_format);
      if (data.length === 0)
        throw new StreamRefusal("bad-frame", `Chunk ${seq} is empty; every chunk must hold at least one frame (${fb} bytes).`, { seq, reason: "empty-chunk" });
      if (data.length > MAX_CHUNK_BYTES)
        throw new StreamRefusal("chunk-too-large", `Chunk ${seq} holds ${data.length} bytes; the largest chunk accepted is ${MAX_CHUNK_BYTES} bytes.`, { seq });
      if (data.length % fb !== 0)
        throw new StreamRefusal(
          "bad-frame",
          `Chunk ${seq} holds ${data.length} bytes, which is not a whole number of frames: a frame is ${s.channels.length} channel(s) × ` +
            `${fb / s.channels.length} bytes (${s.sample_format}) = ${fb} bytes. Split chunks on frame boundaries.`,
          { seq, nextSeq: s.next_seq, reason: "partial-frame" },
        );
      // A chunk that would take the stream past the limit is refused (not stored): the session stays open with what it
      // holds, which the gateway keeps with "end" (totalChunks = nextSeq) or drops with "abort".
      const limit = streamLimitBytes(config, s.sample_format);
      if (s.bytes_received + data.length > limit)
        throw new StreamRefusal(
          "stream-too-large",
          `Chunk ${seq} (${data.length} bytes) would take stream session ${s.id} past this server's limit of ${megabytes(limit)} (${limit} bytes) ` +
            `for one stream; it holds ${s.bytes_received} bytes received in ${s.next_seq} chunk(s). ` +
            (s.next_seq > 0
              ? `Nothing past ${limit - s.bytes_received} more bytes is taken: send "end" with totalChunks ${s.next_seq} to keep what was received ` +
                `as a capture, or "abort" to drop it.`
              : `Send "abort" and stream a shorter capture.`),
          { seq, nextSeq: s.next_seq, limitBytes: limit, bytesReceived: s.bytes_received },
        );
      // NaN or ±Infinity would be refused by the WAV reader when the capture is analysed: refuse it now, where the
      // gateway can still send the chunk again (same seq) with the sample corrected.
      if (FLOAT_FORMATS.has(s.sample_format)) {
        const bad = findNonFiniteSample(data, s.channels.length);
        if (bad) {
          const first = s.bytes_received / fb;
          throw new StreamRefusal(
            "bad-frame",
            `Chunk ${seq} holds a sample that is ${bad.value} rather than a finite number: frame ${bad.frame} of the chunk, channel ${bad.channel} ` +
              `("${s.channels[bad.channel].name}"), both counted from 0 (frame ${first + bad.frame} of the stream). ` +
              `Nothing of chunk ${seq} was stored; send it again with finite samples.`,
            { seq, nextSeq: s.next_seq, reason: "non-finite-sample", frame: bad.frame, channel: bad.channel },
          );
        }
      }
      await writeChunkAt(config, s.id, s.bytes_received, data);
      // If another connection stored this chunk in the meantime, it wrote the same bytes at the same offset.
      const advanced = await recordChunk(db, s.id, seq, data.length);
      if (!advanced) {
        // Aborted on another server process while this chunk was written: do not leave the bytes behind.
        const now = await getSession(db, s.id);
        if (now?.status === "aborted") {
          await removePart(config, s.id).catch(() => {});
          throw new StreamRefusal("session-closed", `Stream session ${s.id} ${abandonedText(now, STALE_SESSION_HOURS)}; it takes no more chunks.`, {
            seq,
            reason: closedReason(now),
          });
        }
      }
      return advanced ? { seq } : { seq, duplicate: true };
    });
  }

  async function end(gateway: GatewayRow, raw: unknown): Promise<EndAck> {
    const r = endMessage.safeParse(raw);
    if (!r.success) throw new StreamRefusal("bad-request", `"end" is not valid: ${describeIssues(r.error.issues)}`);
    const { sessionId, totalChunks } = r.data;
    return serial(sessionId, async () => {
      await ownSession(gateway, sessionId);
      await assertNotRevoked(gateway);
      void touch(gateway.id);
      // The row lock makes a retried "end" on another server process wait, then see the capture already made.
      const result = await db.transaction(async (trx) => {
        const s = (await getSession(trx, sessionId, { forUpdate: true }))!;
        if (s.status === "ended") {
          if (s.capture_id === null)
            throw new StreamRefusal("session-closed", `Stream session ${s.id} has ended, but its capture was deleted.`, { reason: "ended-capture-deleted" });
          const cap = await trx("captures").where({ id: s.capture_id }).first("status");
          return { captureId: s.capture_id, status: String(cap?.status ?? "received"), ended: false };
        }
        if (s.status !== "open") throw new StreamRefusal("session-closed", `Stream session ${s.id} ${abandonedText(s, STALE_SESSION_HOURS)}.`, { reason: closedReason(s) });
        if (totalChunks !== s.next_seq)
          throw new StreamRefusal(
            "incomplete",
            `"end" says ${totalChunks} chunk(s) were sent, but the server has chunks 0–${s.next_seq - 1} (${s.next_seq} in all). ` +
              `Send chunk ${s.next_seq} onward before ending.`,
            { nextSeq: s.next_seq },
          );
        if (s.bytes_received === 0) throw new StreamRefusal("empty", `Stream session ${s.id} holds no samples; send chunks before "end".`);

        const frameCount = s.bytes_received / frameBytes(s.channels.length, s.sample_format);
        // Written block by block to a file beside the part file, which the blob store then takes (moved when it can):
        // memory stays bounded whatever the stream's length.
        const wavFile = assemblyPath(config, s.id);
        const layout = { sampleRate: s.sample_rate, channels: s.channels, sampleFormat: s.sample_format };
        const store = await resolveStore();
        const stamp = (s.taken_at ?? s.created_at).toISOString().replace(/[:.]/g, "-");
        let stored: { id: number; status: string };
        try {
          await writeStreamWav(partPath(config, s.id), s.bytes_received, layout, wavFile);
          stored = await store(ctx, {
            assetId: s.asset_id,
            ...(s.measurement_point_id !== null ? { measurementPointId: s.measurement_point_id } : {}),
            takenAt: s.taken_at ?? s.created_at,
            gatewayId: gateway.id,
            source: "stream",
            fileName: `${gateway.name.replace(/[^\w.-]+/g, "_")}-${stamp}.wav`,
            format: "wav",
            path: wavFile,
            movePath: true,
            meta: {
              sampleRate: s.sample_rate,
              durationS: frameCount / s.sample_rate,
              channels: s.channels.map((c) => ({ name: c.name, kind: c.kind, unit: c.unit, position: c.position ?? null })),
            },
          });
        } finally {
          // Moved into the blob store already, or left by a failure (the S3 driver copies and leaves it to the caller).
          await fs.rm(wavFile, { force: true });
        }
        await trx("stream_sessions").where({ id: s.id }).update({ status: "ended", capture_id: stored.id, updated_at: trx.fn.now() });
        return { captureId: stored.id, status: stored.status, ended: true };
      });
      if (result.ended) await removePart(config, sessionId).catch(() => {});
      return { captureId: result.captureId, status: result.status };
    });
  }

  // The gateway will not finish this session (it starts over): its frames are deleted and it cannot be resumed.
  async function abort(gateway: GatewayRow, raw: unknown): Promise<AbortAck> {
    const r = abortMessage.safeParse(raw);
    if (!r.success) throw new StreamRefusal("bad-request", `"abort" is not valid: ${describeIssues(r.error.issues)}`);
    const { sessionId, reason } = r.data;
    return serial(sessionId, async () => {
      await ownSession(gateway, sessionId);
      await assertNotRevoked(gateway);
      void touch(gateway.id);
      const before = await abortSession(db, config, sessionId, reason);
      if (before.status === "ended")
        throw new StreamRefusal(
          "session-closed",
          before.capture_id === null
            ? `Stream session ${sessionId} has ended (its capture was since deleted); there is nothing to abort.`
            : `Stream session ${sessionId} has ended as capture ${before.capture_id}; it cannot be aborted (the capture stays; delete it in Barhound if it is not wanted).`,
          { captureId: before.capture_id, reason: closedReason(before) },
        );
      return before.status === "aborted" ? { sessionId, status: "aborted", alreadyAborted: true } : { sessionId, status: "aborted" };
    });
  }

  return { nsp, close: () => clearInterval(sweeper) };
}

const KNOWN_EVENTS = new Set(["begin", "chunk", "end", "abort"]);

function toBuffer(data: Buffer | ArrayBuffer | ArrayBufferView): Buffer {
  if (Buffer.isBuffer(data)) return data;
  if (data instanceof ArrayBuffer) return Buffer.from(data);
  return Buffer.from(data.buffer, data.byteOffset, data.byteLength);
}

/** "512 MiB", "2.5 MiB" or "3 KiB", for messages (UPLOAD_LIMIT_MB counts MiB). */
function megabytes(bytes: number): string {
  if (bytes < 1024 * 1024) return `${Math.round(bytes / 1024)} KiB`;
  const mb = bytes / (1024 * 1024);
  return `${mb >= 10 ? Math.round(mb) : Number(mb.toPrecision(2))} MiB`;
}

function describeIssues(issues: { path: PropertyKey[]; message: string }[]): string {
  return issues
    .slice(0, 4)
    .map((i) => (i.path.length ? `${i.path.map(String).join(".")}: ${i.message}` : i.message))
    .join("; ");
}
