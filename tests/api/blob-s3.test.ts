import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import fs from "node:fs";
import fsp from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import S3rver from "s3rver";
import request from "supertest";
import { loadConfig } from "../../server/config.ts";
import { createBlobStore } from "../../server/blob/index.ts";
import { createFsBlobStore } from "../../server/blob/fs.ts";
import type { BlobStore } from "../../server/blob/store.ts";
import { signedIn } from "../helpers/context.ts";
import { captureFile, makeMotor, makePipelineEnv, type PipelineEnv } from "../helpers/pipeline.ts";

// The S3 driver against s3rver on a loopback port, and the same contract for the file-system driver.
let s3: S3rver;
let dir: string;
let endpoint: string;

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-s3rver-"));
  s3 = new S3rver({ address: "127.0.0.1", port: 0, silent: true, directory: dir });
  const addr = await s3.run();
  endpoint = `http://127.0.0.1:${addr.port}`;
});
afterAll(async () => {
  await s3?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const s3Env = () => ({
  BLOB_DRIVER: "s3",
  S3_ENDPOINT: endpoint,
  S3_BUCKET: "barhound-test",
  S3_ACCESS_KEY_ID: "S3RVER",
  S3_SECRET_ACCESS_KEY: "S3RVER",
  S3_REGION: "us-east-1",
});

async function contract(store: BlobStore) {
  const key = `captures/1/${Date.now()}.csv`;
  expect(await store.exists(key)).toBe(false);
  await store.put(key, Buffer.from("Ia\n1\n2\n"));
  expect(await store.exists(key)).toBe(true);
  expect((await store.get(key)).toString()).toBe("Ia\n1\n2\n");
  const streamed = `captures/1/${Date.now()}-s.csv`;
  await store.put(streamed, Readable.from([Buffer.from("a,"), Buffer.from("b\n")]));
  const chunks: Buffer[] = [];
  for await (const c of await store.getStream(streamed)) chunks.push(Buffer.from(c));
  expect(Buffer.concat(chunks).toString()).toBe("a,b\n");
  const file = path.join(dir, "from-disk.bin");
  fs.writeFileSync(file, Buffer.alloc(300_000, 7));
  await store.put("captures/2/disk.bin", { path: file });
  expect((await store.get("captures/2/disk.bin")).equals(Buffer.alloc(300_000, 7))).toBe(true);
  expect(await store.list("captures/1/")).toEqual([key, streamed].sort());
  await store.delete(key);
  expect(await store.exists(key)).toBe(false);
  await store.delete(key); // deleting twice is fine
  await expect(store.get(key)).rejects.toBeTruthy();
  await expect(store.put("../escape", Buffer.from("x"))).rejects.toThrow(/invalid blob key/);
}

describe("blob store", () => {
  it("S3 driver (BLOB_DRIVER=s3) puts, gets, streams, lists and deletes", async () => {
    const store = await createBlobStore(loadConfig({ NODE_ENV: "test", ...s3Env() }));
    expect(store.driver).toBe("s3");
    await contract(store);
  });

  it("file-system driver keeps the same contract and leaves no temp files", async () => {
    const root = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-fsblob-"));
    try {
      await contract(createFsBlobStore(root));
      const all = fs.readdirSync(root, { recursive: true }).map(String);
      expect(all.some((f) => f.endsWith(".part"))).toBe(false);
    } finally {
      fs.rmSync(root, { recursive: true, force: true });
    }
  });

  it("file-system driver moves a file given with move: true (same inode, source gone), and copies it across file systems", async () => {
    const root = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-fsblob-"));
    try {
      const store = createFsBlobStore(root);
      const source = path.join(root, "upload.tmp");
      fs.writeFileSync(source, Buffer.alloc(70_000, 3));
      const inode = fs.statSync(source).ino;
      expect(await store.put("captures/9/moved.csv", { path: source, move: true })).toEqual({ size: 70_000 });
      expect(fs.existsSync(source)).toBe(false);
      expect(fs.statSync(path.join(root, "captures/9/moved.csv")).ino).toBe(inode);

      // rename(2) across file systems fails with EXDEV: the driver copies (atomically, through a .part file) and
      // removes the source, as a move would.
      fs.writeFileSync(source, Buffer.alloc(50_000, 4));
      const sourceInode = fs.statSync(source).ino;
      const dest = path.join(root, "captures/9/copied.csv");
      const exdev = vi.spyOn(fsp, "rename").mockRejectedValueOnce(Object.assign(new Error("cross-device link not permitted"), { code: "EXDEV" }));
      try {
        expect(await store.put("captures/9/copied.csv", { path: source, move: true })).toEqual({ size: 50_000 });
        expect(exdev.mock.calls.map(([from, to]) => [path.relative(root, String(from)).replace(/\.[0-9a-f]{12}\.part$/, ".part"), to])).toEqual([
          ["upload.tmp", dest],
          ["captures/9/copied.csv.part", dest],
        ]);
      } finally {
        exdev.mockRestore();
      }
      expect(fs.statSync(dest).ino).not.toBe(sourceInode);
      expect(fs.existsSync(source)).toBe(false);
      expect(fs.readFileSync(path.join(root, "captures/9/copied.csv")).equals(Buffer.alloc(50_000, 4))).toBe(true);
      expect(await store.list("captures/9/")).toEqual(["captures/9/copied.csv", "captures/9/moved.csv"]);

      // Without move the source stays where it is.
      fs.writeFileSync(source, "Ia\n1\n");
      await store.put("captures/9/kept.csv", { path: source });
      expect(fs.readFileSync(source, "utf8")).toBe("Ia\n1\n");
    } finally {
      fs.rmSync(root, { recursive: true, force: true });
    }
  });

  it("an upload through the API lands in the S3 bucket", async () => {
    const cfg = loadConfig({ NODE_ENV: "test", ...s3Env() });
    let env: PipelineEnv | undefined;
    try {
      env = await makePipelineEnv({ blob: cfg.blob });
      const { asset } = await makeMotor(env.db);
      const agent = await signedIn(env.app, "technician");
      const file = captureFile();
      const res = await agent.post("/api/captures").field("assetId", String(asset.id)).attach("file", file, "s3.csv");
      expect(res.status).toBe(202);
      const row = await env.db("captures").where({ id: res.body.captures[0].id }).first();
      const store = await createBlobStore(cfg);
      expect(await store.exists(row.blob_key)).toBe(true);
      expect((await store.get(row.blob_key)).equals(file)).toBe(true); // the CSV itself, byte for byte
      expect(fs.existsSync(env.blobDir)).toBe(false);
      expect((await request(env.app).get("/api/health")).status).toBe(200);
    } finally {
      await env?.close();
    }
  });
});
