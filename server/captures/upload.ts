// Upload intake: multipart files are streamed by multer to a private temp folder under dataDir (never held
// whole in memory while receiving), checked by content as they are read back in 1 MiB chunks through the engine's
// streaming validator (the full parser's verdict, never the whole file in memory), then handed to
// storeCapturesAndQueue, which moves them into the blob store. The temp folder is removed whatever happens.
import fs from "node:fs";
import fsp from "node:fs/promises";
import path from "node:path";
import crypto from "node:crypto";
import multer from "multer";
import type { Request, Response } from "express";
import { CaptureParseError, parseCapture, sniffFormat, validateCapture, type CaptureSummary } from "../../src/engine/parse/index.ts";
import type { AppContext } from "../context.ts";
import { HttpError } from "../errors.ts";
import type { CaptureMeta } from "./ingest.ts";

export const MAX_FILES_PER_UPLOAD = 20;
/** Read size when checking a received file: the validator holds about this much (plus one partial line). */
export const CHECK_CHUNK_BYTES = 1 << 20;

export interface ReceivedFile {
  fileName: string;
  path: string;
  size: number;
}

/** Where uploads are received: one `upload-<uuid>` folder per request under this. */
export const uploadTempRoot = (dataDir: string) => path.resolve(dataDir, "tmp");
const UPLOAD_TEMP_PREFIX = "upload-";

/** Receive the multipart body into a fresh temp folder. Returns the folder (to remove) and the form. */
export async function receiveMultipart(ctx: AppContext, req: Request, res: Response): Promise<{ dir: string; files: ReceivedFile[]; fields: Record<string, unknown> }> {
  const dir = path.join(uploadTempRoot(ctx.config.dataDir), `${UPLOAD_TEMP_PREFIX}${crypto.randomUUID()}`);
  await fsp.mkdir(dir, { recursive: true });
  const upload = multer({
    storage: multer.diskStorage({ destination: dir, filename: (_req, _file, cb) => cb(null, crypto.randomUUID()) }),
    limits: { fileSize: ctx.config.uploadLimitBytes, files: MAX_FILES_PER_UPLOAD, fields: 50, fieldSize: 64 * 1024 },
  }).array("file", MAX_FILES_PER_UPLOAD);
  try {
    await new Promise<void>((resolve, reject) => upload(req, res, (err: unknown) => (err ? reject(err) : resolve())));
  } catch (err) {
    await fsp.rm(dir, { recursive: true, force: true });
    throw multerError(err, ctx.config.uploadLimitBytes);
  }
  const files = ((req.files as Express.Multer.File[] | undefined) ?? []).map((f) => ({ fileName: f.originalname, path: f.path, size: f.size }));
  return { dir, files, fields: { ...(req.body ?? {}) } };
}

function multerError(err: unknown, limit: number): unknown {
  const e = err as { code?: string; field?: string; message?: string };
  const mb = (limit / 1024 / 1024).toFixed(limit < 1024 * 1024 ? 2 : 0);
  switch (e.code) {
    case "LIMIT_FILE_SIZE":
      return new HttpError(413, `The file is larger than the upload limit of ${mb} MB. Split the recording or shorten it.`, { file: `Larger than ${mb} MB` }, "too-large");
    case "LIMIT_FILE_COUNT":
      return new HttpError(400, `At most ${MAX_FILES_PER_UPLOAD} files per upload.`, { file: `At most ${MAX_FILES_PER_UPLOAD} files` }, "bad-request");
    case "LIMIT_UNEXPECTED_FILE":
      return new HttpError(400, `Send capture files in form parts named "file" (got "${e.field}").`, { file: "Unexpected file field" }, "bad-request");
    case "LIMIT_FIELD_VALUE":
    case "LIMIT_FIELD_COUNT":
    case "LIMIT_PART_COUNT":
    case "LIMIT_FIELD_KEY":
      return new HttpError(400, "The form has too many or too large fields.", undefined, "bad-request");
    default:
      if (e.message && /multipart|boundary|Unexpected end/i.test(e.message)) return new HttpError(400, `The upload is not a readable multipart form: ${e.message}`, undefined, "bad-request");
      return err;
  }
}

/** A rejected file: 415 when it is not a capture type at all, 422 when it is CSV/WAV but cannot be used. */
export class FileRejected extends HttpError {
  constructor(
    status: number,
    message: string,
    code: string,
    public detail: { fileName: string; line?: number; column?: number; byte?: number },
  ) {
    super(status, message, { file: message }, code);
  }
}

