import { spawnSync } from "node:child_process";
import path from "node:path";
import type { TestProject } from "vitest/node";
import { register } from "tsx/esm/api";

declare module "vitest" {
  export interface ProvidedContext {
    databaseUrl: string;
  }
}

const ROOT = path.resolve(import.meta.dirname, "../..");
// Each run gets its own cluster folder and port (55433 upward), so parallel runs on one machine do not collide.
const PG_ENV: NodeJS.ProcessEnv = { ...process.env };

async function freePort(from: number): Promise<number> {
  const net = await import("node:net");
  for (let port = from; port < from + 200; port++) {
    const ok = await new Promise<boolean>((resolve) => {
      const s = net.createServer().once("error", () => resolve(false)).listen(port, "127.0.0.1", () => s.close(() => resolve(true)));
    });
    if (ok) return port;
  }
  throw new Error("no free port for the test database");
}

function pg(cmd: string): string {
  if (!PG_ENV.PG_DIR) throw new Error("test cluster folder not set");
  const r = spawnSync("bash", [path.join(ROOT, "scripts/pg.sh"), cmd], { env: PG_ENV, encoding: "utf8" });
  if (r.status !== 0) throw new Error(`scripts/pg.sh ${cmd} failed: ${r.stderr}`);
  return r.stdout.trim();
}

// A throw-away cluster on its own loopback port: created fresh for the run, destroyed after it, even when tests fail.
/** Clusters left behind by runs that were killed: destroy those whose vitest process is gone. */
async function sweepStale() {
  const fs = await import("node:fs");
  const dir = path.join(ROOT, ".data");
  if (!fs.existsSync(dir)) return;
  for (const name of fs.readdirSync(dir)) {
    const m = /^pg-test-(\d+)$/.exec(name);
    if (!m) continue;
    const ageHours = (Date.now() - fs.statSync(path.join(dir, name)).mtimeMs) / 3_600_000;
    if (ageHours < 3) continue;
    try {
      process.kill(Number(m[1]), 0);
    } catch {
      spawnSync("bash", [path.join(ROOT, "scripts/pg.sh"), "destroy"], { env: { ...process.env, PG_DIR: path.join(dir, name) } });
    }
  }
}

// vitest runs this once per project; the first call starts the cluster, the others share it, the last
// teardown destroys it. State lives on globalThis because each project may load this module afresh.
interface Shared {
  url: Promise<string>;
  users: number;
  destroy: () => void;
}
const shared = globalThis as typeof globalThis & { __barhoundTestDb?: Shared };

export default async function setup(project: TestProject) {
  if (!shared.__barhoundTestDb) shared.__barhoundTestDb = { url: startCluster(), users: 0, destroy: () => pg("destroy") };
  const state = shared.__barhoundTestDb;
  state.users++;
  project.provide("databaseUrl", await state.url);
  return () => {
    if (--state.users === 0) {
      state.destroy();
      delete shared.__barhoundTestDb;
    }
  };
}

async function startCluster(): Promise<string> {
  await sweepStale();
  // The folder carries the process id, so two runs that pick the same free port at once never share a cluster;
  // the loser of such a race fails to bind and tries the next port.
  PG_ENV.PG_DIR = path.join(ROOT, `.data/pg-test-${process.pid}`);
  let base = "";
  for (let attempt = 0, from = 55433; !base; attempt++) {
    PG_ENV.PGPORT = process.env.TEST_PGPORT ?? String(await freePort(from));
    pg("destroy");
    try {
      base = pg("start");
    } catch (err) {
      if (attempt >= 4 || process.env.TEST_PGPORT) throw err;
      from = Number(PG_ENV.PGPORT) + 1;
    }
  }
  const databaseUrl = base.replace(/\/postgres$/, "/barhound_test");
  const unregister = register();
  const { createKnex, ensureDatabase, migrateLatest } = await import("../../server/db.ts");
  await ensureDatabase(databaseUrl);
  const db = createKnex(databaseUrl);
  try {
    await migrateLatest(db);
  } finally {
    await db.destroy();
    await unregister();
  }
  return databaseUrl;
}
