// npm start: PostgreSQL on loopback from .data/, migrations, demo data, then the server, the worker and the mail fake.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { createKnex, ensureDatabase, migrateLatest } from "../server/db.ts";
import { seedDemo } from "../server/seed/index.ts";
import { DEMO_PASSWORD, DEMO_USERS } from "../server/seed/demo-users.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const PG_PORT = process.env.PGPORT ?? "55432";
const PORT = process.env.PORT ?? "5180";

function pg(cmd: "start" | "stop"): string {
  const r = spawnSync("bash", [path.join(ROOT, "scripts/pg.sh"), cmd], { env: { ...process.env, PGPORT: PG_PORT }, encoding: "utf8" });
  if (r.status !== 0) {
    process.stderr.write(r.stderr || `scripts/pg.sh ${cmd} failed\n`);
    process.exit(1);
  }
  return r.stdout.trim();
}

const base = pg("start");
const databaseUrl = process.env.DATABASE_URL ?? base.replace(/\/postgres$/, "/barhound");
console.log(`PostgreSQL ready on 127.0.0.1:${PG_PORT} (data in .data/pg)`);
await ensureDatabase(databaseUrl);
const db = createKnex(databaseUrl);
await migrateLatest(db);
await seedDemo(db);
await db.destroy();

if (!fs.existsSync(path.join(ROOT, "dist/index.html")) || process.env.BARHOUND_BUILD === "1") {
  console.log("Building the web client…");
  const b = spawnSync(process.execPath, [path.join(ROOT, "node_modules/vite/bin/vite.js"), "build", "--logLevel", "warn"], { cwd: ROOT, stdio: "inherit" });
  if (b.status !== 0) process.exit(1);
}

const env = { ...process.env, DATABASE_URL: databaseUrl, PORT, NODE_ENV: process.env.NODE_ENV ?? "development" };
const children: ChildProcess[] = [];
function run(name: string, file: string) {
  const child = spawn(process.execPath, ["--import", "tsx", path.join(ROOT, file)], { cwd: ROOT, env, stdio: ["ignore", "pipe", "pipe"] });
  const prefix = (chunk: Buffer) => chunk.toString().replace(/^(?=.)/gm, `[${name}] `);
  child.stdout!.on("data", (c: Buffer) => process.stdout.write(prefix(c)));
  child.stderr!.on("data", (c: Buffer) => process.stderr.write(prefix(c)));
  child.on("exit", (code, signal) => {
    if (!stopping) {
      console.error(`[${name}] stopped (${signal ?? code}); shutting down.`);
      void stop(1);
    }
  });
  children.push(child);
  return child;
}

let stopping = false;
async function stop(code = 0) {
  if (stopping) return;
  stopping = true;
  for (const c of children) if (c.exitCode === null) c.kill("SIGTERM");
  await Promise.all(children.map((c) => (c.exitCode === null ? new Promise((r) => c.once("exit", r)) : null)));
  pg("stop");
  console.log("Barhound stopped; PostgreSQL stopped.");
  process.exit(code);
}
process.on("SIGINT", () => void stop(0));
process.on("SIGTERM", () => void stop(0));

const server = run("server", "server/index.ts");
await new Promise<void>((resolve) => {
  server.stdout!.on("data", (c: Buffer) => {
    if (c.toString().includes("listening")) resolve();
  });
});
if (fs.existsSync(path.join(ROOT, "workers/worker.ts"))) run("worker", "workers/worker.ts");

const w = Math.max(...DEMO_USERS.map((u) => u.email.length));
console.log(`\nBarhound is running at http://localhost:${PORT}\n`);
console.log(`Demo sign-ins (password for all: ${DEMO_PASSWORD}):`);
for (const u of DEMO_USERS) console.log(`  ${u.role.padEnd(11)} ${u.email.padEnd(w)}  ${DEMO_PASSWORD}`);
console.log("\nMeasurements on energised equipment are for qualified persons with the right protective equipment, following local codes and site rules.");
console.log("Press Ctrl-C to stop everything (the database included).\n");
