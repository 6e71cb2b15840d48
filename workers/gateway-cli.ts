// Command-line gateway: streams a capture file to Barhound the way a site gateway does (f32le frames over the
// "/gateway" socket.io namespace), with a progress bar on stderr, and prints the new capture's id on stdout.
//
//   npm run gateway -- --file sample-data/pump-7.csv --asset 12 --token bhg_… [--url http://localhost:5180]
//                      [--chunk-kb 64] [--point 3] [--sample-rate 10000] [--taken-at 2026-12-01T08:30:00Z]
//                      [--state-dir DIR] [--fresh]
//
// A run that is killed (power cut, crash, Ctrl-C) leaves a state file (./gateway-state.ts); the same command run again
// asks the server where the stream stands and goes on from the server's last acknowledged chunk. A run that starts over
// instead (the file or the settings changed, --fresh) first aborts the saved session, so the server drops its frames.
// Test hook: BARHOUND_TEST_GATEWAY_ACK_DELAY_MS (pause after each acknowledged chunk), honoured only when NODE_ENV=test.

import fs from "node:fs/promises";
import path from "node:path";
import { parseArgs } from "node:util";
import { parseCapture, isCaptureParseError } from "../src/engine/parse/index.ts";
import { captureToF32Frames } from "../server/gateway/assemble.ts";
import { abortStream, streamCapture, StreamRefused, type AbortOutcome } from "../server/gateway/stream-client.ts";
import { CHANNEL_KINDS, findNonFiniteSample, frameBytes, type StreamChannel, type StreamError } from "../server/gateway/protocol.ts";
import {
  STATE_FORMAT,
  defaultStateDir,
  fileChange,
  loadState,
  removeStaleTemps,
  removeState,
  sha256,
  stateDirProblem,
  statePath,
  stateWriter,
  tokenPrefix,
  type GatewayState,
} from "./gateway-state.ts";

const USAGE = `Usage: npm run gateway -- --file FILE --asset ID --token TOKEN [--url URL] [--chunk-kb 64]
  --file         a capture file (.csv or .wav)
  --asset        the motor's id in Barhound
  --token        the gateway token an admin created (bhg_…); or set BARHOUND_GATEWAY_TOKEN
  --url          server address (default http://localhost:5180)
  --chunk-kb     chunk size in KiB (default 64)
  --point        measurement point id (optional)
  --sample-rate  sample rate in Hz, for a CSV without a time column or sample-rate comment
  --taken-at     when the capture was recorded (ISO 8601; default now)
  --state-dir    where the state of an interrupted stream is kept (default .data/gateway-state, or
                 BARHOUND_GATEWAY_STATE_DIR); the same command run again resumes the stream
  --fresh        do not resume a saved interrupted stream (the server is told to drop it); stream the file from the start`;

function fail(message: string): never {
  process.stderr.write(`gateway: ${message}\n`);
  process.exit(1);
}

function positiveInt(value: string | undefined, name: string): number | undefined {
  if (value === undefined) return undefined;
  const n = Number(value);
  if (!Number.isInteger(n) || n <= 0) fail(`--${name} must be a positive whole number, not "${value}".`);
  return n;
}

/** A one-line bar redrawn in place when stderr is a terminal; occasional plain lines otherwise (logs, CI). */
function progressBar(label: string) {
  const tty = process.stderr.isTTY;
  let lastPct = -1;
  let nextMark = 25; // plain lines at 25, 50, 75 and 100 %, also when a chunk jumps past a mark
  return {
    update(done: number, total: number) {
      const pct = Math.floor((done / total) * 100);
      if (pct === lastPct) return;
      lastPct = pct;
      const width = 30;
      const filled = Math.round((pct / 100) * width);
      const line = `${label} [${"#".repeat(filled)}${"-".repeat(width - filled)}] ${String(pct).padStart(3)} %  ${(done / 1024).toFixed(0)}/${(total / 1024).toFixed(0)} KiB`;
      if (tty) process.stderr.write(`\r${line}`);
      else if (pct >= nextMark) {
        process.stderr.write(`${line}\n`);
        nextMark = (Math.floor(pct / 25) + 1) * 25;
      }
    },
    note(text: string) {
      process.stderr.write(`${tty ? "\n" : ""}${text}\n`);
    },
    done() {
      if (tty) process.stderr.write("\n");
    },
  };
}

