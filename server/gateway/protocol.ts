// The gateway stream protocol, shared by the server namespace and the command-line gateway.
// Pure module (zod only): no database, no socket.io, so a gateway written in TypeScript can import it.
//
// Namespace "/gateway", handshake `auth: { token: "bhg_<prefix>_<secret>" }`. Every request carries a
// socket.io acknowledgement callback:
//
//   begin { assetId, measurementPointId?, sampleRate, channels, sampleFormat, takenAt?, resumeSessionId? }
//     → { sessionId, nextSeq }                      nextSeq = 0 for a new session, the next chunk to send on resume
//     → { sessionId, nextSeq, status, bytesReceived, captureId }   on resume: where the server stands ("where am I"),
//                                                   so a gateway restarted from a saved state can check the offset and
//                                                   see a stream that already ended (captureId) before sending anything
//   chunk { sessionId, seq, data }                  data: the interleaved frames, little-endian, whole frames only, f32le
//     → { seq, duplicate? }                         samples finite; the stream at most `limitBytes` in all
//                                                   duplicate: this chunk was already stored, it was not appended again
//                                                   A refused chunk is not stored and next_seq does not move: the same
//                                                   seq may be sent again (corrected), or the stream ended before it.
//   end { sessionId, totalChunks }
//     → { captureId, status }                       the capture is queued for analysis like an upload
//   abort { sessionId, reason? }                    the gateway will not finish this open session: its stored frames are
//     → { sessionId, status: "aborted", alreadyAborted? }   deleted and it cannot be resumed (optional: older servers lack it)
//
// When a request is refused the server emits `stream:error { code, reason?, message, sessionId?, seq?, nextSeq? }`
// and answers the acknowledgement with `{ error: { code, reason?, message, nextSeq? } }`, so a gateway waiting on the
// ack is never left hanging; an event the server does not know is answered with code "unknown-event". `code` and
// `reason` (STREAM_ERROR_REASONS: which case of a code that covers several) are what a gateway decides on; `message`
// is for people and may be reworded at any time.
//
// A refused handshake is a connect_error with `data: { code: "unauthorized", reason }`, reason one of
// CONNECT_REFUSALS (older servers send no reason).

import { z } from "zod";

export const GATEWAY_NAMESPACE = "/gateway";

export const SAMPLE_FORMATS = ["f32le", "i16le", "i32le"] as const;
export type SampleFormat = (typeof SAMPLE_FORMATS)[number];

export const BYTES_PER_SAMPLE: Record<SampleFormat, number> = { f32le: 4, i16le: 2, i32le: 4 };

/** Largest chunk the server takes; the socket.io buffer limit is set above this (server/realtime.ts). */
export const MAX_CHUNK_BYTES = 2 * 1024 * 1024;

export const CHANNEL_KINDS = ["current", "vibration", "voltage", "other"] as const;

export const streamChannel = z.object({
  name: z.string().trim().min(1, "Give every channel a name.").max(60),
  kind: z.enum(CHANNEL_KINDS, { message: `Channel kind must be one of ${CHANNEL_KINDS.join(", ")}.` }),
  unit: z.string().trim().min(1, "Give every channel its unit, e.g. A or m/s2.").max(12),
  /** Current phase (A/B/C) or vibration axis (H/V/A), when known. */
  position: z.string().trim().max(10).optional(),
  /** Engineering units per count, for integer sample formats (default 1). Ignored for f32le. */
  scale: z.number().positive().finite().optional(),
});
export type StreamChannel = z.infer<typeof streamChannel>;

export const beginMessage = z.object({
  assetId: z.number().int().positive(),
  measurementPointId: z.number().int().positive().optional(),
  // The WAV the stream is assembled into stores the rate in whole Hz.
  sampleRate: z.number().int("The sample rate must be a whole number of Hz.").min(100, "The sample rate must be at least 100 Hz.").max(1_000_000),
  channels: z.array(streamChannel).min(1, "Describe at least one channel.").max(32),
  sampleFormat: z.enum(SAMPLE_FORMATS, { message: `sampleFormat must be one of ${SAMPLE_FORMATS.join(", ")}.` }),
  takenAt: z.iso.datetime({ offset: true, message: "takenAt must be an ISO 8601 date-time, e.g. 2026-12-01T08:30:00Z." }).optional(),
  resumeSessionId: z.uuid("resumeSessionId must be the sessionId the server gave for the stream.").optional(),
});
export type BeginMessage = z.infer<typeof beginMessage>;

