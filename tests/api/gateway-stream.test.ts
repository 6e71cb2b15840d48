import { afterAll, beforeAll, describe, expect, it } from "vitest";
import crypto from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { io as ioClient, type Socket } from "socket.io-client";
import { makeTestEnv, signedIn, type TestEnv } from "../helpers/context.ts";
import { insertMotor, nextEvent, sleep, startTestServer, type TestServer } from "../helpers/realtime.ts";
import { runGatewayCli, startGatewayCli } from "../helpers/gateway-cli.ts";
import { createFsBlobStore } from "../../server/blob/fs.ts";
import type { BlobStore } from "../../server/blob/index.ts";
import type { AnalysisJobData, CaptureQueue } from "../../server/queue.ts";
import { parseCapture, writeCsv, writeWav } from "../../src/engine/parse/index.ts";
import type { Capture } from "../../src/engine/types.ts";
import { captureToF32Frames, framesToWav, type StreamLayout } from "../../server/gateway/assemble.ts";
import http from "node:http";
import { Server as IoServer } from "socket.io";
import { streamCapture, StreamRefused, type AbortOutcome } from "../../server/gateway/stream-client.ts";
import { abandonStaleSessions, partPath } from "../../server/gateway/session-store.ts";
import {
  MAX_CHUNK_BYTES,
  STREAM_ERROR_REASONS,
  findNonFiniteSample,
  type StreamChannel,
  type StreamError,
  type StreamErrorCode,
  type StreamErrorReason,
} from "../../server/gateway/protocol.ts";

const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "bh-gateway-"));
const jobs: AnalysisJobData[] = [];
let env: TestEnv;
let server: TestServer;
let blob: BlobStore;
let motor: Awaited<ReturnType<typeof insertMotor>>;
let otherSiteMotor: Awaited<ReturnType<typeof insertMotor>>;
let token: string;
let gatewayId: number;
const sockets: Socket[] = [];

const CHANNELS = [
  { name: "Ia", kind: "current" as const, unit: "A", position: "A" },
  { name: "Ib", kind: "current" as const, unit: "A", position: "B" },
  { name: "Ic", kind: "current" as const, unit: "A", position: "C" },
];

/** Three phase currents, 50 Hz with a little noise, 10 kHz, 1.5 s. */
function syntheticCapture(seconds = 1.5, rate = 10_000, amplitude = 42): Capture {
  const n = Math.round(seconds * rate);
  let seed = 12345;
  const noise = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31 - 0.5) * 0.05;
  return {
    sampleRate: rate,
    channels: CHANNELS.map((c, k) => {
      const data = new Float64Array(n);
      for (let i = 0; i < n; i++) data[i] = amplitude * Math.sin(2 * Math.PI * 50 * (i / rate) - (2 * Math.PI * k) / 3) + noise();
      return { ...c, data };
    }),
  };
}

async function newGateway(name: string, siteId = motor.siteId) {
  const admin = await signedIn(env.app, "admin");
  const res = await admin.post("/api/gateways").send({ name, siteId });
  expect(res.status).toBe(201);
  return res.body as { id: number; token: string };
}

function rawGateway(tok: string | undefined): Promise<Socket> {
  const socket = ioClient(`${server.url}/gateway`, { auth: tok === undefined ? {} : { token: tok }, transports: ["websocket"], reconnection: false, forceNew: true });
  sockets.push(socket);
  return new Promise((resolve, reject) => {
    socket.once("connect", () => resolve(socket));
    socket.once("connect_error", reject);
  });
}

/**
 * The refusal in an ack: its code and its reason (one the protocol declares for that code, or none for a code with one
 * case). The gateway decides on these two only, so every refusal case is pinned here, not by its words.
 */
function refusal(answer: { error?: StreamError }, code: StreamErrorCode, reason?: StreamErrorReason): StreamError {
  expect(answer.error, JSON.stringify(answer)).toMatchObject({ code, message: expect.any(String) });
  if (reason === undefined) expect(answer.error).not.toHaveProperty("reason");
  else {
    expect(answer.error!.reason).toBe(reason);
    expect(STREAM_ERROR_REASONS[code as keyof typeof STREAM_ERROR_REASONS] as readonly string[]).toContain(reason);
  }
  return answer.error!;
}

const f32 = (...values: number[]) => Buffer.from(new Float32Array(values).buffer);
const frames3 = (start: number, count: number) => f32(...Array.from({ length: count * 3 }, (_, i) => start + i));

async function storedCapture(captureId: number) {
  const row = await env.db("captures").where({ id: captureId }).first();
  return { row, capture: parseCapture(await blob.get(row.blob_key), { fileName: row.file_name }) };
}