async function main() {
  let values;
  try {
    ({ values } = parseArgs({
      options: {
        file: { type: "string" },
        asset: { type: "string" },
        token: { type: "string" },
        url: { type: "string", default: "http://localhost:5180" },
        "chunk-kb": { type: "string" },
        point: { type: "string" },
        "sample-rate": { type: "string" },
        "taken-at": { type: "string" },
        "state-dir": { type: "string" },
        fresh: { type: "boolean", default: false },
        help: { type: "boolean", short: "h" },
      },
    }));
  } catch (err) {
    fail(`${(err as Error).message}\n${USAGE}`);
  }
  if (values.help) {
    process.stdout.write(`${USAGE}\n`);
    return;
  }
  const token = values.token ?? process.env.BARHOUND_GATEWAY_TOKEN;
  if (!values.file || !values.asset || !token) fail(`--file, --asset and --token are required.\n${USAGE}`);
  const assetId = positiveInt(values.asset, "asset")!;
  const chunkKb = positiveInt(values["chunk-kb"], "chunk-kb") ?? 64;
  if (chunkKb > 2048) fail("--chunk-kb may be at most 2048 (the server takes chunks up to 2 MiB).");

  const url = values.url!.replace(/\/+$/, "");
  const measurementPointId = positiveInt(values.point, "point");
  const stateDir = values["state-dir"] ? path.resolve(values["state-dir"]) : defaultStateDir();
  const dirProblem = stateDirProblem(stateDir);
  if (dirProblem) fail(dirProblem);

  let bytes: Uint8Array;
  let mtimeMs: number;
  try {
    bytes = await fs.readFile(values.file);
    mtimeMs = (await fs.stat(values.file)).mtimeMs;
  } catch (err) {
    fail(`cannot read ${values.file}: ${(err as NodeJS.ErrnoException).code === "ENOENT" ? "no such file" : (err as Error).message}`);
  }
  let capture;
  try {
    capture = parseCapture(bytes, { fileName: path.basename(values.file), sampleRate: positiveInt(values["sample-rate"], "sample-rate") });
  } catch (err) {
    fail(isCaptureParseError(err) ? err.message : `cannot read ${values.file}: ${(err as Error).message}`);
  }
  const sampleRate = Math.round(capture.sampleRate);
  if (Math.abs(sampleRate - capture.sampleRate) > 1e-6 * capture.sampleRate)
    process.stderr.write(`gateway: note: the sample rate ${capture.sampleRate} Hz is sent as ${sampleRate} Hz (streams use whole Hz).\n`);
  const channels: StreamChannel[] = capture.channels.map((c) => ({
    name: c.name.slice(0, 60),
    kind: (CHANNEL_KINDS as readonly string[]).includes(c.kind) ? c.kind : "other",
    unit: c.unit || "-",
    ...(c.position ? { position: c.position } : {}),
  }));
  const frames = captureToF32Frames(capture);
  const samples = capture.channels[0].data.length;
  const fileName = path.basename(values.file);
  // The stream carries 32-bit floats: a value beyond their range (a CSV cell of 1e39, a 64-bit float WAV) would become
  // Infinity, which the server refuses. Said here, before anything is sent.
  const unfit = findNonFiniteSample(frames, channels.length);
  if (unfit) {
    const value = capture.channels[unfit.channel].data[unfit.frame];
    fail(
      `${fileName}: sample ${unfit.frame + 1} of channel ${unfit.channel + 1} (${capture.channels[unfit.channel].name}) is ${value}, ` +
        (Number.isFinite(value) ? `beyond the range of the 32-bit float samples a stream carries (±3.4e38)` : `not a finite number`) +
        `; nothing was sent. Correct the file and run the command again.`,
    );
  }
  const fileId = { path: path.resolve(values.file), size: bytes.length, mtimeMs, sha256: sha256(bytes) };
  const note = (text: string) => process.stderr.write(`gateway: ${text}\n`);
  const bar = progressBar(fileName);
  process.stderr.write(
    `gateway: ${channels.length} channel(s) (${channels.map((c) => c.name).join(", ")}), ${samples} samples at ${sampleRate} Hz ` +
      `(${(samples / sampleRate).toFixed(1)} s) → ${url}\n`,
  );

  // A saved interrupted stream of this file, motor and server, if it can be resumed.
  const stateFile = statePath(stateDir, { url, filePath: values.file, assetId, measurementPointId });
  await removeStaleTemps(stateFile);
  const loaded = await loadState(stateFile);
  let saved: GatewayState | null = null;
  // A saved stream this run starts over from, for a reason it knows: it is aborted on the server before the new begin.
  let discarded: { state: GatewayState; why: string; reason: string } | null = null;
  if (loaded && "unreadable" in loaded) note(`ignoring the state file ${stateFile}: ${loaded.unreadable}. Starting a new stream.`);
  else if (loaded) {
    const s = loaded.state;
    const change = fileChange(s.file, fileId);
    const settings = settingsChange(s.begin, { sampleRate, channels, takenAt: values["taken-at"] });
    if (values.fresh) discarded = { state: s, why: "--fresh", reason: "--fresh: the gateway streams the file again from the start" };
    else if (change) discarded = { state: s, why: `${fileName} changed since the interrupted run (${change})`, reason: `the file changed (${change})` };
    else if (settings) discarded = { state: s, why: `${settings} since the interrupted run`, reason: `the settings changed (${settings})` };
    else saved = s;
  }
  if (saved) {
    note(`found the interrupted stream ${saved.sessionId} (${saved.ackedChunks} of ${saved.totalChunks} chunks acknowledged at ${saved.updatedAt}); asking the server where to resume.`);
    const fb = frameBytes(channels.length, "f32le"); // the client rounds chunks down to whole frames
    if (values["chunk-kb"] !== undefined && Math.max(fb, Math.floor((chunkKb * 1024) / fb) * fb) !== saved.chunkBytes)
      note(`keeping the interrupted run's chunks of ${saved.chunkBytes} bytes (--chunk-kb ${chunkKb} applies to new streams).`);
  }

  const takenAt = saved?.begin.takenAt ?? values["taken-at"] ?? new Date().toISOString();
  const begin = { assetId, ...(measurementPointId !== undefined ? { measurementPointId } : {}), sampleRate, channels, sampleFormat: "f32le" as const, takenAt };
  // Set once the server has begun (or resumed) a session; assigned in callbacks, hence the widened type.
  let writer = null as ReturnType<typeof stateWriter> | null;
  let stateProblemTold = false;
  const checkStateWrites = () => {
    const failure = writer?.takeFailure();
    if (failure && !stateProblemTold) {
      stateProblemTold = true;
      bar.note(`gateway: note: cannot save the stream state in ${stateDir} (${failure.message}); if this run is interrupted, the next one starts over.`);
    }
  };
  // Ctrl-C or a polite kill: save where the stream stands, then leave. (A hard kill leaves the last periodic save.)
  for (const [signal, code] of [["SIGINT", 130], ["SIGTERM", 143]] as const)
    process.once(signal, () => {
      bar.done();
      if (!writer) {
        process.stderr.write(`\ngateway: interrupted before the server began the stream; nothing to resume.\n`);
        process.exit(code);
      }
      try {
        writer.flushSync();
        process.stderr.write(
          `\ngateway: interrupted after ${writer.state.ackedChunks} of ${writer.state.totalChunks} chunks; run the same command again to resume stream ${writer.state.sessionId}.\n`,
        );
      } catch (err) {
        process.stderr.write(`\ngateway: interrupted; the stream state could not be saved (${(err as Error).message}).\n`);
      }
      process.exit(code);
    });

  let abortTold = false;
  const testDelayMs = process.env.NODE_ENV === "test" ? Number(process.env.BARHOUND_TEST_GATEWAY_ACK_DELAY_MS) || 0 : 0;

  try {
    const result = await streamCapture({
      url,
      token,
      ...begin,
      frames,
      chunkBytes: saved?.chunkBytes ?? chunkKb * 1024,
      ...(saved ? { resumeSessionId: saved.sessionId } : {}),
      ...(discarded ? { abortSessionId: discarded.state.sessionId, abortReason: discarded.reason.slice(0, 200) } : {}),
      onAbort: (outcome) => {
        abortTold = true;
        note(`${discarded!.why}: ${abandonment(discarded!.state, outcome)}; starting a new one.`);
      },
      onResumeRefused: (error) => bar.note(`gateway: ${resumeRefusal(saved!, error, tokenPrefix(token))}`),
      onBegin: async ({ sessionId, nextSeq, resumed, chunkBytes, totalChunks }) => {
        if (saved && resumed && sessionId === saved.sessionId && !writer)
          note(`resuming stream ${sessionId} at chunk ${nextSeq} of ${totalChunks} (the server's count; the state file had ${saved.ackedChunks}).`);
        if (writer?.state.sessionId === sessionId) return writer.progress(nextSeq);
        const now = new Date().toISOString();
        const state: GatewayState = {
          format: STATE_FORMAT,
          sessionId,
          url,
          tokenPrefix: tokenPrefix(token),
          file: fileId,
          begin,
          chunkBytes,
          totalChunks,
          ackedChunks: nextSeq,
          startedAt: resumed && saved ? saved.startedAt : now,
          updatedAt: now,
        };
        writer = stateWriter(stateFile, state);
        await writer.save(state); // before any chunk is sent, so a kill from here on can resume
        checkStateWrites();
      },
      onProgress: async (p) => {
        bar.update(p.ackedBytes, p.totalBytes);
        writer?.progress(p.seq + 1);
        checkStateWrites();
        if (testDelayMs) await new Promise((r) => setTimeout(r, testDelayMs));
      },
      onRetry: ({ attempt, error }) => bar.note(`gateway: ${error.message.replace(/\.?$/, ".")} Retrying (attempt ${attempt}); the stream goes on where the server left off.`),
    });
    bar.done();
    if (writer) await writer.remove();
    else await removeState(stateFile);
    if (result.alreadyEnded) {
      note(
        `the server had already finished stream ${result.sessionId} as capture ${result.captureId} (${result.status}); nothing was sent again. ` +
          `Use --fresh to stream ${fileName} once more.`,
      );
    } else {
      if (result.resumedAt.length) note(`resumed ${result.resumedAt.length} time(s), at chunk(s) ${result.resumedAt.join(", ")}.`);
      note(`capture ${result.captureId} ${result.status} (${result.totalChunks} chunks).`);
    }
    process.stdout.write(`${result.captureId}\n`);
  } catch (err) {
    bar.done();
    if (writer) await writer.save(writer.state); // the latest count, for the next run's messages
    const refused = err instanceof StreamRefused ? err.error : null;
    let pending = writer?.state ?? saved; // the stream a next run would resume
    let dropped: string | null = null;
    // Past the server's size limit, resuming cannot help: the session is aborted (its frames dropped now, not at the
    // server's 48 h sweep) and the state removed, so a later run (a raised limit) streams the file from the start.
    if (refused?.code === "stream-too-large" && writer) {
      const sessionId = writer.state.sessionId;
      const outcome = await abortStream({ url, token, sessionId, reason: "the capture is larger than the server's stream limit" }).catch((e: Error) => e);
      if (!(outcome instanceof Error) && (outcome.result === "aborted" || outcome.result === "already-aborted")) {
        await writer.remove();
        pending = null;
        dropped = `The partial stream ${sessionId} was dropped on the server.`;
      } else {
        const why = outcome instanceof Error ? outcome.message : "detail" in outcome ? outcome.detail : "error" in outcome ? outcome.error.message : outcome.result;
        dropped =
          `The partial stream ${sessionId} could not be dropped on the server (${why.replace(/\.$/, "")}); the server gives it up after 48 h. ` +
          `Its state is kept (${stateFile}): a run after the limit is raised resumes it.`;
        pending = null; // said above, instead of "run the same command again"
      }
    }
    fail(failureText(err as Error, refused, { token, pending, stateFile, discarded: abortTold ? null : discarded, fileName, frameBytes: frames.length, dropped }));
  }
}

