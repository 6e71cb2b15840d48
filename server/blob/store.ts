import type { Readable } from "node:stream";

/**
 * What a blob can be written from: bytes in memory, a readable stream, or a file already on disk. A file with
 * `move: true` is one the caller no longer needs (an upload's temp file): the store may take it, the file-system
 * driver by renaming it into place instead of copying, so the caller must not use the path afterwards (removing
 * its folder is still fine).
 */
export type BlobSource = Buffer | Uint8Array | Readable | BlobFile;

export interface BlobFile {
  path: string;
  move?: boolean;
}

/**
 * Where capture files live. Keys are slash-separated relative paths ("captures/2026/12/<uuid>.csv").
 * Implementations must make `put` atomic: a reader never sees a half-written blob.
 */
export interface BlobStore {
  readonly driver: "fs" | "s3";
  put(key: string, source: BlobSource): Promise<{ size: number }>;
  get(key: string): Promise<Buffer>;
  getStream(key: string): Promise<Readable>;
  delete(key: string): Promise<void>;
  exists(key: string): Promise<boolean>;
  /** Every key under a prefix (tests and housekeeping). */
  list(prefix?: string): Promise<string[]>;
}

/** Refuse keys that could escape the store's root. */
export function checkKey(key: string): string {
  if (!key || key.startsWith("/") || key.split("/").some((p) => p === ".." || p === "." || p === "") || key.includes("\\"))
    throw new Error(`invalid blob key: ${key}`);
  return key;
}
