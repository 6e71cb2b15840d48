// Command-line gateway: streams a capture file to Barhound the way a site gateway does (f32le frames over the
// "/gateway" socket.io namespace), with a progress bar on stderr, and prints the new capture's id on stdout.
//
//   npm run gateway -- --file sample-data/pump-7.csv --asset 12 --token bhg_… [--url http://localhost:5180]
//                      [--chunk-kb 64] [--point 3] [--sample-rate 10000] [--taken-at 2026-12-01T08:30:00Z]

import fs from "node:fs/promises";
import path from "node:path";
import { parseArgs } from "node:util";
import { parseCapture, isCaptureParseError } from "../src/engine/parse/index.ts";
import { captureToF32Frames } from "../server/gateway/assemble.ts";
import { streamCapture, StreamRefused } from "../server/gateway/stream-client.ts";
import { CHANNEL_KINDS, type StreamChannel } from "../server/gateway/protocol.ts";

const USAGE = `Usage: npm run gateway -- --file FILE --asset ID --token TOKEN [--url URL] [--chunk-kb 64]
  --file         a capture file (.csv or .wav)
  --asset        the motor's id in Barhound
  --token        the gateway token an admin created (bhg_…); or set BARHOUND_GATEWAY_TOKEN
  --url          server address (default http://localhost:5180)
  --chunk-kb     chunk size in KiB (default 64)
  --point        measurement point id (optional)
  --sample-rate  sample rate in Hz, for a CSV without a time column or sample-rate comment
  --taken-at     when the capture was recorded (ISO 8601; default now)`;

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
  return {
    update(done: number, total: number) {
      const pct = Math.floor((done / total) * 100);
      if (pct === lastPct) return;
      lastPct = pct;
      const width = 30;
      const filled = Math.round((pct / 100) * width);
      const line = `${label} [${"#".repeat(filled)}${"-".repeat(width - filled)}] ${String(pct).padStart(3)} %  ${(done / 1024).toFixed(0)}/${(total / 1024).toFixed(0)} KiB`;
      if (tty) process.stderr.write(`\r${line}`);
      else if (pct % 25 === 0) process.stderr.write(`${line}\n`);
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
        "chunk-kb": { type: "string", default: "64" },
        point: { type: "string" },
        "sample-rate": { type: "string" },
        "taken-at": { type: "string" },
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
  const chunkKb = positiveInt(values["chunk-kb"], "chunk-kb")!;
  if (chunkKb > 2048) fail("--chunk-kb may be at most 2048 (the server takes chunks up to 2 MiB).");

  let bytes: Uint8Array;
  try {
    bytes = await fs.readFile(values.file);
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
  const bar = progressBar(path.basename(values.file));
  process.stderr.write(
    `gateway: ${channels.length} channel(s) (${channels.map((c) => c.name).join(", ")}), ${samples} samples at ${sampleRate} Hz ` +
      `(${(samples / sampleRate).toFixed(1)} s) → ${values.url}\n`,
  );

  try {
    const result = await streamCapture({
      url: values.url!,
      token,
      assetId,
      measurementPointId: positiveInt(values.point, "point"),
      sampleRate,
      channels,
      sampleFormat: "f32le",
      frames,
      takenAt: values["taken-at"] ?? new Date().toISOString(),
      chunkBytes: chunkKb * 1024,
      onProgress: (p) => bar.update(p.ackedBytes, p.totalBytes),
      onRetry: ({ attempt, error }) => bar.note(`gateway: ${error.message.replace(/\.?$/, ".")} Retrying (attempt ${attempt}); the stream goes on where the server left off.`),
    });
    bar.done();
    if (result.resumedAt.length) process.stderr.write(`gateway: resumed ${result.resumedAt.length} time(s), at chunk(s) ${result.resumedAt.join(", ")}.\n`);
    process.stderr.write(`gateway: capture ${result.captureId} ${result.status} (${result.totalChunks} chunks).\n`);
    process.stdout.write(`${result.captureId}\n`);
  } catch (err) {
    bar.done();
    fail(err instanceof StreamRefused ? `the server refused the stream: ${err.message}` : (err as Error).message);
  }
}

await main();
process.exit(0);
