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
  const r = spawnSync("bash", [path.join(ROOT, "scripts/pg.sh"), cmd], { env: PG_ENV, encoding: "utf8" });
  if (r.status !== 0) throw new Error(`scripts/pg.sh ${cmd} failed: ${r.stderr}`);
  return r.stdout.trim();
}

// A throw-away cluster on its own loopback port: created fresh for the run, destroyed after it, even when tests fail.
export default async function setup(project: TestProject) {
  PG_ENV.PGPORT = process.env.TEST_PGPORT ?? String(await freePort(55433));
  PG_ENV.PG_DIR = path.join(ROOT, `.data/pg-test-${PG_ENV.PGPORT}`);
  pg("destroy");
  const base = pg("start");
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
  project.provide("databaseUrl", databaseUrl);
  return () => {
    pg("destroy");
  };
}
