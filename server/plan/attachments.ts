import fs from "node:fs/promises";
import path from "node:path";
import crypto from "node:crypto";
import { Readable } from "node:stream";
import type { RequestHandler } from "express";
import multer from "multer";
import type { AppContext } from "../context.ts";
import { HttpError } from "../errors.ts";

// Files a technician attaches to an inspection: a photo (PNG or JPEG) or a capture file (CSV or WAV).
// The type is decided from the bytes, not from what the browser claims, so a renamed executable is refused.

export const ATTACHMENT_LIMIT_BYTES = 25 * 1024 * 1024;

export type AttachmentKind = { contentType: string; ext: string; capture: boolean };

/** Decide what a file is from its first bytes (and, for text, its name); null when it is none of the kinds we take. */
export function sniffAttachment(buf: Buffer, fileName: string): AttachmentKind | null {
  if (buf.length >= 8 && buf.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])))
    return { contentType: "image/png", ext: "png", capture: false };
  if (buf.length >= 3 && buf[0] === 0xff && buf[1] === 0xd8 && buf[2] === 0xff) return { contentType: "image/jpeg", ext: "jpg", capture: false };
  if (buf.length >= 12 && buf.toString("latin1", 0, 4) === "RIFF" && buf.toString("latin1", 8, 12) === "WAVE")
    return { contentType: "audio/wav", ext: "wav", capture: true };
  // CSV has no magic number: accept text named .csv/.txt that is valid UTF-8 with no NUL bytes.
  if (/\.(csv|txt)$/i.test(fileName) && buf.length > 0 && !buf.includes(0) && isUtf8(buf))
    return { contentType: "text/csv", ext: "csv", capture: true };
  return null;
}

function isUtf8(buf: Buffer): boolean {
  try {
    new TextDecoder("utf-8", { fatal: true }).decode(buf);
    return true;
  } catch {
    return false;
  }
}

/** Multipart parser for one `file` part, with the size limit answered as 413 instead of multer's 500. */
export function attachmentUpload(limitBytes = ATTACHMENT_LIMIT_BYTES): RequestHandler {
  // Browsers send the file name as UTF-8 without saying so; multer's default (latin1) would turn "ü" into "Ã¼".
  const parse = multer({ storage: multer.memoryStorage(), limits: { fileSize: limitBytes, files: 1, fields: 10 }, defParamCharset: "utf8" }).single("file");
  return (req, res, next) => {
    parse(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        if (err.code === "LIMIT_FILE_SIZE")
          return next(new HttpError(413, `The file is larger than ${Math.round(limitBytes / 1024 / 1024)} MB.`, undefined, "too-large"));
        return next(new HttpError(400, `Upload refused: ${err.message}.`, { file: err.message }, "bad-request"));
      }
      next(err);
    });
  };
}

export interface AttachmentStore {
  put(key: string, body: Buffer, contentType: string): Promise<void>;
  get(key: string): Promise<Buffer>;
  delete(key: string): Promise<void>;
}

/** What we expect of the capture pipeline's blob store, when it is there. */
interface BlobService {
  put(key: string, body: Buffer, contentType?: string): Promise<unknown>;
  get(key: string): Promise<unknown>;
  delete(key: string): Promise<unknown>;
}

const isBlobService = (v: unknown): v is BlobService =>
  !!v && typeof (v as BlobService).put === "function" && typeof (v as BlobService).get === "function" && typeof (v as BlobService).delete === "function";

async function toBuffer(v: unknown): Promise<Buffer> {
  if (Buffer.isBuffer(v)) return v;
  if (v instanceof Uint8Array) return Buffer.from(v);
  if (v && typeof v === "object" && "body" in v) return toBuffer((v as { body: unknown }).body);
  if (v instanceof Readable || (v && typeof (v as AsyncIterable<unknown>)[Symbol.asyncIterator] === "function")) {
    const chunks: Buffer[] = [];
    for await (const c of v as AsyncIterable<Buffer | string>) chunks.push(Buffer.isBuffer(c) ? c : Buffer.from(c));
    return Buffer.concat(chunks);
  }
  throw new Error("blob store returned something that is not bytes");
}

/**
 * The shared blob store (ctx.services.blob, registered by the capture pipeline) when there is one; otherwise files
 * live under <dataDir>/attachments. Looked up on every call, because services may be registered after the routes
 * are built. Keys are ours ("inspections/<id>/<uuid>.<ext>"), never a user's file name.
 */
export function attachmentStore(ctx: AppContext): AttachmentStore {
  const shared = (): BlobService | null => {
    const b = ctx.services.blob ?? ctx.services.blobs;
    return isBlobService(b) ? b : null;
  };
  const root = path.resolve(ctx.config.dataDir, "attachments");
  const file = (key: string) => {
    const p = path.resolve(root, key);
    if (!p.startsWith(root + path.sep)) throw new Error("attachment key escapes the store");
    return p;
  };
  return {
    async put(key, body, contentType) {
      const b = shared();
      if (b) return void (await b.put(key, body, contentType));
      await fs.mkdir(path.dirname(file(key)), { recursive: true });
      await fs.writeFile(file(key), body);
    },
    async get(key) {
      const b = shared();
      return b ? toBuffer(await b.get(key)) : fs.readFile(file(key));
    },
    async delete(key) {
      const b = shared();
      if (b) return void (await b.delete(key));
      await fs.rm(file(key), { force: true });
    },
  };
}

export const attachmentKey = (inspectionId: number, ext: string) => `inspections/${inspectionId}/${crypto.randomUUID()}.${ext}`;

/** A file name safe to store and to echo in Content-Disposition. */
export function cleanFileName(name: string | undefined, ext: string): string {
  // eslint-disable-next-line no-control-regex
  const base = path.basename(name ?? "").replace(/[\u0000-\u001f\u007f"\\/]/g, "").trim().slice(0, 200);
  return base || `attachment.${ext}`;
}
