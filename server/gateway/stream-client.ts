// A gateway-side client for the stream protocol (./protocol.ts): what the command-line gateway runs, and what the
// tests drive. It sends a capture's frames in numbered chunks with a few in flight, and when the connection drops it
// reconnects, resumes the session (begin with resumeSessionId) and goes on from the chunk the server asks for.
//
// A gateway that was restarted passes the session it saved (`resumeSessionId`, with the same chunk size): the server's
// answer says where it stands, and the stream goes on from there, or, when the server cannot resume it (abandoned,
// another gateway's, a different layout), `onResumeRefused` is told and a new session is begun. A gateway that starts
// over instead (the file changed) passes the session it gives up (`abortSessionId`): it is aborted on the server
// before the new one is begun, so its frames do not wait for the 48 h sweep.

import { io, type Socket } from "socket.io-client";
import {
  GATEWAY_NAMESPACE,
  frameBytes,
  isAckError,
  type AbortAck,
  type Ack,
  type BeginAck,
  type ChunkAck,
  type EndAck,
  type SampleFormat,
  type StreamChannel,
  type ConnectRefusal,
  type StreamError,
  type StreamErrorReasonOf,
} from "./protocol.ts";

export interface StreamCaptureOptions {
  /** Server base URL, e.g. http://localhost:5180. */
  url: string;
  token: string;
  assetId: number;
  measurementPointId?: number;
  sampleRate: number;
  channels: StreamChannel[];
  sampleFormat: SampleFormat;
  /** Interleaved frames, little-endian. */
  frames: Uint8Array;
  takenAt?: string;
  /** Chunk size in bytes, rounded down to whole frames (default 64 KiB). A resumed session needs the size it began with. */
  chunkBytes?: number;
  /** A session begun by an earlier run of the gateway (saved state): resume it instead of beginning a new one. */
  resumeSessionId?: string;
  /**
   * The server cannot resume `resumeSessionId` (unknown to this gateway, abandoned, ended with its capture deleted, or
   * its stored bytes do not fit this capture's chunks): told why, then a new session is begun on the same connection.
   */
  onResumeRefused?: (error: StreamError) => void;
  /**
   * A session of an earlier run that this gateway will not finish (it starts over): sent "abort" before the new session
   * is begun. Whatever the answer, the stream goes on; `onAbort` is told how it went.
   */
  abortSessionId?: string;
  /** Kept with the aborted session on the server ("the file changed"). */
  abortReason?: string;
  onAbort?: (outcome: AbortOutcome) => void;
  /** How long to wait for the abort's ack before taking the server for one without "abort" (default 5 s). */
  abortTimeoutMs?: number;
  /** Told each begin answer before any chunk is sent (awaited: a gateway saves the session id here). */
  onBegin?: (p: { sessionId: string; nextSeq: number; resumed: boolean; chunkBytes: number; totalChunks: number }) => void | Promise<void>;
  /** Chunks sent before waiting for the oldest ack (default 4). */
  window?: number;
  /** Reconnect attempts after a dropped connection before giving up (default 10). */
  retries?: number;
  retryDelayMs?: number;
  /** How long to wait for an ack before treating the connection as dead (default 30 s). */
  ackTimeoutMs?: number;
  /** After each acknowledged chunk; awaited, so a slow callback slows the stream. */
  onProgress?: (p: { ackedBytes: number; totalBytes: number; seq: number; totalChunks: number }) => void | Promise<void>;
  /** Told about each reconnect; `error` is what broke the previous connection. */
  onRetry?: (p: { attempt: number; error: Error }) => void;
  /** Test hook: called after each ack with a function that cuts the connection the way a network fault would. */
  onChunkAck?: (seq: number, cut: () => void) => void;
}

export interface StreamCaptureResult {
  captureId: number;
  status: string;
  sessionId: string;
  totalChunks: number;
  /** nextSeq the server gave on each resume after a dropped connection. */
  resumedAt: number[];
  /** nextSeq the server gave when `resumeSessionId` was resumed; undefined when a new session was begun. */
  restartedAt?: number;
  /** `resumeSessionId` had already ended on the server: nothing was sent, the capture is the one it became. */
  alreadyEnded?: boolean;
}