beforeAll(async () => {
  env = await makeTestEnv({ dataDir }, (ctx) => {
    blob = createFsBlobStore(path.join(dataDir, "blobs"));
    ctx.services.blob = blob;
    // The analysis itself is not under test: a queue that only records the jobs it was given.
    ctx.services.queue = { sendAnalyses: async (ds: AnalysisJobData[]) => void jobs.push(...ds) } as unknown as CaptureQueue;
  });
  motor = await insertMotor(env.db, "gs");
  otherSiteMotor = await insertMotor(env.db, "go");
  server = await startTestServer(env);
  ({ token, id: gatewayId } = await newGateway("Pump house gateway"));
});
afterAll(async () => {
  for (const s of sockets) s.close();
  await server?.close();
  await env?.close();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

describe("streamed captures", () => {
  it.each([1, 4])("a stream cut in the middle resumes from the last acknowledged chunk and yields one capture equal to the file (window %i)", async (window) => {
    const file = path.join(dataDir, "pump-7.wav");
    fs.writeFileSync(file, writeWav(syntheticCapture()));
    const fromFile = parseCapture(fs.readFileSync(file));
    const frames = captureToF32Frames(fromFile);
    let cut = false;
    const before = await env.db("captures").count("* as n").first();

    const result = await streamCapture({
      url: server.url,
      token,
      assetId: motor.assetId,
      measurementPointId: motor.pointId,
      sampleRate: fromFile.sampleRate,
      channels: CHANNELS,
      sampleFormat: "f32le",
      frames,
      takenAt: "2026-11-30T06:15:00Z",
      chunkBytes: 12_000, // 1000 frames: 15 chunks
      window,
      retryDelayMs: 20,
      onChunkAck: (seq, drop) => {
        if (seq === 6 && !cut) {
          cut = true;
          drop();
        }
      },
    });

    expect(result.totalChunks).toBe(15);
    // With one chunk in flight the server has exactly chunks 0–6; with more, it may have stored some unacknowledged ones.
    if (window === 1) expect(result.resumedAt).toEqual([7]);
    else {
      expect(result.resumedAt).toHaveLength(1);
      expect(result.resumedAt[0]).toBeGreaterThanOrEqual(7);
    }
    expect(result.status).toBe("queued");
    const after = await env.db("captures").count("* as n").first();
    expect(Number(after!.n) - Number(before!.n)).toBe(1);

    const { row, capture } = await storedCapture(result.captureId);
    expect(row).toMatchObject({ source: "stream", gateway_id: gatewayId, asset_id: motor.assetId, measurement_point_id: motor.pointId, format: "wav", sample_rate: 10_000 });
    expect(new Date(row.taken_at).toISOString()).toBe("2026-11-30T06:15:00.000Z");
    expect(capture.sampleRate).toBe(fromFile.sampleRate);
    expect(capture.channels.map((c) => [c.name, c.kind, c.unit, c.position])).toEqual(CHANNELS.map((c) => [c.name, c.kind, c.unit, c.position]));
    // Same frames, sample for sample (both sides are float32 values).
    expect(captureToF32Frames(capture).equals(frames)).toBe(true);

    const session = await env.db("stream_sessions").where({ id: result.sessionId }).first();
    expect(session).toMatchObject({ status: "ended", capture_id: result.captureId, next_seq: 15 });
    expect(Number(session.bytes_received)).toBe(frames.length);
    expect(fs.existsSync(partPath(env.config, result.sessionId))).toBe(false);
    expect(jobs.filter((j) => j.captureId === result.captureId)).toHaveLength(1);
    expect((await env.db("gateways").where({ id: gatewayId }).first()).last_seen_at).toBeTruthy();
  });

  it("re-acknowledges a duplicate chunk without storing it twice; end is idempotent", async () => {
    const socket = await rawGateway(token);
    const begin = await socket.emitWithAck("begin", { assetId: motor.assetId, sampleRate: 1000, channels: CHANNELS, sampleFormat: "f32le" });
    expect(begin).toEqual({ sessionId: expect.any(String), nextSeq: 0 });
    const { sessionId } = begin;
    expect(await socket.emitWithAck("chunk", { sessionId, seq: 0, data: frames3(0, 10) })).toEqual({ seq: 0 });
    expect(await socket.emitWithAck("chunk", { sessionId, seq: 0, data: frames3(0, 10) })).toEqual({ seq: 0, duplicate: true });
    let row = await env.db("stream_sessions").where({ id: sessionId }).first();
    expect(row.next_seq).toBe(1);
    expect(Number(row.bytes_received)).toBe(120);
    expect(await socket.emitWithAck("chunk", { sessionId, seq: 1, data: frames3(30, 290) })).toEqual({ seq: 1 });
    expect(await socket.emitWithAck("chunk", { sessionId, seq: 0, data: frames3(0, 10) })).toEqual({ seq: 0, duplicate: true });
    const end = await socket.emitWithAck("end", { sessionId, totalChunks: 2 });
    expect(end).toEqual({ captureId: expect.any(Number), status: "queued" });
    // An "end" resent after a lost ack answers with the same capture.
    expect(await socket.emitWithAck("end", { sessionId, totalChunks: 2 })).toMatchObject({ captureId: end.captureId });
    expect(await env.db("captures").where({ gateway_id: gatewayId, id: end.captureId }).count("* as n").first()).toMatchObject({ n: "1" });
    row = await env.db("stream_sessions").where({ id: sessionId }).first();
    expect(Number(row.bytes_received)).toBe(3600);
    const { capture } = await storedCapture(end.captureId);
    expect(captureToF32Frames(capture).equals(frames3(0, 300))).toBe(true);
  });

  it("a resume answers where the server stands; a saved session that does not fit the chunks is replaced by a new one", async () => {
    const socket = await rawGateway(token);
    const base = { assetId: motor.assetId, sampleRate: 1000, channels: CHANNELS, sampleFormat: "f32le" };
    const { sessionId } = await socket.emitWithAck("begin", base);
    await socket.emitWithAck("chunk", { sessionId, seq: 0, data: frames3(0, 100) });
    await socket.emitWithAck("chunk", { sessionId, seq: 1, data: frames3(300, 100) });
    expect(await socket.emitWithAck("begin", { ...base, resumeSessionId: sessionId })).toEqual({ sessionId, nextSeq: 2, status: "open", bytesReceived: 2400, captureId: null });

    // A restarted gateway that asks with chunks of 70 frames: 2 chunks would be 1680 bytes, not the 2400 stored.
    const all = frames3(0, 300);
    const refusals: StreamError[] = [];
    const result = await streamCapture({
      url: server.url,
      token,
      ...base,
      sampleFormat: "f32le",
      frames: all,
      chunkBytes: 70 * 12,
      resumeSessionId: sessionId,
      onResumeRefused: (e) => refusals.push(e),
    });
    expect(refusals).toEqual([expect.objectContaining({ code: "resume-mismatch", message: expect.stringMatching(/holds 2400 bytes in 2 chunk\(s\)/) })]);
    expect(result.sessionId).not.toBe(sessionId);
    expect(result.restartedAt).toBeUndefined();
    expect(captureToF32Frames((await storedCapture(result.captureId)).capture).equals(all)).toBe(true);
    expect(await env.db("stream_sessions").where({ id: sessionId }).first()).toMatchObject({ status: "open", next_seq: 2 });

    // Resumed with the chunks it began with, the saved session goes on at chunk 2 and ends once.
    const resumed = await streamCapture({ url: server.url, token, ...base, sampleFormat: "f32le", frames: all, chunkBytes: 100 * 12, resumeSessionId: sessionId });
    expect(resumed).toMatchObject({ sessionId, restartedAt: 2, totalChunks: 3, resumedAt: [] });
    expect(resumed.alreadyEnded).toBeUndefined();
    const again = await streamCapture({ url: server.url, token, ...base, sampleFormat: "f32le", frames: all, chunkBytes: 100 * 12, resumeSessionId: sessionId });
    expect(again).toMatchObject({ sessionId, captureId: resumed.captureId, alreadyEnded: true });
    expect(await env.db("captures").where({ id: resumed.captureId }).count("* as n").first()).toMatchObject({ n: "1" });
    expect(captureToF32Frames((await storedCapture(resumed.captureId)).capture).equals(all)).toBe(true);
  });

  it("answers a gap and a chunk of partial frames with stream:error, storing neither", async () => {
    const socket = await rawGateway(token);
    const errors: StreamError[] = [];
    socket.on("stream:error", (e) => errors.push(e));
    const { sessionId } = await socket.emitWithAck("begin", { assetId: motor.assetId, sampleRate: 1000, channels: CHANNELS, sampleFormat: "f32le" });
    await socket.emitWithAck("chunk", { sessionId, seq: 0, data: frames3(0, 10) });

    const gap = await socket.emitWithAck("chunk", { sessionId, seq: 2, data: frames3(0, 10) });
    expect(refusal(gap, "gap")).toMatchObject({ sessionId, seq: 2, nextSeq: 1 });
    expect(gap.error.message).toMatch(/Chunk 2 arrived but chunk 1 is the next one expected/);

    const bad = await socket.emitWithAck("chunk", { sessionId, seq: 1, data: Buffer.alloc(13) });
    expect(refusal(bad, "bad-frame", "partial-frame")).toMatchObject({ sessionId, seq: 1 });
    expect(bad.error.message).toMatch(/Chunk 1 holds 13 bytes, which is not a whole number of frames.*3 channel\(s\) × 4 bytes \(f32le\) = 12 bytes/);

    const empty = await socket.emitWithAck("chunk", { sessionId, seq: 1, data: Buffer.alloc(0) });
    expect(refusal(empty, "bad-frame", "empty-chunk")).toMatchObject({ sessionId, seq: 1, message: expect.stringMatching(/Chunk 1 is empty/) });
    const huge = await socket.emitWithAck("chunk", { sessionId, seq: 1, data: Buffer.alloc(MAX_CHUNK_BYTES + 12) });
    expect(refusal(huge, "chunk-too-large")).toMatchObject({ sessionId, seq: 1 });

    const early = await socket.emitWithAck("end", { sessionId, totalChunks: 3 });
    expect(refusal(early, "incomplete")).toMatchObject({ nextSeq: 1 });
    await sleep(50);
    // The stream:error events carry the same code and reason as the acks.
    expect(errors.map((e) => [e.code, e.reason])).toEqual([
      ["gap", undefined],
      ["bad-frame", "partial-frame"],
      ["bad-frame", "empty-chunk"],
      ["chunk-too-large", undefined],
      ["incomplete", undefined],
    ]);
    const row = await env.db("stream_sessions").where({ id: sessionId }).first();
    expect(row).toMatchObject({ next_seq: 1, status: "open", capture_id: null });
    expect(Number(row.bytes_received)).toBe(120);
  });

  it("refuses a chunk holding NaN or ±Infinity, naming the sample; the same seq then takes the corrected chunk and ends as a capture", async () => {
    const socket = await rawGateway(token);
    const errors: StreamError[] = [];
    socket.on("stream:error", (e) => errors.push(e));
    const { sessionId } = await socket.emitWithAck("begin", { assetId: motor.assetId, sampleRate: 1000, channels: CHANNELS, sampleFormat: "f32le" });
    expect(await socket.emitWithAck("chunk", { sessionId, seq: 0, data: frames3(0, 100) })).toEqual({ seq: 0 });
    const good = frames3(300, 200);
    /** Chunk 1 with one sample replaced: frame `frame`, channel `ch` of the chunk. */
    const spoiled = (frame: number, ch: number, value: number) => {
      const b = Buffer.from(good);
      b.writeFloatLE(value, (frame * 3 + ch) * 4);
      return b;
    };

    const nan = await socket.emitWithAck("chunk", { sessionId, seq: 1, data: spoiled(4, 1, NaN) });
    expect(refusal(nan, "bad-frame", "non-finite-sample")).toMatchObject({ sessionId, seq: 1, nextSeq: 1, frame: 4, channel: 1 });
    // Chunk 0 held 100 frames, so frame 4 of chunk 1 is frame 104 of the stream.
    expect(nan.error.message).toMatch(/Chunk 1 holds a sample that is NaN rather than a finite number: frame 4 of the chunk, channel 1 \("Ib"\).*frame 104 of the stream/);
    const inf = await socket.emitWithAck("chunk", { sessionId, seq: 1, data: spoiled(0, 0, Infinity) });
    expect(refusal(inf, "bad-frame", "non-finite-sample")).toMatchObject({ seq: 1, nextSeq: 1, frame: 0, channel: 0 });
    expect(inf.error.message).toMatch(/is Infinity rather than a finite number: frame 0 of the chunk, channel 0 \("Ia"\)/);
    const negInf = await socket.emitWithAck("chunk", { sessionId, seq: 1, data: spoiled(199, 2, -Infinity) });
    expect(refusal(negInf, "bad-frame", "non-finite-sample")).toMatchObject({ frame: 199, channel: 2, message: expect.stringMatching(/-Infinity.*channel 2 \("Ic"\)/) });

    // Nothing of the refused chunks was stored: the session stands where it was.
    let row = await env.db("stream_sessions").where({ id: sessionId }).first();
    expect(row).toMatchObject({ next_seq: 1, status: "open" });
    expect(Number(row.bytes_received)).toBe(1200);
    expect(fs.statSync(partPath(env.config, sessionId)).size).toBe(1200);
    // An "end" now counts only the chunk stored.
    expect(refusal(await socket.emitWithAck("end", { sessionId, totalChunks: 2 }), "incomplete")).toMatchObject({ nextSeq: 1 });

    // The corrected chunk, with the same seq, is taken; the stream ends as a capture of what was stored.
    expect(await socket.emitWithAck("chunk", { sessionId, seq: 1, data: good })).toEqual({ seq: 1 });
    const end = await socket.emitWithAck("end", { sessionId, totalChunks: 2 });
    expect(end).toEqual({ captureId: expect.any(Number), status: "queued" });
    expect(captureToF32Frames((await storedCapture(end.captureId)).capture).equals(frames3(0, 300))).toBe(true);
    row = await env.db("stream_sessions").where({ id: sessionId }).first();
    expect(row).toMatchObject({ status: "ended", next_seq: 2, capture_id: end.captureId });
    await sleep(50);
    expect(errors.map((e) => [e.code, e.reason])).toEqual([
      ["bad-frame", "non-finite-sample"],
      ["bad-frame", "non-finite-sample"],
      ["bad-frame", "non-finite-sample"],
      ["incomplete", undefined],
    ]);

    // Integer counts cannot be NaN: bytes that would read as NaN in f32 are an ordinary i16 count (-1).
    const ints = await socket.emitWithAck("begin", { assetId: motor.assetId, sampleRate: 1000, channels: CHANNELS.slice(0, 2), sampleFormat: "i16le" });
    expect(await socket.emitWithAck("chunk", { sessionId: ints.sessionId, seq: 0, data: Buffer.alloc(4 * 100, 0xff) })).toEqual({ seq: 0 });
  });

  it("finds the first non-finite sample through an unaligned view as through an aligned one", () => {
    const samples = new Float32Array(3 * 1000).map((_, i) => i / 7);
    expect(findNonFiniteSample(new Uint8Array(samples.buffer), 3)).toBeNull();
    samples[3 * 517 + 2] = NaN;
    samples[3 * 900] = -Infinity;
    const aligned = new Uint8Array(samples.buffer);
    expect(findNonFiniteSample(aligned, 3)).toEqual({ frame: 517, channel: 2, value: NaN });
    // The same bytes starting at an odd offset of their buffer (socket.io may hand over such a Buffer).
    const holder = new Uint8Array(aligned.length + 1);
    holder.set(aligned, 1);
    const unaligned = holder.subarray(1);
    expect(unaligned.byteOffset % 4).toBe(1);
    expect(findNonFiniteSample(unaligned, 3)).toEqual({ frame: 517, channel: 2, value: NaN });
    expect(findNonFiniteSample(Buffer.from(holder.buffer, 1, aligned.length), 3)).toEqual({ frame: 517, channel: 2, value: NaN });
    samples[3 * 517 + 2] = 1;
    expect(findNonFiniteSample(aligned, 3)).toEqual({ frame: 900, channel: 0, value: -Infinity });
  });

  it("a long stream (several assembly blocks, chunks not aligned to them) ends as a WAV equal to the frames sent, in every sample format", async () => {
    // 3 channels × 4 bytes at 10 kHz for 30 s = 3.6 MB: assembled in 1 MiB blocks, sent in 300 000-byte chunks.
    const long = syntheticCapture(30, 10_000);
    const frames = captureToF32Frames(long);
    const result = await streamCapture({ url: server.url, token, assetId: motor.assetId, sampleRate: 10_000, channels: CHANNELS, sampleFormat: "f32le", frames, chunkBytes: 300_000 });
    expect(result.totalChunks).toBe(Math.ceil(frames.length / 300_000));
    const { row, capture } = await storedCapture(result.captureId);
    expect(row).toMatchObject({ sample_rate: 10_000, channel_count: 3 });
    expect(Number(row.duration_s)).toBeCloseTo(30, 9);
    expect(capture.channels[0].data.length).toBe(300_000);
    expect(captureToF32Frames(capture).equals(frames)).toBe(true);
    // Byte for byte what the in-memory writer makes of the same frames (header, channel description, data).
    const layout: StreamLayout = { sampleRate: 10_000, channels: CHANNELS, sampleFormat: "f32le" };
    const stored = await blob.get(row.blob_key);
    expect(Number(row.byte_size)).toBe(stored.length);
    expect(stored.equals(framesToWav(frames, layout))).toBe(true);

    // Integer counts are scaled into floats block by block: 2 × i16 (2.4 MB) and 1 × i32 (1.6 MB).
    const counts = (n: number, nCh: number, bytes: 2 | 4) => {
      const b = Buffer.alloc(n * nCh * bytes);
      for (let i = 0; i < n * nCh; i++) {
        const v = Math.round(Math.sin(i * 0.001) * (bytes === 2 ? 32767 : 2 ** 31 - 1));
        if (bytes === 2) b.writeInt16LE(v, i * 2);
        else b.writeInt32LE(v, i * 4);
      }
      return b;
    };
    const scaled: StreamChannel[] = [
      { name: "Ia", kind: "current", unit: "A", scale: 0.01 },
      { name: "acc", kind: "vibration", unit: "m/s2", position: "H", scale: 0.37 },
    ];
    for (const [format, channels, data] of [
      ["i16le", scaled, counts(600_000, 2, 2)],
      ["i32le", [{ ...scaled[0], scale: 1e-6 }], counts(400_000, 1, 4)],
    ] as const) {
      const r = await streamCapture({ url: server.url, token, assetId: motor.assetId, sampleRate: 20_000, channels: [...channels], sampleFormat: format, frames: data, chunkBytes: 256 * 1000 });
      const got = await storedCapture(r.captureId);
      expect((await blob.get(got.row.blob_key)).equals(framesToWav(data, { sampleRate: 20_000, channels: [...channels], sampleFormat: format })), format).toBe(true);
      const bps = format === "i16le" ? 2 : 4;
      for (const i of [0, 1, 12_345, data.length / bps - 1]) {
        const ch = i % channels.length;
        const count = bps === 2 ? data.readInt16LE(i * 2) : data.readInt32LE(i * 4);
        expect(got.capture.channels[ch].data[Math.floor(i / channels.length)], `${format} sample ${i}`).toBe(Math.fround(count * channels[ch].scale!));
      }
    }
    // Nothing is left beside the part files once the streams ended.
    expect(fs.readdirSync(path.join(dataDir, "streams")).filter((f) => f.includes(result.sessionId))).toEqual([]);
  });

  it("refuses bad begins: unknown motor or point, a motor on another site, another gateway's session, a fractional rate", async () => {
    const socket = await rawGateway(token);
    const base = { sampleRate: 1000, channels: CHANNELS, sampleFormat: "f32le" };
    refusal(await socket.emitWithAck("begin", { ...base, assetId: 999999 }), "unknown-asset", "unknown-motor");
    refusal(await socket.emitWithAck("begin", { ...base, assetId: motor.assetId, measurementPointId: otherSiteMotor.pointId }), "unknown-asset", "unknown-point");
    refusal(await socket.emitWithAck("begin", { ...base, assetId: otherSiteMotor.assetId }), "wrong-site");
    expect(refusal(await socket.emitWithAck("begin", { ...base, assetId: motor.assetId, sampleRate: 999.5 }), "bad-request").message).toMatch(/whole number of Hz/);
    // A scale that would turn the largest integer count into Infinity in the stored 32-bit float WAV.
    const huge = [{ ...CHANNELS[0], scale: 1 }, { ...CHANNELS[1], scale: 1e35 }];
    expect(refusal(await socket.emitWithAck("begin", { ...base, channels: huge, sampleFormat: "i16le", assetId: motor.assetId }), "bad-request").message).toMatch(/channels\.1\.scale/);
    expect(await socket.emitWithAck("begin", { ...base, channels: [{ ...CHANNELS[0], scale: 1e35 }], sampleFormat: "f32le", assetId: motor.assetId })).toMatchObject({ nextSeq: 0 });
    const other = await newGateway("Second gateway");
    const otherSocket = await rawGateway(other.token);
    const { sessionId } = await otherSocket.emitWithAck("begin", { ...base, assetId: motor.assetId });
    refusal(await socket.emitWithAck("begin", { ...base, assetId: motor.assetId, resumeSessionId: sessionId }), "unknown-session");
    refusal(await socket.emitWithAck("chunk", { sessionId, seq: 0, data: frames3(0, 1) }), "unknown-session");
    refusal(await socket.emitWithAck("end", { sessionId, totalChunks: 0 }), "unknown-session");
    // A resume that describes the stream differently.
    const { sessionId: own } = await socket.emitWithAck("begin", { ...base, assetId: motor.assetId });
    refusal(await socket.emitWithAck("begin", { ...base, assetId: motor.assetId, sampleRate: 2000, resumeSessionId: own }), "resume-mismatch");
  });

  it("abandons a session left untouched for days and refuses to resume it", async () => {
    const socket = await rawGateway(token);
    const base = { assetId: motor.assetId, sampleRate: 1000, channels: CHANNELS, sampleFormat: "f32le" };
    const { sessionId } = await socket.emitWithAck("begin", base);
    await socket.emitWithAck("chunk", { sessionId, seq: 0, data: frames3(0, 10) });
    expect(fs.existsSync(partPath(env.config, sessionId))).toBe(true);
    await env.db("stream_sessions").where({ id: sessionId }).update({ updated_at: env.db.raw("now() - interval '3 days'") });
    expect(await abandonStaleSessions(env.db, env.config, 48)).toBeGreaterThanOrEqual(1);
    expect(fs.existsSync(partPath(env.config, sessionId))).toBe(false);
    const resume = await socket.emitWithAck("begin", { ...base, resumeSessionId: sessionId });
    expect(refusal(resume, "session-closed", "aborted-by-sweep").message).toMatch(/abandoned/);
    expect(refusal(await socket.emitWithAck("chunk", { sessionId, seq: 1, data: frames3(30, 10) }), "session-closed", "aborted-by-sweep")).toMatchObject({ seq: 1 });
    refusal(await socket.emitWithAck("end", { sessionId, totalChunks: 1 }), "session-closed", "aborted-by-sweep");
  });

  it("abort deletes an open session's frames and closes it for good; a second abort is harmless", async () => {
    const socket = await rawGateway(token);
    const base = { assetId: motor.assetId, sampleRate: 1000, channels: CHANNELS, sampleFormat: "f32le" };
    const { sessionId } = await socket.emitWithAck("begin", base);
    expect(await socket.emitWithAck("chunk", { sessionId, seq: 0, data: frames3(0, 10) })).toEqual({ seq: 0 });
    expect(fs.statSync(partPath(env.config, sessionId)).size).toBe(120);

    expect(await socket.emitWithAck("abort", { sessionId, reason: "the file changed" })).toEqual({ sessionId, status: "aborted" });
    expect(fs.existsSync(partPath(env.config, sessionId))).toBe(false);
    const row = await env.db("stream_sessions").where({ id: sessionId }).first();
    expect(row).toMatchObject({ status: "aborted", aborted_by: "gateway", abort_reason: "the file changed", capture_id: null });

    const resume = await socket.emitWithAck("begin", { ...base, resumeSessionId: sessionId });
    expect(refusal(resume, "session-closed", "aborted-by-gateway").message).toMatch(/was abandoned by the gateway \(the file changed\)/);
    expect(refusal(await socket.emitWithAck("chunk", { sessionId, seq: 1, data: frames3(30, 10) }), "session-closed", "aborted-by-gateway")).toMatchObject({ seq: 1 });
    expect(refusal(await socket.emitWithAck("end", { sessionId, totalChunks: 1 }), "session-closed", "aborted-by-gateway").message).toMatch(/abandoned by the gateway/);
    expect(fs.existsSync(partPath(env.config, sessionId))).toBe(false);

    // Again (a retried abort whose ack was lost): acknowledged, nothing else changes.
    expect(await socket.emitWithAck("abort", { sessionId, reason: "another reason" })).toEqual({ sessionId, status: "aborted", alreadyAborted: true });
    expect(await env.db("stream_sessions").where({ id: sessionId }).first()).toMatchObject({ status: "aborted", abort_reason: "the file changed", next_seq: 1 });
  });

  it("refuses to abort an ended session (its capture stays), another gateway's session (as unknown) and a malformed abort", async () => {
    const socket = await rawGateway(token);
    const base = { assetId: motor.assetId, sampleRate: 1000, channels: CHANNELS, sampleFormat: "f32le" };
    const { sessionId } = await socket.emitWithAck("begin", base);
    await socket.emitWithAck("chunk", { sessionId, seq: 0, data: frames3(0, 100) });
    const { captureId } = await socket.emitWithAck("end", { sessionId, totalChunks: 1 });
    const ended = await socket.emitWithAck("abort", { sessionId });
    expect(refusal(ended, "session-closed", "ended")).toMatchObject({ sessionId, captureId, message: expect.stringMatching(new RegExp(`has ended as capture ${captureId}; it cannot be aborted`)) });
    expect(await env.db("stream_sessions").where({ id: sessionId }).first()).toMatchObject({ status: "ended", capture_id: captureId, aborted_by: null });
    expect(await env.db("captures").where({ id: captureId }).first()).toBeTruthy();
    expect(refusal(await socket.emitWithAck("chunk", { sessionId, seq: 1, data: frames3(0, 10) }), "session-closed", "ended")).toMatchObject({ seq: 1 });

    // Its capture deleted since: the resume says so (captureId null), "end" and "abort" are refused with their own reason.
    const deleted = await socket.emitWithAck("begin", base);
    await socket.emitWithAck("chunk", { sessionId: deleted.sessionId, seq: 0, data: frames3(0, 10) });
    const made = await socket.emitWithAck("end", { sessionId: deleted.sessionId, totalChunks: 1 });
    await env.db("captures").where({ id: made.captureId }).del();
    expect(await socket.emitWithAck("begin", { ...base, resumeSessionId: deleted.sessionId })).toMatchObject({ status: "ended", captureId: null });
    expect(refusal(await socket.emitWithAck("end", { sessionId: deleted.sessionId, totalChunks: 1 }), "session-closed", "ended-capture-deleted").message).toMatch(/capture was deleted/);
    expect(refusal(await socket.emitWithAck("abort", { sessionId: deleted.sessionId }), "session-closed", "ended-capture-deleted")).toMatchObject({ captureId: null });
    refusal(await socket.emitWithAck("chunk", { sessionId: deleted.sessionId, seq: 1, data: frames3(0, 10) }), "session-closed", "ended-capture-deleted");

    const other = await newGateway("Gateway whose session is not ours");
    const otherSocket = await rawGateway(other.token);
    const theirs = await otherSocket.emitWithAck("begin", base);
    await otherSocket.emitWithAck("chunk", { sessionId: theirs.sessionId, seq: 0, data: frames3(0, 10) });
    const abort = await socket.emitWithAck("abort", { sessionId: theirs.sessionId });
    const resume = await socket.emitWithAck("begin", { ...base, resumeSessionId: theirs.sessionId });
    refusal(abort, "unknown-session");
    expect(abort.error).toMatchObject({ code: resume.error.code, message: resume.error.message });
    expect(await env.db("stream_sessions").where({ id: theirs.sessionId }).first()).toMatchObject({ status: "open", next_seq: 1 });
    expect(fs.statSync(partPath(env.config, theirs.sessionId)).size).toBe(120);

    expect(refusal(await socket.emitWithAck("abort", { sessionId: "not-a-session" }), "bad-request").message).toMatch(/"abort" is not valid/);
    // An event the server does not handle is answered, not left to time out.
    expect(refusal(await socket.emitWithAck("pause", { sessionId }), "unknown-event").message).toMatch(/does not handle "pause"/);
  });

  it("the stream client aborts the session it gives up before beginning anew, and carries on with a server that has no abort", async () => {
    const socket = await rawGateway(token);
    const base = { assetId: motor.assetId, sampleRate: 1000, channels: CHANNELS, sampleFormat: "f32le" as const };
    const { sessionId: old } = await socket.emitWithAck("begin", base);
    await socket.emitWithAck("chunk", { sessionId: old, seq: 0, data: frames3(0, 10) });
    const outcomes: AbortOutcome[] = [];
    const all = frames3(0, 300);
    const result = await streamCapture({ url: server.url, token, ...base, frames: all, chunkBytes: 1200, abortSessionId: old, abortReason: "--fresh", onAbort: (o) => outcomes.push(o) });
    expect(outcomes).toEqual([{ sessionId: old, result: "aborted" }]);
    expect(result.sessionId).not.toBe(old);
    expect(await env.db("stream_sessions").where({ id: old }).first()).toMatchObject({ status: "aborted", abort_reason: "--fresh" });
    expect(captureToF32Frames((await storedCapture(result.captureId)).capture).equals(all)).toBe(true);

    // A server from before "abort": it ignores the event. The client waits for its abort timeout, then begins.
    const oldHttp = http.createServer();
    const oldIo = new IoServer(oldHttp);
    const begins: unknown[] = [];
    oldIo.of("/gateway").on("connection", (s) =>
      s.on("begin", (msg: unknown, ack: (a: unknown) => void) => {
        begins.push(msg);
        ack({ error: { code: "unknown-asset", message: "There is no motor with id 1 on this old server." } });
      }),
    );
    await new Promise<void>((r) => oldHttp.listen(0, "127.0.0.1", () => r()));
    try {
      const told: AbortOutcome[] = [];
      const refused = await streamCapture({
        url: `http://127.0.0.1:${(oldHttp.address() as { port: number }).port}`,
        token,
        ...base,
        frames: all,
        abortSessionId: old,
        abortTimeoutMs: 200,
        onAbort: (o) => told.push(o),
      }).catch((e: unknown) => e);
      expect(told).toEqual([{ sessionId: old, result: "unsupported", detail: 'no answer to "abort" within 0.2 s' }]);
      expect(begins).toHaveLength(1);
      expect(refused).toBeInstanceOf(StreamRefused);
      expect((refused as StreamRefused).error.code).toBe("unknown-asset");
    } finally {
      oldIo.close();
      oldHttp.closeAllConnections();
    }
  });

  it("tells an unknown token from a revoked one at connect, in the stream client and in the command-line gateway", async () => {
    const unknown = "bhg_00000000_" + "y".repeat(43);
    const unknownErr = (await rawGateway(unknown).catch((e: unknown) => e)) as Error & { data?: unknown };
    expect(unknownErr.data).toEqual({ code: "unauthorized", reason: "unknown-token" });
    expect(((await rawGateway("secret").catch((e: unknown) => e)) as { data?: unknown }).data).toEqual({ code: "unauthorized", reason: "malformed-token" });
    const revoked = await newGateway("Gateway revoked before connecting");
    const admin = await signedIn(env.app, "admin");
    expect((await admin.post(`/api/gateways/${revoked.id}/revoke`)).status).toBe(200);
    const revokedErr = (await rawGateway(revoked.token).catch((e: unknown) => e)) as Error & { data?: unknown };
    expect(revokedErr.data).toEqual({ code: "unauthorized", reason: "revoked" });

    const attempt = (tok: string) =>
      streamCapture({ url: server.url, token: tok, assetId: motor.assetId, sampleRate: 1000, channels: CHANNELS, sampleFormat: "f32le", frames: frames3(0, 10), retries: 0 }).then(
        () => new StreamRefused({ code: "server", message: "the stream was accepted" }),
        (e: unknown) => e as StreamRefused,
      );
    expect(refusal(await attempt(unknown), "unknown-token", "unknown-token").message).toMatch(/Unknown gateway token/);
    refusal(await attempt("secret"), "unknown-token", "malformed-token");
    refusal(await attempt(""), "unknown-token", "missing-token");
    expect(refusal(await attempt(revoked.token), "revoked").message).toMatch(/was revoked/);

    const file = path.join(dataDir, "token-check.wav");
    fs.writeFileSync(file, writeWav(syntheticCapture(0.2, 5000)));
    const cli = (tok: string) => runGatewayCli(["--file", file, "--asset", String(motor.assetId), "--token", tok, "--url", server.url, "--state-dir", path.join(dataDir, "state-token")]);
    const byUnknown = await cli(unknown);
    expect(byUnknown.code).toBe(1);
    expect(byUnknown.stderr).toMatch(/the server does not accept this token \(bhg_00000000_…\): Unknown gateway token\..*Check the token given with --token or BARHOUND_GATEWAY_TOKEN\./);
    expect(byUnknown.stderr).not.toMatch(/revoked/);
    const byRevoked = await cli(revoked.token);
    expect(byRevoked.code).toBe(1);
    expect(byRevoked.stderr).toMatch(/the server refused the stream: The token of gateway "Gateway revoked before connecting" .* was revoked\. Ask an admin for a new token\./);
    expect(byRevoked.stderr).not.toMatch(/Check the token given/);
    expect(await env.db("captures").where({ gateway_id: revoked.id }).count("* as n").first()).toMatchObject({ n: "0" });
  });

  it("refuses a missing, unknown or revoked token, and disconnects a gateway when its token is revoked", async () => {
    await expect(rawGateway(undefined)).rejects.toThrow(/No gateway token given/);
    await expect(rawGateway("bhg_00000000_" + "x".repeat(43))).rejects.toThrow(/Unknown gateway token/);
    await expect(rawGateway("secret")).rejects.toThrow(/not a gateway token/);

    const doomed = await newGateway("Gateway to be revoked");
    const socket = await rawGateway(doomed.token);
    const told = nextEvent<StreamError>(socket, "stream:error");
    const dropped = new Promise<string>((resolve) => socket.once("disconnect", resolve));
    const admin = await signedIn(env.app, "admin");
    expect((await admin.post(`/api/gateways/${doomed.id}/revoke`)).status).toBe(200);
    expect(refusal({ error: await told }, "revoked").message).toMatch(/revoked by an admin/);
    expect(await dropped).toBe("io server disconnect");

    await expect(rawGateway(doomed.token)).rejects.toThrow(/Gateway to be revoked.*was revoked/);
    expect(await env.db("stream_sessions").where({ gateway_id: doomed.id }).count("* as n").first()).toMatchObject({ n: "0" });
    expect(await env.db("captures").where({ gateway_id: doomed.id }).count("* as n").first()).toMatchObject({ n: "0" });
  });

  it("the command-line gateway streams a CSV and prints the capture id", async () => {
    const original = syntheticCapture(0.5, 5000);
    const file = path.join(dataDir, "fan-3.csv");
    fs.writeFileSync(file, writeCsv(original));
    const stateDir = path.join(dataDir, "state-csv");
    const { code, stdout: out, stderr: err } = await runGatewayCli(
      ["--file", file, "--asset", String(motor.assetId), "--token", token, "--url", server.url, "--chunk-kb", "8", "--state-dir", stateDir],
    );
    expect(code, err).toBe(0);
    const captureId = Number(out.trim());
    expect(Number.isInteger(captureId) && captureId > 0, out).toBe(true);
    expect(err).toMatch(/100 %/);
    const { row, capture } = await storedCapture(captureId);
    expect(row).toMatchObject({ source: "stream", gateway_id: gatewayId, sample_rate: 5000 });
    expect(captureToF32Frames(capture).equals(captureToF32Frames(parseCapture(fs.readFileSync(file))))).toBe(true);
    // The state of a finished stream is deleted.
    expect(fs.readdirSync(stateDir)).toEqual([]);
  });
  it("the command-line gateway refuses a file with a value beyond 32-bit float range before sending anything", async () => {
    const original = syntheticCapture(0.5, 5000);
    original.channels[1].data[7] = 1e39; // finite in the CSV (64-bit), Infinity as a stream's 32-bit sample
    const file = path.join(dataDir, "overflow.csv");
    fs.writeFileSync(file, writeCsv(original));
    const sessionsBefore = Number((await env.db("stream_sessions").where({ gateway_id: gatewayId }).count("* as n").first())!.n);
    const run = await runGatewayCli(["--file", file, "--asset", String(motor.assetId), "--token", token, "--url", server.url, "--state-dir", path.join(dataDir, "state-overflow")]);
    expect(run.code).toBe(1);
    expect(run.stderr).toMatch(/gateway: overflow\.csv: sample 8 of channel 2 \(Ib\) is 1e\+39, beyond the range of the 32-bit float samples a stream carries.*nothing was sent/);
    expect(Number((await env.db("stream_sessions").where({ gateway_id: gatewayId }).count("* as n").first())!.n)).toBe(sessionsBefore);
  });
});

describe("a server with a low stream limit", { timeout: 60_000 }, () => {
  // Its own app and socket.io server on the same database, with an upload (and so stream) limit of 3000 bytes.
  const LIMIT = 3000;
  const limitDir = path.join(dataDir, "limited");
  let small: TestEnv;
  let smallServer: TestServer;
  let smallBlob: BlobStore;
  let smallToken: string;

  beforeAll(async () => {
    small = await makeTestEnv({ dataDir: limitDir, uploadLimitBytes: LIMIT }, (ctx) => {
      smallBlob = createFsBlobStore(path.join(limitDir, "blobs"));
      ctx.services.blob = smallBlob;
      ctx.services.queue = { sendAnalyses: async (ds: AnalysisJobData[]) => void jobs.push(...ds) } as unknown as CaptureQueue;
    });
    smallServer = await startTestServer(small);
    const admin = await signedIn(small.app, "admin");
    const res = await admin.post("/api/gateways").send({ name: "Gateway of the small server", siteId: motor.siteId });
    expect(res.status).toBe(201);
    smallToken = res.body.token;
  });
  afterAll(async () => {
    await smallServer?.close();
    await small?.close();
  });

  it("refuses the chunk that would pass the limit, saying the limit and what it holds; the stream can end with what it has", async () => {
    const socket = ioClient(`${smallServer.url}/gateway`, { auth: { token: smallToken }, transports: ["websocket"], reconnection: false, forceNew: true });
    sockets.push(socket);
    await new Promise((resolve, reject) => (socket.once("connect", () => resolve(null)), socket.once("connect_error", reject)));
    const { sessionId } = await socket.emitWithAck("begin", { assetId: motor.assetId, sampleRate: 1000, channels: CHANNELS, sampleFormat: "f32le" });
    expect(await socket.emitWithAck("chunk", { sessionId, seq: 0, data: frames3(0, 100) })).toEqual({ seq: 0 });
    expect(await socket.emitWithAck("chunk", { sessionId, seq: 1, data: frames3(300, 100) })).toEqual({ seq: 1 });
    // 2400 bytes held; 1200 more would make 3600.
    const over = await socket.emitWithAck("chunk", { sessionId, seq: 2, data: frames3(600, 100) });
    expect(refusal(over, "stream-too-large")).toMatchObject({ sessionId, seq: 2, nextSeq: 2, limitBytes: LIMIT, bytesReceived: 2400 });
    expect(over.error.message).toMatch(/limit of .* \(3000 bytes\) for one stream; it holds 2400 bytes received in 2 chunk\(s\).*"end" with totalChunks 2/);
    // Up to the limit exactly is taken; a byte past it is not (the refused chunks are not stored).
    expect(await socket.emitWithAck("chunk", { sessionId, seq: 2, data: frames3(600, 50) })).toEqual({ seq: 2 });
    refusal(await socket.emitWithAck("chunk", { sessionId, seq: 3, data: frames3(750, 1) }), "stream-too-large");
    const row = await small.db("stream_sessions").where({ id: sessionId }).first();
    expect(row).toMatchObject({ status: "open", next_seq: 3 });
    expect(Number(row.bytes_received)).toBe(LIMIT);

    const end = await socket.emitWithAck("end", { sessionId, totalChunks: 3 });
    expect(end).toEqual({ captureId: expect.any(Number), status: "queued" });
    const stored = await small.db("captures").where({ id: end.captureId }).first();
    const capture = parseCapture(await smallBlob.get(stored.blob_key), { fileName: stored.file_name, minSamples: 0 });
    expect(captureToF32Frames(capture).equals(frames3(0, 250))).toBe(true);
  });

  it("the command-line gateway stops at the limit with one clear line, drops the partial stream and keeps no state", async () => {
    const file = path.join(dataDir, "too-long.wav");
    fs.writeFileSync(file, writeWav(syntheticCapture(0.2, 5000))); // 1000 frames × 12 bytes = 12 000 bytes of samples
    const stateDir = path.join(dataDir, "state-limit");
    const known: string[] = await small.db("stream_sessions").pluck("id");
    const run = await runGatewayCli(["--file", file, "--asset", String(motor.assetId), "--token", smallToken, "--url", smallServer.url, "--chunk-kb", "1", "--state-dir", stateDir]);
    expect(run.code, run.stderr).toBe(1);
    expect(run.stdout).toBe("");
    const [line, ...others] = run.stderr.split("\n").filter((l) => l.includes("refused"));
    expect(others).toEqual([]);
    expect(line).toMatch(/^gateway: the server refused the stream: too-long\.wav is 12 KiB of samples, more than its limit of 3 KiB for one stream; it took the first 2 KiB, and nothing more was sent\./);
    expect(line).toMatch(/Stream shorter captures, or ask the server's admin to raise the limit/);
    const [made] = await small.db("stream_sessions").whereNotIn("id", known);
    expect(line).toContain(`The partial stream ${made.id} was dropped on the server.`);
    expect(line).not.toMatch(/Run the same command again/);
    expect(made).toMatchObject({ status: "aborted", aborted_by: "gateway", abort_reason: expect.stringMatching(/larger than the server's stream limit/), capture_id: null });
    expect(fs.existsSync(partPath(small.config, made.id))).toBe(false);
    expect(fs.existsSync(stateDir) ? fs.readdirSync(stateDir) : []).toEqual([]);
  });
});

describe("the command-line gateway after a restart", { timeout: 60_000 }, () => {
  // 3 channels × 4 bytes at 10 kHz for 3.5 s = 35 000 frames; 4 KiB chunks hold 341 frames, so 103 chunks.
  const TOTAL_CHUNKS = 103;
  // Slows only the run that is interrupted, so it is still streaming when it is killed (honoured when NODE_ENV=test).
  const SLOW = { BARHOUND_TEST_GATEWAY_ACK_DELAY_MS: "25" };
  let run = 0;

  function captureFile(name: string, amplitude = 42) {
    const file = path.join(dataDir, name);
    fs.writeFileSync(file, writeWav(syntheticCapture(3.5, 10_000, amplitude)));
    return file;
  }
  const newStateDir = () => path.join(dataDir, `state-${++run}`);
  const cliArgs = (file: string, stateDir: string, tok = token, ...extra: string[]) => [
    ...["--file", file, "--asset", String(motor.assetId), "--token", tok, "--url", server.url, "--chunk-kb", "4", "--state-dir", stateDir],
    ...extra,
  ];
  const stateFiles = (dir: string) => (fs.existsSync(dir) ? fs.readdirSync(dir) : []);
  const readState = (dir: string) => {
    const files = stateFiles(dir);
    expect(files).toHaveLength(1);
    return JSON.parse(fs.readFileSync(path.join(dir, files[0]), "utf8"));
  };
  const session = (id: string) => env.db("stream_sessions").where({ id }).first();
  const countCaptures = async (gw: number) => Number((await env.db("captures").where({ gateway_id: gw }).count("* as n").first())!.n);

  /** Start the CLI slowed down and kill it once the server holds at least 8 chunks of the session it began. */
  async function interruptedRun(args: string[], gw = gatewayId, signal: NodeJS.Signals = "SIGKILL") {
    const known: string[] = await env.db("stream_sessions").where({ gateway_id: gw }).pluck("id");
    const child = startGatewayCli(args, SLOW);
    const until = Date.now() + 20_000;
    let begun: { id: string } | undefined;
    while (!begun) {
      begun = await env.db("stream_sessions").where({ gateway_id: gw }).whereNotIn("id", known).andWhere("next_seq", ">=", 8).first("id");
      if (!begun && (Date.now() > until || child.proc.exitCode !== null)) throw new Error(`the gateway did not get 8 chunks in:\n${child.stderr()}`);
      if (!begun) await sleep(20);
    }
    child.proc.kill(signal);
    const exit = await child.exited;
    // Chunks the gateway sent before it died may still be in the server's hands: wait until the count stands still.
    let row = await session(begun.id);
    for (let last = -1; row.next_seq !== last; row = await session(begun.id)) {
      last = row.next_seq;
      await sleep(200);
    }
    // Killed in the middle: the server holds part of the stream and made no capture of it.
    expect(row).toMatchObject({ status: "open", capture_id: null });
    expect(row.next_seq).toBeLessThan(TOTAL_CHUNKS);
    return { sessionId: begun.id, exit, row };
  }

  it("resumes a killed run from the server's last acknowledged chunk: one capture, byte-identical to an uninterrupted stream", async () => {
    const file = captureFile("press-2.wav");
    const reference = await runGatewayCli(cliArgs(file, newStateDir()));
    expect(reference.code, reference.stderr).toBe(0);
    const referenceRow = (await storedCapture(Number(reference.stdout))).row;

    const stateDir = newStateDir();
    const { sessionId, exit } = await interruptedRun(cliArgs(file, stateDir));
    expect(exit.signal).toBe("SIGKILL");
    // The saved state names the session; its count is a hint at most as far as the server got.
    const saved = readState(stateDir);
    expect(saved).toMatchObject({ sessionId, chunkBytes: 341 * 12, totalChunks: TOTAL_CHUNKS, file: { path: file, size: fs.statSync(file).size } });
    expect(saved.tokenPrefix).toBe(token.slice(0, 12));
    expect(JSON.stringify(saved)).not.toContain(token);
    const serverHas = (await session(sessionId)).next_seq;
    expect(saved.ackedChunks).toBeLessThanOrEqual(serverHas);
    const before = await countCaptures(gatewayId);

    // A different --chunk-kb does not apply to the resumed stream: its chunk numbers mean the saved size.
    const resumed = await runGatewayCli(cliArgs(file, stateDir, token, "--chunk-kb", "8"));
    expect(resumed.code, resumed.stderr).toBe(0);
    expect(resumed.stderr).toContain("keeping the interrupted run's chunks of 4092 bytes (--chunk-kb 8 applies to new streams)");
    expect(resumed.stderr).toContain(`resuming stream ${sessionId} at chunk ${serverHas} of ${TOTAL_CHUNKS} (the server's count; the state file had ${saved.ackedChunks})`);
    const captureId = Number(resumed.stdout);
    expect(await countCaptures(gatewayId)).toBe(before + 1);
    expect(await session(sessionId)).toMatchObject({ status: "ended", capture_id: captureId, next_seq: TOTAL_CHUNKS });
    expect(jobs.filter((j) => j.captureId === captureId)).toHaveLength(1);

    const { row, capture } = await storedCapture(captureId);
    expect(Buffer.compare(await blob.get(row.blob_key), await blob.get(referenceRow.blob_key))).toBe(0);
    expect(captureToF32Frames(capture).equals(captureToF32Frames(parseCapture(fs.readFileSync(file))))).toBe(true);
    expect(stateFiles(stateDir)).toEqual([]);
  });

  it("--fresh ignores the saved state and streams the file from the start", async () => {
    const file = captureFile("fan-9.wav");
    const stateDir = newStateDir();
    const { sessionId, row: interrupted } = await interruptedRun(cliArgs(file, stateDir));
    const fresh = await runGatewayCli(cliArgs(file, stateDir, token, "--fresh"));
    expect(fresh.code, fresh.stderr).toBe(0);
    expect(fresh.stderr).toMatch(
      new RegExp(`--fresh: abandoned the interrupted stream ${sessionId} \\(\\d+ of ${TOTAL_CHUNKS} chunks acknowledged\\) on the server; starting a new one\\.`),
    );
    expect(fresh.stderr).not.toContain("resuming stream");
    const captureId = Number(fresh.stdout);
    const made = await env.db("stream_sessions").where({ capture_id: captureId }).first();
    expect(made.id).not.toBe(sessionId);
    expect(made).toMatchObject({ status: "ended", next_seq: TOTAL_CHUNKS });
    // The interrupted session was aborted before the new one began: its frames are gone, its count is as it was.
    expect(await session(sessionId)).toMatchObject({ status: "aborted", aborted_by: "gateway", next_seq: interrupted.next_seq, capture_id: null });
    expect(fs.existsSync(partPath(env.config, sessionId))).toBe(false);
    expect(captureToF32Frames((await storedCapture(captureId)).capture).equals(captureToF32Frames(parseCapture(fs.readFileSync(file))))).toBe(true);
    expect(stateFiles(stateDir)).toEqual([]);
  });

  it("does not resume when the file changed since the interrupted run, even at the same size", async () => {
    const file = captureFile("pump-4.wav");
    const stateDir = newStateDir();
    const { sessionId } = await interruptedRun(cliArgs(file, stateDir));
    const sizeBefore = fs.statSync(file).size;
    captureFile("pump-4.wav", 40);
    expect(fs.statSync(file).size).toBe(sizeBefore);

    expect(fs.existsSync(partPath(env.config, sessionId))).toBe(true);
    const capturesBefore = await countCaptures(gatewayId);
    const sessionsBefore: string[] = await env.db("stream_sessions").where({ gateway_id: gatewayId }).pluck("id");

    const again = await runGatewayCli(cliArgs(file, stateDir));
    expect(again.code, again.stderr).toBe(0);
    const told = again.stderr.split("\n").filter((l) => l.includes(sessionId));
    expect(told).toHaveLength(1);
    expect(told[0]).toMatch(/pump-4\.wav changed since the interrupted run \(its content differs \(same size/);
    expect(told[0]).toMatch(new RegExp(`abandoned the interrupted stream ${sessionId} \\(\\d+ of ${TOTAL_CHUNKS} chunks acknowledged\\) on the server; starting a new one\\.$`));
    // The server no longer holds the old session open, nor its frames.
    expect(await session(sessionId)).toMatchObject({ status: "aborted", aborted_by: "gateway", abort_reason: expect.stringMatching(/^the file changed/) });
    expect(fs.existsSync(partPath(env.config, sessionId))).toBe(false);
    // One new session, ended as the one new capture.
    const captureId = Number(again.stdout);
    const added = await env.db("stream_sessions").where({ gateway_id: gatewayId }).whereNotIn("id", sessionsBefore);
    expect(added).toEqual([expect.objectContaining({ status: "ended", capture_id: captureId, next_seq: TOTAL_CHUNKS })]);
    expect(await countCaptures(gatewayId)).toBe(capturesBefore + 1);
    expect(jobs.filter((j) => j.captureId === captureId)).toHaveLength(1);
    // The capture holds the file as it is now, not the start of the old one.
    const frames = captureToF32Frames((await storedCapture(captureId)).capture);
    expect(frames.equals(captureToF32Frames(parseCapture(fs.readFileSync(file))))).toBe(true);
  });

  it("Ctrl-C saves the state; a stream the server already finished is not sent again and its capture id is printed", async () => {
    const file = captureFile("mill-1.wav");
    const stateDir = newStateDir();
    const { sessionId, exit } = await interruptedRun(cliArgs(file, stateDir), gatewayId, "SIGINT");
    expect(exit.code, exit.stderr).toBe(130);
    expect(exit.stderr).toMatch(new RegExp(`interrupted after \\d+ of ${TOTAL_CHUNKS} chunks; run the same command again to resume stream ${sessionId}`));
    const [stateName] = stateFiles(stateDir);
    const savedText = fs.readFileSync(path.join(stateDir, stateName), "utf8");
    expect(JSON.parse(savedText).ackedChunks).toBeGreaterThanOrEqual(1);

    const finished = await runGatewayCli(cliArgs(file, stateDir));
    expect(finished.code, finished.stderr).toBe(0);
    const captureId = Number(finished.stdout);
    const before = await countCaptures(gatewayId);

    // As if the run had been killed after the server ended the stream but before the state file was deleted.
    fs.writeFileSync(path.join(stateDir, stateName), savedText);
    const again = await runGatewayCli(cliArgs(file, stateDir));
    expect(again.code, again.stderr).toBe(0);
    expect(again.stdout.trim()).toBe(String(captureId));
    expect(again.stderr).toContain(`the server had already finished stream ${sessionId} as capture ${captureId}`);
    expect(again.stderr).not.toMatch(/100 %/);
    expect(await countCaptures(gatewayId)).toBe(before);
    expect(stateFiles(stateDir)).toEqual([]);
  });

  it("a revoked token is reported on resume; with another gateway's token the file is streamed anew", async () => {
    const doomed = await newGateway("Gateway revoked mid-stream");
    const file = captureFile("conveyor-5.wav");
    const stateDir = newStateDir();
    const { sessionId } = await interruptedRun(cliArgs(file, stateDir, doomed.token), doomed.id);
    const admin = await signedIn(env.app, "admin");
    expect((await admin.post(`/api/gateways/${doomed.id}/revoke`)).status).toBe(200);

    const refused = await runGatewayCli(cliArgs(file, stateDir, doomed.token));
    expect(refused.code).toBe(1);
    expect(refused.stderr).toMatch(/Gateway revoked mid-stream.*was revoked/);
    expect(refused.stderr).toMatch(new RegExp(`The interrupted stream ${sessionId} \\(\\d+ of ${TOTAL_CHUNKS} chunks acknowledged\\) was not resumed`));
    expect(stateFiles(stateDir)).toHaveLength(1);
    expect(await countCaptures(doomed.id)).toBe(0);

    const replacement = await newGateway("Replacement gateway");
    const anew = await runGatewayCli(cliArgs(file, stateDir, replacement.token));
    expect(anew.code, anew.stderr).toBe(0);
    expect(anew.stderr).toContain(
      `the server does not know the interrupted stream ${sessionId} (it was begun with token ${doomed.token.slice(0, 12)}_…, this run uses ${replacement.token.slice(0, 12)}_…); starting a new stream.`,
    );
    const { row, capture } = await storedCapture(Number(anew.stdout));
    expect(row.gateway_id).toBe(replacement.id);
    expect(captureToF32Frames(capture).equals(captureToF32Frames(parseCapture(fs.readFileSync(file))))).toBe(true);
    expect(stateFiles(stateDir)).toEqual([]);
  });

  it("a stream the server abandoned is begun anew, with one line saying so", async () => {
    const file = captureFile("blower-8.wav");
    const stateDir = newStateDir();
    const { sessionId } = await interruptedRun(cliArgs(file, stateDir));
    await env.db("stream_sessions").where({ id: sessionId }).update({ updated_at: env.db.raw("now() - interval '3 days'") });
    expect(await abandonStaleSessions(env.db, env.config, 48)).toBeGreaterThanOrEqual(1);

    const again = await runGatewayCli(cliArgs(file, stateDir));
    expect(again.code, again.stderr).toBe(0);
    expect(again.stderr.split("\n").filter((l) => l.includes(`has given up the interrupted stream ${sessionId}`))).toHaveLength(1);
    const captureId = Number(again.stdout);
    expect((await env.db("stream_sessions").where({ capture_id: captureId }).first()).id).not.toBe(sessionId);
    expect(captureToF32Frames((await storedCapture(captureId)).capture).equals(captureToF32Frames(parseCapture(fs.readFileSync(file))))).toBe(true);
  });
});

describe("the command-line gateway decides on the refusal's code and reason, never on its words", { timeout: 60_000 }, () => {
  // A stand-in server that words every refusal differently from Barhound's server (some wordings even hold the words of
  // another case): the gateway must still tell the cases apart, by code and reason alone.
  const sessionId = crypto.randomUUID();
  let fakeUrl = "";
  let fakeHttp: http.Server;
  let fakeIo: IoServer;
  let acceptBegin = true;
  let resumeAnswer: StreamError = { code: "server", message: "unset" };
  let abortAnswer: StreamError = { code: "server", message: "unset" };
  /** What every chunk is answered with; an abort is accepted while `abortAccepted`. */
  let chunkAnswer: StreamError = { code: "wrong-site", message: "Zzz: not yours." };
  let abortAccepted = false;
  let file = "";
  let stateDir = "";

  beforeAll(async () => {
    fakeHttp = http.createServer();
    fakeIo = new IoServer(fakeHttp);
    fakeIo.of("/gateway").on("connection", (s) => {
      s.on("begin", (msg: { resumeSessionId?: string }, ack: (a: unknown) => void) => {
        if (msg.resumeSessionId) return ack({ error: resumeAnswer });
        if (acceptBegin) return ack({ sessionId, nextSeq: 0 });
        ack({ error: { code: "unknown-asset", reason: "unknown-motor", message: "Zzz: no such thing here." } });
      });
      s.on("chunk", (_msg: unknown, ack: (a: unknown) => void) => ack({ error: chunkAnswer }));
      s.on("abort", (msg: { sessionId: string }, ack: (a: unknown) => void) => ack(abortAccepted ? { sessionId: msg.sessionId, status: "aborted" } : { error: abortAnswer }));
    });
    await new Promise<void>((r) => fakeHttp.listen(0, "127.0.0.1", () => r()));
    fakeUrl = `http://127.0.0.1:${(fakeHttp.address() as { port: number }).port}`;

    // A run the stand-in stops after its begin: it leaves the state of stream `sessionId`, which every run below
    // resumes (or, with --fresh, aborts); their new begin is refused, so the state stays for the next one.
    file = path.join(dataDir, "decisions.wav");
    fs.writeFileSync(file, writeWav(syntheticCapture(0.2, 5000)));
    stateDir = path.join(dataDir, "state-decisions");
    const first = await runGatewayCli(cliArgs());
    expect(first.code, first.stderr).toBe(1);
    expect(fs.readdirSync(stateDir)).toHaveLength(1);
    acceptBegin = false;
  });
  afterAll(() => {
    fakeIo?.close();
    fakeHttp?.closeAllConnections();
  });

  const cliArgs = (...extra: string[]) => ["--file", file, "--asset", String(motor.assetId), "--token", token, "--url", fakeUrl, "--state-dir", stateDir, ...extra];
  /** The one stderr line on what became of the saved stream before the new one was begun. */
  async function toldAbout(...extra: string[]) {
    const run = await runGatewayCli(cliArgs(...extra));
    expect(run.code, run.stderr).toBe(1);
    expect(run.stderr).toContain("the server refused the stream: Zzz: no such thing here.");
    const lines = run.stderr.split("\n").filter((l) => l.includes(sessionId) && /starting a new (stream|one)\.$/.test(l));
    expect(lines, run.stderr).toHaveLength(1);
    expect(fs.readdirSync(stateDir)).toHaveLength(1);
    return lines[0];
  }

  const closed = (reason: StreamError["reason"] | undefined, message: string, extra: Partial<StreamError> = {}): StreamError => ({
    code: "session-closed",
    ...(reason ? { reason } : {}),
    message,
    sessionId,
    ...extra,
  });

  it.each([
    ["session-closed aborted-by-gateway", closed("aborted-by-gateway", "Zzz: gone."), "was abandoned by a gateway run that started over"],
    ["session-closed aborted-by-sweep", closed("aborted-by-sweep", "Zzz: was abandoned by the gateway, its capture deleted."), "the server has given up the interrupted stream"],
    ["session-closed ended-capture-deleted", closed("ended-capture-deleted", "Zzz: was abandoned by the gateway."), "the server finished the interrupted stream"],
    // An older server without reasons: no guess from its words, its message is shown.
    ["session-closed without a reason", closed(undefined, "Zzz: was abandoned by the gateway (capture deleted)."), "the server cannot resume the interrupted stream"],
    ["unknown-session", { code: "unknown-session", message: "Zzz: session deleted, abandoned by the gateway.", sessionId } as StreamError, "the server does not know the interrupted stream"],
  ])("a resume refused with %s, reworded, is told apart by code and reason", async (_label, answer, expected) => {
    resumeAnswer = answer;
    const line = await toldAbout();
    expect(line).toContain(expected);
    expect(line).toMatch(/starting a new stream\.$/);
    for (const other of ["was abandoned by a gateway run", "has given up", "finished the interrupted stream", "cannot resume", "does not know"])
      if (!expected.includes(other)) expect(line).not.toContain(other);
    if (expected.includes("cannot resume")) expect(line).toContain("(Zzz: was abandoned by the gateway (capture deleted))");
  });

  it.each([
    ["session-closed ended", closed("ended", "Zzz: nope.", { captureId: 77 }), "had already ended on the server as capture 77, which stays"],
    ["session-closed ended-capture-deleted", closed("ended-capture-deleted", "Zzz: it has ended as capture 12.", { captureId: null }), "had already ended on the server; its capture has since been deleted"],
    // An older server without reasons: its captureId says the session ended; without one, its words are only shown.
    ["session-closed without a reason, with captureId", closed(undefined, "Zzz: nope.", { captureId: 77 }), "had already ended on the server as capture 77, which stays"],
    ["session-closed without a reason", closed(undefined, "Zzz: it has ended, capture deleted."), "the server did not abandon it (Zzz: it has ended, capture deleted)"],
    ["unknown-session", { code: "unknown-session", message: "Zzz: has ended as capture 5.", sessionId } as StreamError, "the server does not know it (begun with another gateway's token, or removed)"],
  ])("an abort (--fresh) refused with %s, reworded, is told apart by code and reason", async (_label, answer, expected) => {
    abortAnswer = answer;
    const line = await toldAbout("--fresh");
    expect(line).toMatch(new RegExp(`^gateway: --fresh: .*${expected.replace(/[()]/g, "\\$&")}; starting a new one\\.$`));
  });

  // Chunk refusals: the saved stream's resume is refused (unknown-session), a new one is begun and its first chunk refused.
  async function chunkRefused(answer: StreamError) {
    resumeAnswer = { code: "unknown-session", message: "Zzz: who?", sessionId };
    chunkAnswer = answer;
    acceptBegin = true;
    try {
      const run = await runGatewayCli(cliArgs());
      expect(run.code, run.stderr).toBe(1);
      const lines = run.stderr.split("\n").filter((l) => l.startsWith("gateway: the server refused"));
      expect(lines, run.stderr).toHaveLength(1);
      return lines[0];
    } finally {
      acceptBegin = false;
      chunkAnswer = { code: "wrong-site", message: "Zzz: not yours." };
    }
  }

  it("a chunk refused with bad-frame non-finite-sample, reworded, says a sample is not finite and keeps the state", async () => {
    const line = await chunkRefused({ code: "bad-frame", reason: "non-finite-sample", message: "Zzz: partial frame, too large.", sessionId, seq: 0, nextSeq: 0, frame: 3, channel: 2 });
    expect(line).toMatch(/^gateway: the server refused a sample that is not a finite number \(chunk 0, frame 3, channel 2; counted from 0\): Zzz: partial frame, too large\. Correct decisions\.wav/);
    expect(line).not.toMatch(/limit/);
    expect(fs.readdirSync(stateDir)).toHaveLength(1);
  });

  it("a chunk refused with stream-too-large, reworded, says the limit and drops the partial stream (state removed)", async () => {
    abortAccepted = true;
    try {
      const line = await chunkRefused({ code: "stream-too-large", message: "Zzz: partial frame, not finite.", sessionId, seq: 0, nextSeq: 0, limitBytes: 1024 * 1024, bytesReceived: 0 });
      expect(line).toMatch(/^gateway: the server refused the stream: decisions\.wav is \d+ KiB of samples, more than its limit of 1\.0 MiB for one stream; it took the first 0 KiB, and nothing more was sent\./);
      expect(line).toContain(`The partial stream ${sessionId} was dropped on the server.`);
      // With the numbers given, the server's words (which here name other cases) are not needed.
      expect(line).not.toMatch(/not a finite number|Zzz/);
      expect(fs.readdirSync(stateDir)).toEqual([]);
    } finally {
      abortAccepted = false;
    }
  });
});