/** The one message of a failed run: the server's reason, then what becomes of the interrupted stream. */
function failureText(
  err: Error,
  refused: StreamError | null,
  o: {
    token: string;
    pending: GatewayState | null;
    stateFile: string;
    discarded: { state: GatewayState; why: string } | null;
    fileName: string;
    frameBytes: number;
    /** What became of a stream given up after the refusal (stream-too-large). */
    dropped: string | null;
  },
): string {
  const { pending, stateFile } = o;
  let text: string;
  if (refused?.code === "stream-too-large") {
    // Decided on the code; the numbers are the server's when it gives them (its words are shown otherwise).
    const { limitBytes, bytesReceived } = refused;
    const said =
      typeof limitBytes === "number" && typeof bytesReceived === "number"
        ? `its limit of ${mib(limitBytes)} for one stream; it took the first ${mib(bytesReceived)}`
        : `its limit for one stream (${refused.message.replace(/\.$/, "")})`;
    text =
      `the server refused the stream: ${o.fileName} is ${mib(o.frameBytes)} of samples, more than ${said}, and nothing more was sent. ` +
      `Stream shorter captures, or ask the server's admin to raise the limit (UPLOAD_LIMIT_MB).`;
    if (o.dropped) text += ` ${o.dropped}`;
    if (pending) text += ` Run the same command again to resume stream ${pending.sessionId} (state in ${stateFile}).`;
  } else if (refused?.code === "bad-frame" && refused.reason === "non-finite-sample") {
    // The file must change to get past this; a run with the changed file starts over (and drops the saved stream).
    const at = typeof refused.frame === "number" && typeof refused.channel === "number" ? ` (chunk ${refused.seq ?? "?"}, frame ${refused.frame}, channel ${refused.channel}; counted from 0)` : "";
    text = `the server refused a sample that is not a finite number${at}: ${refused.message} Correct ${o.fileName} and run the command again; the interrupted stream is then begun anew.`;
  } else if (refused?.code === "unknown-token") {
    // Not revoked: the token itself is wrong (mistyped, cut short, another server's), so checking it is the way on.
    const prefix = tokenPrefix(o.token);
    text =
      `the server does not accept this token (${prefix ? `${prefix}_…` : "not a bhg_… token"}): ${refused.message} ` +
      `Check the token given with --token or BARHOUND_GATEWAY_TOKEN.`;
    if (pending)
      text += ` The interrupted stream ${pending.sessionId} was not resumed; its state is kept (${stateFile}), so the same command with the right token resumes it.`;
  } else {
    text = refused ? `the server refused the ${refused.code === "unauthorized" ? "token" : "stream"}: ${refused.message}` : err.message;
    if (refused?.code === "revoked" && pending)
      text +=
        ` The interrupted stream ${pending.sessionId} (${pending.ackedChunks} of ${pending.totalChunks} chunks acknowledged) was not resumed;` +
        ` with a new token the file is streamed again from the start.`;
    else if (pending) text += ` Run the same command again to resume stream ${pending.sessionId} (state in ${stateFile}).`;
  }
  // The run gave a saved stream up but stopped before the server was asked to abandon it.
  if (o.discarded) text += ` The interrupted stream ${o.discarded.state.sessionId} is not resumed (${o.discarded.why}); the next run starts over too.`;
  return text;
}

