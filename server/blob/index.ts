import path from "node:path";
import type { Config } from "../config.ts";
import type { AppContext } from "../context.ts";
import type { BlobStore } from "./store.ts";
import { createFsBlobStore } from "./fs.ts";
import { createS3BlobStore } from "./s3.ts";

export type { BlobFile, BlobStore, BlobSource } from "./store.ts";

/** The configured blob store: files under dataDir/blobs, or an S3-compatible bucket when BLOB_DRIVER=s3. */
export async function createBlobStore(config: Config): Promise<BlobStore> {
  if (config.blob.driver === "s3") {
    const s3 = createS3BlobStore(config.blob);
    await s3.ensureBucket();
    return s3;
  }
  return createFsBlobStore(path.resolve(config.dataDir, "blobs"));
}

/** The blob store registered in ctx.services (startServer and the test helpers register one). */
export function blobStoreOf(ctx: AppContext): BlobStore {
  const store = ctx.services.blob as BlobStore | undefined;
  if (!store) throw new Error("no blob store registered in ctx.services.blob");
  return store;
}
