// The command-line gateway's saved state: one small JSON file per stream, so a gateway restarted after a power cut,
// a crash or Ctrl-C resumes the stream the server already holds instead of starting over.
//
// The file is a hint, the server is the truth: it records which session to ask about, the file it was streaming
// (size and sha256, so a changed file is not resumed), the begin parameters and chunk size the session was begun
// with, and the chunks acknowledged when it was last written. Writes are atomic (temp file, fsync, rename): a
// kill in the middle leaves the previous version. It is written once right after "begin" is acknowledged (before
// any chunk is sent) and then at most every PROGRESS_WRITE_MS while chunks are acknowledged, not after every chunk:
// the resume point comes from the server, so a stale count costs nothing, and a device on flash storage is spared
// an fsync per chunk.

import crypto from "node:crypto";
import fs from "node:fs";
import fsp from "node:fs/promises";
import path from "node:path";
import { z } from "zod";
import { SAMPLE_FORMATS, streamChannel } from "../server/gateway/protocol.ts";

export const STATE_FORMAT = "barhound-gateway-state-1";

/** Progress is written at most this often; the begin is written at once. */
export const PROGRESS_WRITE_MS = 500;

const REPO_ROOT = path.resolve(import.meta.dirname, "..");

/** --state-dir, else BARHOUND_GATEWAY_STATE_DIR, else .data/gateway-state in the checkout (not the working directory). */
export function defaultStateDir(): string {
  return process.env.BARHOUND_GATEWAY_STATE_DIR ? path.resolve(process.env.BARHOUND_GATEWAY_STATE_DIR) : path.join(REPO_ROOT, ".data", "gateway-state");
}

/** Why a state folder is not acceptable, or null. The sample captures are regenerated, so their folder is off limits. */
export function stateDirProblem(dir: string): string | null {
  const rel = path.relative(path.join(REPO_ROOT, "sample-data"), path.resolve(dir));
  if (rel === "" || (!rel.startsWith("..") && !path.isAbsolute(rel))) return `--state-dir must not be inside sample-data/ (${dir}).`;
  return null;
}

export const gatewayState = z.object({
  format: z.literal(STATE_FORMAT),
  sessionId: z.uuid(),
  url: z.string(),
  /** "bhg_<8 hex>" of the token the stream was begun with (the prefix is not secret; the token is never saved). */
  tokenPrefix: z.string().nullable(),
  file: z.object({ path: z.string(), size: z.number().int().min(0), mtimeMs: z.number(), sha256: z.string().regex(/^[0-9a-f]{64}$/) }),
  begin: z.object({
    assetId: z.number().int().positive(),
    measurementPointId: z.number().int().positive().optional(),
    sampleRate: z.number().int().positive(),
    channels: z.array(streamChannel).min(1),
    sampleFormat: z.enum(SAMPLE_FORMATS),
    takenAt: z.string(),
  }),
  chunkBytes: z.number().int().positive(),
  totalChunks: z.number().int().positive(),
  /** Chunks acknowledged when the file was last written (a hint: the server may hold more). */
  ackedChunks: z.number().int().min(0),
  startedAt: z.string(),
  updatedAt: z.string(),
});
export type GatewayState = z.infer<typeof gatewayState>;

export interface StreamKey {
  url: string;
  filePath: string;
  assetId: number;
  measurementPointId?: number;
}

/** One state file per (server, file, motor, point); the token is left out so a run with another token is told why it cannot resume. */
export function statePath(dir: string, key: StreamKey): string {
  const id = crypto
    .createHash("sha256")
    .update(JSON.stringify([key.url.replace(/\/+$/, ""), path.resolve(key.filePath), key.assetId, key.measurementPointId ?? null]))
    .digest("hex")
    .slice(0, 20);
  return path.join(dir, `stream-${id}.json`);
}

export function tokenPrefix(token: string): string | null {
  return /^bhg_[0-9a-f]{8}_/.test(token) ? token.slice(0, 12) : null;
}

export function sha256(bytes: Uint8Array): string {
  return crypto.createHash("sha256").update(bytes).digest("hex");
}