/** "512 MiB", "3.2 MiB" or "900 KiB" (a size for one line). */
function mib(bytes: number): string {
  if (bytes < 1024 * 1024) return `${Math.round(bytes / 1024)} KiB`;
  const m = bytes / (1024 * 1024);
  return `${m >= 10 ? Math.round(m) : m.toFixed(1)} MiB`;
}

/** What differs in the begin parameters from the saved stream's ("the sample rate is now 5000 Hz (was 10000 Hz)"), or null. */
function settingsChange(saved: GatewayState["begin"], now: { sampleRate: number; channels: StreamChannel[]; takenAt?: string }): string | null {
  if (saved.sampleRate !== now.sampleRate) return `the sample rate is now ${now.sampleRate} Hz (was ${saved.sampleRate} Hz)`;
  if (JSON.stringify(saved.channels) !== JSON.stringify(now.channels)) return "the channel descriptions changed";
  if (now.takenAt !== undefined && Date.parse(now.takenAt) !== Date.parse(saved.takenAt)) return `--taken-at is now ${now.takenAt} (was ${saved.takenAt})`;
  return null;
}

/** What became of the saved stream this run gave up (a new one is begun after it), for one line. */
function abandonment(old: GatewayState, outcome: AbortOutcome): string {
  const was = `stream ${old.sessionId} (${old.ackedChunks} of ${old.totalChunks} chunks acknowledged)`;
  switch (outcome.result) {
    case "aborted":
      return `abandoned the interrupted ${was} on the server`;
    case "already-aborted":
      return `the interrupted ${was} was already abandoned on the server`;
    case "unsupported":
      return `not resuming the interrupted ${was}; this server cannot abandon it (${outcome.detail.replace(/\.$/, "")}), so the old session is left to the server's 48 h sweep`;
    case "refused": {
      // Decided on code and reason (protocol.ts), never on the server's words, which are only shown. An older server
      // without reasons names the capture of an ended session in captureId, which is as good.
      const { code, reason, captureId } = outcome.error;
      if (code === "unknown-session") return `not resuming the interrupted ${was}; the server does not know it (begun with another gateway's token, or removed)`;
      if (code === "session-closed" && (reason === "ended" || (reason === undefined && typeof captureId === "number")))
        return `the interrupted ${was} had already ended on the server${typeof captureId === "number" ? ` as capture ${captureId}` : ""}, which stays`;
      if (code === "session-closed" && reason === "ended-capture-deleted")
        return `the interrupted ${was} had already ended on the server; its capture has since been deleted`;
      return `not resuming the interrupted ${was}; the server did not abandon it (${outcome.error.message.replace(/\.$/, "")})`;
    }
  }
}