export const chunkMessage = z.object({
  sessionId: z.uuid(),
  seq: z.number().int().min(0),
  // socket.io delivers binary attachments as Buffer in Node; a browser or another client may send an ArrayBuffer
  // or typed array, which the handler normalises.
  data: z.custom<Buffer | ArrayBuffer | ArrayBufferView>(
    (v) => Buffer.isBuffer(v) || v instanceof ArrayBuffer || ArrayBuffer.isView(v),
    "data must be binary (the interleaved frames).",
  ),
});
export type ChunkMessage = z.infer<typeof chunkMessage>;

export const endMessage = z.object({
  sessionId: z.uuid(),
  totalChunks: z.number().int().min(0),
});
export type EndMessage = z.infer<typeof endMessage>;

export const abortMessage = z.object({
  sessionId: z.uuid("sessionId must be the sessionId the server gave for the stream."),
  /** Why the gateway gives the stream up ("the file changed"), kept with the session. */
  reason: z.string().trim().max(200, "The abort reason may be at most 200 characters.").optional(),
});
export type AbortMessage = z.infer<typeof abortMessage>;

/** Why a handshake was refused: connect_error `data.reason` (data.code stays "unauthorized" for older clients). */
export const CONNECT_REFUSALS = ["missing-token", "malformed-token", "unknown-token", "revoked"] as const;
export type ConnectRefusal = (typeof CONNECT_REFUSALS)[number];

export type StreamErrorCode =
  | "bad-request"
  | "unknown-session"
  | "session-closed"
  | "resume-mismatch"
  | "unknown-asset"
  | "wrong-site"
  | "gap"
  | "bad-frame"
  | "chunk-too-large"
  /** The chunk would take the stream past the server's size limit (`limitBytes`): the gateway ends the stream (or aborts). */
  | "stream-too-large"
  | "incomplete"
  | "empty"
  | "revoked"
  /** At connect: the token is missing, malformed or not one the server knows (check the token). */
  | "unknown-token"
  /** At connect, from an older server that does not say why the token was refused. */
  | "unauthorized"
  /** The server does not handle this event (an older server, or a typo in the event name). */
  | "unknown-event"
  | "busy"
  | "server";

/**
 * Which case a refusal is, for the codes that cover several (like connect_error `data.reason` beside `data.code`);
 * a gateway decides on `code`, then on `reason`, never on the words of `message`. Older servers send no `reason`.
 */
export const STREAM_ERROR_REASONS = {
  "session-closed": [
    /** The gateway sent "abort" for it (this run or an earlier one): its frames are deleted. */
    "aborted-by-gateway",
    /** Untouched for 48 h, the server's sweep gave it up: its frames are deleted. */
    "aborted-by-sweep",
    /** It ended as a capture (`captureId`), which stays. */
    "ended",
    /** It ended as a capture that has since been deleted (`captureId` null). */
    "ended-capture-deleted",
  ],
  "unknown-asset": [
    /** No motor with that assetId. */
    "unknown-motor",
    /** The measurementPointId is not one of the motor's points. */
    "unknown-point",
  ],
  "bad-frame": [
    /** The chunk holds no bytes. */
    "empty-chunk",
    /** The chunk's length is not a whole number of frames. */
    "partial-frame",
    /** A float sample (f32le) is NaN or ±Infinity: `frame` and `channel` name the first one within the chunk. */
    "non-finite-sample",
  ],
  /** At connect (stream-client.ts): connect_error `data.reason` of a token to check. */
  "unknown-token": ["missing-token", "malformed-token", "unknown-token"],
} as const satisfies Partial<Record<StreamErrorCode, readonly string[]>>;