/** How an abort of `abortSessionId` went. */
export type AbortOutcome =
  | { sessionId: string; result: "aborted" | "already-aborted" }
  /** An older server without "abort" (it said the event is unknown, or did not answer): the session is left to its sweep. */
  | { sessionId: string; result: "unsupported"; detail: string }
  /**
   * Refused: another gateway's or a removed session ("unknown-session"), or one that ended ("session-closed" with reason
   * "ended" and its captureId, or "ended-capture-deleted").
   */
  | { sessionId: string; result: "refused"; error: StreamError };

/** The server refused something; retrying the same thing will not help. */
export class StreamRefused extends Error {
  constructor(public error: StreamError) {
    super(error.message);
    this.name = "StreamRefused";
  }
}

/** The connection broke or went silent; reconnecting may help. */
class ConnectionLost extends Error {}

export async function streamCapture(opts: StreamCaptureOptions): Promise<StreamCaptureResult> {
  const fb = frameBytes(opts.channels.length, opts.sampleFormat);
  if (opts.frames.length === 0 || opts.frames.length % fb !== 0)
    throw new RangeError(`The frames hold ${opts.frames.length} bytes, not a whole, non-zero number of ${fb}-byte frames.`);
  const chunkBytes = Math.max(fb, Math.floor((opts.chunkBytes ?? 64 * 1024) / fb) * fb);
  const totalChunks = Math.ceil(opts.frames.length / chunkBytes);
  const chunkAt = (seq: number) => opts.frames.subarray(seq * chunkBytes, Math.min((seq + 1) * chunkBytes, opts.frames.length));
  const retries = opts.retries ?? 10;
  const resumedAt: number[] = [];
  let sessionId: string | undefined = opts.resumeSessionId;
  // True until the server has answered the resume of the saved session; its refusal then means "begin anew".
  let restartPending = sessionId !== undefined;
  let restartedAt: number | undefined;
  let abortPending = opts.abortSessionId !== undefined;

  for (let attempt = 0; ; attempt++) {
    const socket = io(opts.url.replace(/\/+$/, "") + GATEWAY_NAMESPACE, {
      auth: { token: opts.token },
      transports: ["websocket"],
      reconnection: false, // this loop reconnects, so it can resume the session first
      forceNew: true,
    });
    try {
      await connected(socket);
      const req = requester(socket, opts.ackTimeoutMs ?? 30_000);
      const begin = (resumeSessionId: string | undefined) =>
        req<BeginAck>("begin", {
          assetId: opts.assetId,
          ...(opts.measurementPointId !== undefined ? { measurementPointId: opts.measurementPointId } : {}),
          sampleRate: opts.sampleRate,
          channels: opts.channels,
          sampleFormat: opts.sampleFormat,
          ...(opts.takenAt ? { takenAt: opts.takenAt } : {}),
          ...(resumeSessionId ? { resumeSessionId } : {}),
        });
      if (abortPending) {
        const outcome = await abortOld(socket, opts.abortSessionId!, opts.abortReason, opts.abortTimeoutMs ?? 5000);
        abortPending = false;
        opts.onAbort?.(outcome);
      }
      let began: BeginAck;
      let ended: EndAck | null = null;
      if (restartPending) {
        const found = await resumeSaved(req, begin, sessionId!, opts.frames.length, chunkBytes, totalChunks);
        restartPending = false;
        if ("refused" in found) {
          opts.onResumeRefused?.(found.refused);
          sessionId = undefined; // a reconnect from here begins anew too
          began = await begin(undefined);
        } else {
          began = found.began;
          ended = found.ended;
          restartedAt = began.nextSeq;
        }
      } else {
        began = await begin(sessionId);
        if (sessionId) resumedAt.push(began.nextSeq);
      }
      const resumed = began.sessionId === sessionId;
      sessionId = began.sessionId;
      if (ended) return { captureId: ended.captureId, status: ended.status, sessionId, totalChunks, resumedAt, restartedAt, alreadyEnded: true };
      await opts.onBegin?.({ sessionId, nextSeq: began.nextSeq, resumed, chunkBytes, totalChunks });

      const cut = () => socket.io.engine?.close();
      const window = Math.max(1, opts.window ?? 4);
      const inflight: { seq: number; ack: Promise<ChunkAck> }[] = [];
      let next = began.nextSeq;
      let acked = began.nextSeq;
      while (acked < totalChunks) {
        while (next < totalChunks && inflight.length < window) {
          const ack = req<ChunkAck>("chunk", { sessionId, seq: next, data: chunkAt(next) });
          ack.catch(() => {}); // awaited in order below; this only keeps a later failure from being "unhandled"
          inflight.push({ seq: next, ack });
          next++;
        }
        const head = inflight.shift()!;
        await head.ack;
        acked = head.seq + 1;
        await opts.onProgress?.({ ackedBytes: Math.min(acked * chunkBytes, opts.frames.length), totalBytes: opts.frames.length, seq: head.seq, totalChunks });
        opts.onChunkAck?.(head.seq, cut);
      }
      const done = await req<EndAck>("end", { sessionId, totalChunks });
      return { captureId: done.captureId, status: done.status, sessionId, totalChunks, resumedAt, ...(restartedAt !== undefined ? { restartedAt } : {}) };
    } catch (err) {
      if (err instanceof StreamRefused) {
        // A gap means the server lost track of chunks it acknowledged (e.g. its disk was restored): resume from nextSeq.
        if (err.error.code !== "gap" && err.error.code !== "server") throw err;
      } else if (!(err instanceof ConnectionLost)) throw err;
      if (attempt >= retries) throw new Error(`Gave up after ${retries} reconnect attempts: ${(err as Error).message}`);
      opts.onRetry?.({ attempt: attempt + 1, error: err as Error });
      await sleep((opts.retryDelayMs ?? 1000) * Math.min(8, 2 ** attempt));
    } finally {
      socket.removeAllListeners();
      socket.disconnect();
    }
  }
}