export type LoadedState = { state: GatewayState } | { unreadable: string } | null;

/** The saved state at `file`, null when there is none, or why it cannot be used (then it is ignored). */
export async function loadState(file: string): Promise<LoadedState> {
  let text: string;
  try {
    text = await fsp.readFile(file, "utf8");
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === "ENOENT") return null;
    return { unreadable: (err as Error).message };
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    return { unreadable: "it is not valid JSON" };
  }
  const r = gatewayState.safeParse(json);
  return r.success ? { state: r.data } : { unreadable: `it is not a state file of this gateway version (${r.error.issues[0]?.message ?? "invalid"})` };
}

/** How the file differs from the one the saved stream was reading, or null when it is the same content. */
export function fileChange(saved: GatewayState["file"], now: { size: number; mtimeMs: number; sha256: string }): string | null {
  if (saved.size !== now.size) return `its size went from ${saved.size} to ${now.size} bytes`;
  if (saved.sha256 !== now.sha256)
    return `its content differs (same size${saved.mtimeMs !== now.mtimeMs ? `, modified ${new Date(now.mtimeMs).toISOString()}` : ""})`;
  return null;
}

/** Atomically replace `file` with `state` (temp file in the same folder, fsync, rename). */
export async function writeState(file: string, state: GatewayState): Promise<void> {
  await fsp.mkdir(path.dirname(file), { recursive: true });
  const tmp = `${file}.${process.pid}.tmp`;
  const fh = await fsp.open(tmp, "w");
  try {
    await fh.writeFile(JSON.stringify(state, null, 2) + "\n");
    await fh.datasync();
  } finally {
    await fh.close();
  }
  await fsp.rename(tmp, file);
}

/** The same, synchronously: for a signal handler that exits right after. */
export function writeStateSync(file: string, state: GatewayState): void {
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const tmp = `${file}.${process.pid}-sync.tmp`; // not the async writer's temp file, which may be in flight
  const fd = fs.openSync(tmp, "w");
  try {
    fs.writeFileSync(fd, JSON.stringify(state, null, 2) + "\n");
    fs.fdatasyncSync(fd);
  } finally {
    fs.closeSync(fd);
  }
  fs.renameSync(tmp, file);
}

/** Delete the state file and any temp file a killed run left beside it. */
export async function removeState(file: string): Promise<void> {
  await fsp.rm(file, { force: true });
  await removeStaleTemps(file);
}

export async function removeStaleTemps(file: string): Promise<void> {
  const dir = path.dirname(file);
  const base = path.basename(file);
  const names = await fsp.readdir(dir).catch(() => [] as string[]);
  for (const n of names) if (n.startsWith(`${base}.`) && n.endsWith(".tmp")) await fsp.rm(path.join(dir, n), { force: true }).catch(() => {});
}

/**
 * Keeps the state file in step with the stream: `save` writes now (awaited), `progress` at most every
 * PROGRESS_WRITE_MS in the background, one write at a time so an older write never lands after a newer one.
 */
export function stateWriter(file: string, initial: GatewayState) {
  let current = initial;
  let chain: Promise<void> = Promise.resolve();
  let lastWrite = 0;
  let failure: Error | null = null;
  const enqueue = () => {
    const snapshot = current;
    lastWrite = Date.now();
    chain = chain.then(() => writeState(file, snapshot)).catch((err) => void (failure ??= err as Error));
    return chain;
  };
  return {
    get state() {
      return current;
    },
    /** The first write failing is reported once (a gateway goes on streaming; it only loses the ability to resume). */
    takeFailure() {
      const f = failure;
      failure = null;
      return f;
    },
    async save(next: GatewayState) {
      current = next;
      await enqueue();
    },
    progress(ackedChunks: number) {
      current = { ...current, ackedChunks, updatedAt: new Date().toISOString() };
      if (Date.now() - lastWrite >= PROGRESS_WRITE_MS) void enqueue();
    },
    /** Wait for writes in flight, then delete the file. */
    async remove() {
      await chain;
      await removeState(file);
    },
    /** Write the latest state synchronously (signal handler). */
    flushSync() {
      writeStateSync(file, current);
    },
  };
}
