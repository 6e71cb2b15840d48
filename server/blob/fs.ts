import fs from "node:fs";
import fsp from "node:fs/promises";
import path from "node:path";
import crypto from "node:crypto";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { checkKey, type BlobFile, type BlobSource, type BlobStore } from "./store.ts";

/**
 * Blobs as files under one root folder. Writes go to a temp file in the same folder, then rename (atomic). A file
 * source with `move: true` is renamed into place directly (no copy; also atomic), or copied and then removed when
 * it is on another file system (EXDEV).
 */
export function createFsBlobStore(root: string): BlobStore {
  const abs = (key: string) => path.join(root, checkKey(key));
  return {
    driver: "fs",
    async put(key, source) {
      const dest = abs(key);
      await fsp.mkdir(path.dirname(dest), { recursive: true });
      if (isPath(source) && source.move && (await moveInto(source.path, dest))) return { size: (await fsp.stat(dest)).size };
      const tmp = `${dest}.${crypto.randomBytes(6).toString("hex")}.part`;
      try {
        if (isPath(source)) await fsp.copyFile(source.path, tmp);
        else if (source instanceof Uint8Array) await fsp.writeFile(tmp, source);
        else await pipeline(source, fs.createWriteStream(tmp));
        await fsp.rename(tmp, dest);
      } catch (err) {
        await fsp.rm(tmp, { force: true });
        throw err;
      }
      if (isPath(source) && source.move) await fsp.rm(source.path, { force: true });
      return { size: (await fsp.stat(dest)).size };
    },
    async get(key) {
      return fsp.readFile(abs(key));
    },
    async getStream(key) {
      const p = abs(key);
      await fsp.access(p);
      return fs.createReadStream(p);
    },
    async delete(key) {
      await fsp.rm(abs(key), { force: true });
    },
    async exists(key) {
      return fsp
        .stat(abs(key))
        .then((s) => s.isFile())
        .catch(() => false);
    },
    async list(prefix = "") {
      const out: string[] = [];
      const walk = async (dir: string) => {
        const entries = await fsp.readdir(dir, { withFileTypes: true }).catch(() => []);
        for (const e of entries) {
          const p = path.join(dir, e.name);
          if (e.isDirectory()) await walk(p);
          else out.push(path.relative(root, p).split(path.sep).join("/"));
        }
      };
      await walk(root);
      return out.filter((k) => k.startsWith(prefix)).sort();
    },
  };
}

/** Renames a file into place; false when it is on another file system (the caller copies instead). */
async function moveInto(from: string, dest: string): Promise<boolean> {
  try {
    await fsp.rename(from, dest);
    return true;
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === "EXDEV") return false;
    throw err;
  }
}

export function isPath(source: BlobSource): source is BlobFile {
  return !(source instanceof Uint8Array) && !(source instanceof Readable) && typeof (source as { path?: unknown }).path === "string";
}