/** One line on why the saved stream is not resumed (a new one is begun after it). */
function resumeRefusal(saved: GatewayState, error: StreamError, nowPrefix: string | null): string {
  const id = saved.sessionId;
  const then = `${saved.ackedChunks} of ${saved.totalChunks} chunks were acknowledged`;
  const general = `the server cannot resume the interrupted stream ${id} (${error.message.replace(/\.$/, "")}); starting a new stream.`;
  switch (error.code) {
    case "unknown-session": {
      const other = saved.tokenPrefix && nowPrefix && saved.tokenPrefix !== nowPrefix;
      const why = other
        ? `it was begun with token ${saved.tokenPrefix}_…, this run uses ${nowPrefix}_…`
        : "it was begun with another gateway's token, or removed";
      return `the server does not know the interrupted stream ${id} (${why}); starting a new stream.`;
    }
    case "session-closed":
      // Decided on the reason only (protocol.ts); an older server without one gets the general line below.
      switch (error.reason) {
        case "ended-capture-deleted":
          return `the server finished the interrupted stream ${id}, but its capture has since been deleted; starting a new stream.`;
        case "aborted-by-gateway":
          return `the interrupted stream ${id} was abandoned by a gateway run that started over (${then}); starting a new stream.`;
        case "aborted-by-sweep":
          return `the server has given up the interrupted stream ${id} (no progress for too long; ${then}); starting a new stream.`;
      }
      return general;
    default:
      return general;
  }
}

await main();
process.exit(0);