type CodesWithReasons = keyof typeof STREAM_ERROR_REASONS;
/** The reasons a refusal with code C may carry (never, for a code with one case). */
export type StreamErrorReasonOf<C extends StreamErrorCode> = C extends CodesWithReasons ? (typeof STREAM_ERROR_REASONS)[C][number] : never;
export type StreamErrorReason = StreamErrorReasonOf<StreamErrorCode>;
export type SessionClosedReason = StreamErrorReasonOf<"session-closed">;

export interface StreamError {
  code: StreamErrorCode;
  /** Which case of `code` this is, for the codes in STREAM_ERROR_REASONS (older servers leave it out). */
  reason?: StreamErrorReason;
  message: string;
  sessionId?: string;
  seq?: number;
  /** The chunk the server expects next, when that helps the gateway recover. */
  nextSeq?: number;
  /** The capture an ended session became (an abort of it is refused: the capture exists). */
  captureId?: number | null;
  /** "bad-frame" / "non-finite-sample": the first such sample's frame within the chunk (0-based) … */
  frame?: number;
  /** … and its channel (0-based, in the order of begin's `channels`). */
  channel?: number;
  /** "stream-too-large": the most frame bytes a stream session may hold on this server … */
  limitBytes?: number;
  /** … and how many the session holds (the refused chunk not counted). */
  bytesReceived?: number;
}

export interface BeginAck {
  sessionId: string;
  nextSeq: number;
  /** Only in the answer to a resume (older servers leave these out): the session's state on the server. */
  status?: "open" | "ended";
  /** Frames stored so far, in bytes (resume only): a gateway checks that nextSeq chunks of its size make this. */
  bytesReceived?: number;
  /** The capture an ended session became (resume only); null while open, or when that capture was deleted. */
  captureId?: number | null;
}
export interface ChunkAck {
  seq: number;
  duplicate?: boolean;
}
export interface EndAck {
  captureId: number;
  status: string;
}
export interface AbortAck {
  sessionId: string;
  status: "aborted";
  /** The session had already been abandoned (by an earlier abort or the server's sweep); nothing more was deleted. */
  alreadyAborted?: boolean;
}
export type Ack<T> = T | { error: StreamError };

export function isAckError<T>(ack: Ack<T>): ack is { error: StreamError } {
  return typeof ack === "object" && ack !== null && "error" in ack;
}

export function frameBytes(channelCount: number, format: SampleFormat): number {
  return channelCount * BYTES_PER_SAMPLE[format];
}

/** Sample formats that can hold NaN or ±Infinity (integer counts cannot). */
export const FLOAT_FORMATS: ReadonlySet<SampleFormat> = new Set(["f32le"]);

const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/**
 * The first NaN or ±Infinity sample of interleaved f32le frames (whole frames), or null when every sample is finite:
 * its frame and channel (0-based) and its value. A Float32Array view over the bytes (copied when they do not start on
 * a 4-byte boundary), so a 2 MiB chunk takes well under a millisecond.
 */
export function findNonFiniteSample(frames: Uint8Array, channelCount: number): { frame: number; channel: number; value: number } | null {
  const n = frames.byteLength >>> 2;
  if (!LITTLE_ENDIAN) {
    const view = new DataView(frames.buffer, frames.byteOffset, frames.byteLength);
    for (let i = 0; i < n; i++) {
      const v = view.getFloat32(i * 4, true);
      if (v - v !== 0) return { frame: Math.floor(i / channelCount), channel: i % channelCount, value: v };
    }
    return null;
  }
  const samples = frames.byteOffset % 4 === 0 ? new Float32Array(frames.buffer, frames.byteOffset, n) : new Float32Array(new Uint8Array(frames.subarray(0, n * 4)).buffer);
  for (let i = 0; i < n; i++) {
    const v = samples[i];
    // v - v is 0 for every finite number, NaN for NaN and ±Infinity.
    if (v - v !== 0) return { frame: Math.floor(i / channelCount), channel: i % channelCount, value: v };
  }
  return null;
}
