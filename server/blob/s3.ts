import fs from "node:fs";
import fsp from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import type { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import {
  S3Client,
  PutObjectCommand,
  GetObjectCommand,
  DeleteObjectCommand,
  HeadObjectCommand,
  ListObjectsV2Command,
  CreateBucketCommand,
  HeadBucketCommand,
} from "@aws-sdk/client-s3";
import type { Config } from "../config.ts";
import { checkKey, type BlobStore } from "./store.ts";
import { isPath } from "./fs.ts";

/** Blobs in an S3-compatible bucket. A PUT is atomic on the storage side: the object appears whole or not at all. */
export function createS3BlobStore(cfg: Config["blob"]): BlobStore & { ensureBucket(): Promise<void>; client: S3Client } {
  const client = new S3Client({
    region: cfg.region,
    endpoint: cfg.endpoint,
    forcePathStyle: cfg.forcePathStyle,
    // Checksums only where the API requires them: the default (a CRC32 trailer in aws-chunked encoding) is not
    // understood by every S3-compatible store, some of which would store the chunk framing as the object.
    requestChecksumCalculation: "WHEN_REQUIRED",
    responseChecksumValidation: "WHEN_REQUIRED",
    credentials: cfg.accessKeyId && cfg.secretAccessKey ? { accessKeyId: cfg.accessKeyId, secretAccessKey: cfg.secretAccessKey } : undefined,
  });
  const Bucket = cfg.bucket;
  const notFound = (err: unknown) => {
    const e = err as { name?: string; $metadata?: { httpStatusCode?: number } };
    return e?.name === "NotFound" || e?.name === "NoSuchKey" || e?.$metadata?.httpStatusCode === 404;
  };
  return {
    driver: "s3",
    client,
    async ensureBucket() {
      try {
        await client.send(new HeadBucketCommand({ Bucket }));
      } catch {
        await client.send(new CreateBucketCommand({ Bucket }));
      }
    },
    async put(key, source) {
      // A known length lets the SDK send a plain PUT (no chunked signing) from a stream or a file.
      let Body: Buffer | Uint8Array | Readable;
      let ContentLength: number;
      if (isPath(source)) {
        // Streamed from the file, with or without `move` (the caller removes its temp file).
        ContentLength = (await fsp.stat(source.path)).size;
        Body = fs.createReadStream(source.path);
      } else if (source instanceof Uint8Array) {
        Body = source;
        ContentLength = source.byteLength;
      } else {
        // A stream of unknown length: spool it to a temp file first so memory stays flat for large captures.
        const dir = await fsp.mkdtemp(path.join(os.tmpdir(), "barhound-s3-"));
        try {
          const tmp = path.join(dir, "blob");
          await pipeline(source, fs.createWriteStream(tmp));
          return await this.put(key, { path: tmp });
        } finally {
          await fsp.rm(dir, { recursive: true, force: true });
        }
      }
      await client.send(new PutObjectCommand({ Bucket, Key: checkKey(key), Body, ContentLength }));
      return { size: ContentLength };
    },
    async get(key) {
      const r = await client.send(new GetObjectCommand({ Bucket, Key: checkKey(key) }));
      return Buffer.from(await r.Body!.transformToByteArray());
    },
    async getStream(key) {
      const r = await client.send(new GetObjectCommand({ Bucket, Key: checkKey(key) }));
      return r.Body as Readable;
    },
    async delete(key) {
      await client.send(new DeleteObjectCommand({ Bucket, Key: checkKey(key) }));
    },
    async exists(key) {
      try {
        await client.send(new HeadObjectCommand({ Bucket, Key: checkKey(key) }));
        return true;
      } catch (err) {
        if (notFound(err)) return false;
        throw err;
      }
    },
    async list(prefix = "") {
      const keys: string[] = [];
      let token: string | undefined;
      do {
        const r = await client.send(new ListObjectsV2Command({ Bucket, Prefix: prefix || undefined, ContinuationToken: token }));
        for (const o of r.Contents ?? []) if (o.Key) keys.push(o.Key);
        token = r.IsTruncated ? r.NextContinuationToken : undefined;
      } while (token);
      return keys.sort();
    },
  };
}