/** Refusals of a saved session after which a new session is the way on (anything else is final or worth a retry). */
const RESUME_REFUSALS = new Set<StreamError["code"]>(["unknown-session", "session-closed", "resume-mismatch"]);

/**
 * Resume a session saved by an earlier run: the server's answer is the truth about where the stream stands. An ended
 * session is re-acknowledged with "end" (its capture); an open one must hold exactly `nextSeq` chunks of this size.
 */
async function resumeSaved(
  req: ReturnType<typeof requester>,
  begin: (resumeSessionId: string) => Promise<BeginAck>,
  sessionId: string,
  totalBytes: number,
  chunkBytes: number,
  totalChunks: number,
): Promise<{ began: BeginAck; ended: EndAck | null } | { refused: StreamError }> {
  const refusedBy = (err: unknown) => (err instanceof StreamRefused && RESUME_REFUSALS.has(err.error.code) ? { refused: err.error } : null);
  let began: BeginAck;
  try {
    began = await begin(sessionId);
  } catch (err) {
    const r = refusedBy(err);
    if (r) return r;
    throw err;
  }
  // An older server does not say; then the offset cannot be checked and an ended session is found by "end" as before.
  if (began.bytesReceived !== undefined) {
    const expected = began.status === "ended" ? totalBytes : Math.min(began.nextSeq * chunkBytes, totalBytes);
    if (began.nextSeq > totalChunks || began.bytesReceived !== expected)
      return {
        refused: {
          code: "resume-mismatch",
          sessionId,
          message:
            `Stream session ${sessionId} holds ${began.bytesReceived} bytes in ${began.nextSeq} chunk(s), which does not fit this capture ` +
            `(${totalBytes} bytes in chunks of ${chunkBytes} bytes).`,
        },
      };
  }
  if (began.status !== "ended") return { began, ended: null };
  try {
    return { began, ended: await req<EndAck>("end", { sessionId, totalChunks: began.nextSeq }) };
  } catch (err) {
    const r = refusedBy(err); // ended, but its capture was deleted
    if (r) return r;
    throw err;
  }
}

/**
 * Send "abort" for a session this gateway gives up. Not through `requester`: its timeout means an older server that
 * ignores the event, not a dead connection, so it must not close the socket. A revoked token is final, as for begin.
 */