export interface CheckedFile extends ReceivedFile {
  format: "csv" | "wav";
  meta: Required<CaptureMeta>;
}

/**
 * Tell the type from the first bytes, then stream the whole file through the engine's validator (the full parser's
 * rules and messages, in bounded memory) so a bad file is refused now, with the message naming the line or byte,
 * rather than failing later in the worker. The file is read once, or twice when the validator asks (a CSV time
 * column it cannot settle in one reading, WAV float data before its "fmt " chunk).
 */
export async function checkFile(f: ReceivedFile, sampleRate: number | undefined): Promise<CheckedFile> {
  const head = Buffer.alloc(Math.min(4096, f.size));
  if (f.size > 0) {
    const fh = await fsp.open(f.path, "r");
    try {
      await fh.read(head, 0, head.length, 0);
    } finally {
      await fh.close();
    }
  }
  if (f.size === 0) throw new FileRejected(422, `"${f.fileName}" is empty.`, "empty", { fileName: f.fileName });
  const format = sniffFormat(head);
  if (!format) {
    // Let the parser phrase it (it recognises spreadsheets, PDFs, audio…).
    let message = `"${f.fileName}" is neither a CSV table of numbers nor a WAV recording. Upload a .csv or .wav capture.`;
    try {
      parseCapture(head, { fileName: f.fileName });
    } catch (err) {
      if (err instanceof CaptureParseError && err.code === "unknown-format") message = err.message;
    }
    throw new FileRejected(415, message, "unsupported-type", { fileName: f.fileName, byte: 0 });
  }
  try {
    const summary = await validateCapture(() => fs.createReadStream(f.path, { highWaterMark: CHECK_CHUNK_BYTES }), { fileName: f.fileName, sampleRate });
    return { ...f, format: summary.format, meta: captureMeta(summary) };
  } catch (err) {
    if (err instanceof CaptureParseError) {
      const status = err.code === "unknown-format" ? 415 : 422;
      const message = err.message.includes(f.fileName) ? err.message : `${f.fileName}: ${err.message}`;
      throw new FileRejected(status, message, err.code, { fileName: f.fileName, line: err.line, column: err.column, byte: err.byte });
    }
    throw err;
  }
}

/** Sample rate, duration and channel list for the captures row. */
export function captureMeta(summary: CaptureSummary): Required<CaptureMeta> {
  return {
    sampleRate: summary.sampleRate,
    durationS: summary.durationS,
    channels: summary.channels.map((c) => ({ name: c.name, kind: c.kind, unit: c.unit, position: c.position ?? null })),
  };
}

export function removeDir(dir: string) {
  return fsp.rm(dir, { recursive: true, force: true });
}

/**
 * Upload temp folders (`dataDir/tmp/upload-*`, and any stray file of that name) that a crashed server left behind:
 * removed when nothing in them was written for `olderThanMs` (default an hour), so an upload still being received by
 * another server process on the same data folder keeps its folder (its file's mtime moves as bytes arrive). Run at
 * server start. Returns the names removed; never throws for one entry it cannot read or remove.
 */
export async function removeStaleUploadTemp(dataDir: string, opts: { olderThanMs?: number; now?: number } = {}): Promise<string[]> {
  const root = uploadTempRoot(dataDir);
  const cutoff = (opts.now ?? Date.now()) - (opts.olderThanMs ?? 3_600_000);
  let entries: fs.Dirent[];
  try {
    entries = await fsp.readdir(root, { withFileTypes: true });
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === "ENOENT") return [];
    throw err;
  }
  const removed: string[] = [];
  for (const e of entries) {
    if (!e.name.startsWith(UPLOAD_TEMP_PREFIX)) continue;
    const full = path.join(root, e.name);
    try {
      if ((await newestMtimeMs(full)) > cutoff) continue;
      await fsp.rm(full, { recursive: true, force: true });
      removed.push(e.name);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== "ENOENT") console.error(`[upload] could not remove the stale temp ${full}:`, (err as Error).message);
    }
  }
  return removed;
}

/** The newest mtime of a file, or of a folder and everything in it. */
async function newestMtimeMs(p: string): Promise<number> {
  const st = await fsp.lstat(p);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const name of await fsp.readdir(p)) newest = Math.max(newest, await newestMtimeMs(path.join(p, name)).catch(() => 0));
  return newest;
}