function abortOld(socket: Socket, sessionId: string, reason: string | undefined, timeoutMs: number): Promise<AbortOutcome> {
  return new Promise((resolve, reject) => {
    socket.timeout(timeoutMs).emit("abort", { sessionId, ...(reason ? { reason } : {}) }, (err: Error | null, answer: Ack<AbortAck>) => {
      if (err) {
        if (!socket.connected) return reject(new ConnectionLost(`Connection lost while abandoning stream ${sessionId}.`));
        return resolve({ sessionId, result: "unsupported", detail: `no answer to "abort" within ${timeoutMs / 1000} s` });
      }
      if (!isAckError(answer)) return resolve({ sessionId, result: answer.alreadyAborted ? "already-aborted" : "aborted" });
      if (answer.error.code === "unknown-event") return resolve({ sessionId, result: "unsupported", detail: answer.error.message });
      if (answer.error.code === "revoked") return reject(new StreamRefused(answer.error));
      resolve({ sessionId, result: "refused", error: answer.error });
    });
  });
}

/**
 * Abort one session on a connection of its own: for a gateway that gives a stream up after `streamCapture` stopped
 * (the server refused it as "stream-too-large", say), so the server drops its frames now rather than at its sweep.
 * Rejects when the server cannot be reached or the token is refused; otherwise resolves with how the abort went.
 */
export async function abortStream(opts: { url: string; token: string; sessionId: string; reason?: string; timeoutMs?: number }): Promise<AbortOutcome> {
  const socket = io(opts.url.replace(/\/+$/, "") + GATEWAY_NAMESPACE, { auth: { token: opts.token }, transports: ["websocket"], reconnection: false, forceNew: true });
  try {
    await connected(socket);
    return await abortOld(socket, opts.sessionId, opts.reason, opts.timeoutMs ?? 5000);
  } finally {
    socket.removeAllListeners();
    socket.disconnect();
  }
}

/** connect_error data.reason → the error code a gateway acts on (an older server gives no reason). */
const REFUSAL_CODES: Record<ConnectRefusal, StreamError["code"]> = {
  "missing-token": "unknown-token",
  "malformed-token": "unknown-token",
  "unknown-token": "unknown-token",
  revoked: "revoked",
};

function connected(socket: Socket): Promise<void> {
  return new Promise((resolve, reject) => {
    socket.once("connect", () => resolve());
    socket.once("connect_error", (err: Error & { data?: { code?: string; reason?: string } }) => {
      // A refused token is final; a server that is down or restarting is worth another try.
      if (err.data?.code === "unauthorized") {
        const reason = err.data.reason as ConnectRefusal | undefined;
        const code = reason && Object.hasOwn(REFUSAL_CODES, reason) ? REFUSAL_CODES[reason] : "unauthorized";
        // The server's reason stays as the case of "unknown-token" (only missing-, malformed- and unknown-token map to it).
        const refused: StreamError = { code, ...(code === "unknown-token" ? { reason: reason as StreamErrorReasonOf<"unknown-token"> } : {}), message: err.message };
        reject(new StreamRefused(refused));
      } else reject(new ConnectionLost(`Could not connect to the server (${err.message})`));
    });
  });
}

/** emit-with-ack that fails fast when the connection drops, and turns an error ack into StreamRefused. */
function requester(socket: Socket, timeoutMs: number) {
  let lost: ConnectionLost | null = null;
  const waiting = new Set<(e: Error) => void>();
  socket.on("disconnect", (reason) => {
    lost = new ConnectionLost(`Connection lost (${reason}).`);
    for (const fail of waiting) fail(lost);
    waiting.clear();
  });
  return <T>(event: string, payload: unknown): Promise<T> =>
    new Promise<T>((resolve, reject) => {
      if (lost) return reject(lost);
      const fail = (e: Error) => {
        clearTimeout(timer);
        reject(e);
      };
      const timer = setTimeout(() => {
        waiting.delete(fail);
        reject(new ConnectionLost(`No answer to "${event}" within ${timeoutMs / 1000} s.`));
        socket.io.engine?.close();
      }, timeoutMs);
      waiting.add(fail);
      socket.emit(event, payload, (answer: Ack<T>) => {
        clearTimeout(timer);
        waiting.delete(fail);
        if (isAckError(answer)) reject(new StreamRefused(answer.error));
        else resolve(answer);
      });
    });
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
