// Upload benchmark (npm run bench:upload): one large CSV (time column + three phase currents, BENCH_UPLOAD_MB,
// default 200 MB) written to a temp folder, uploaded through POST /api/captures to the real server running in its
// own process, then deleted. Prints the request's wall time and how much the server process's resident set grew
// during the upload (peak RSS from /proc/<pid>/status VmHWM, reset just before the upload through
// /proc/<pid>/clear_refs; sampled VmRSS as a fallback where the reset is not allowed). A throw-away PostgreSQL
// cluster in .data/pg-bench-upload on port 55441; BENCH_KEEP=1 keeps it. BENCH_UPLOAD_RUNS (default 2) uploads
// the same file that many times (the first run also pays for compiling the upload path). Linux only (/proc).
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { createKnex, ensureDatabase, migrateLatest } from "../server/db.ts";
import { seedDemoUsers, DEMO_PASSWORD, DEMO_USERS } from "../server/seed/demo-users.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const TARGET_MB = Number(process.env.BENCH_UPLOAD_MB ?? 200);
const RUNS = Number(process.env.BENCH_UPLOAD_RUNS ?? 2);
const PG_ENV = { ...process.env, PG_DIR: path.join(ROOT, ".data/pg-bench-upload"), PGPORT: "55441" };
const SAMPLE_RATE = 10000;

function pg(cmd: string): string {
  const r = spawnSync("bash", [path.join(ROOT, "scripts/pg.sh"), cmd], { env: PG_ENV, encoding: "utf8" });
  if (r.status !== 0) throw new Error(`scripts/pg.sh ${cmd} failed: ${r.stderr}`);
  return r.stdout.trim();
}

/** Writes the CSV block by block (the bench process never holds the file): "time_s,Ia,Ib,Ic", 4-decimal currents. */
async function writeLargeCsv(file: string, targetBytes: number): Promise<{ bytes: number; rows: number }> {
  const out = fs.createWriteStream(file);
  const write = (text: string) => (out.write(text) ? Promise.resolve() : new Promise<void>((r) => out.once("drain", () => r())));
  await write("time_s,Ia,Ib,Ic\n");
  let bytes = 17;
  let rows = 0;
  const phases = [0, (-2 * Math.PI) / 3, (2 * Math.PI) / 3];
  while (bytes < targetBytes) {
    const lines: string[] = [];
    for (let k = 0; k < 10000; k++, rows++) {
      const t = rows / SAMPLE_RATE;
      const cells = phases.map((p) => (17.5 * Math.sin(2 * Math.PI * 50 * t + p)).toFixed(4));
      lines.push(`${t.toFixed(6)},${cells.join(",")}`);
    }
    const block = `${lines.join("\n")}\n`;
    bytes += block.length;
    await write(block);
  }
  await new Promise<void>((resolve, reject) => out.end((err?: Error | null) => (err ? reject(err) : resolve())));
  return { bytes, rows };
}

function procStatusKb(pid: number, field: "VmRSS" | "VmHWM"): number {
  const m = new RegExp(`^${field}:\\s+(\\d+) kB`, "m").exec(fs.readFileSync(`/proc/${pid}/status`, "utf8"));
  return m ? Number(m[1]) : NaN;
}

/** Resets the process's peak-RSS counter (Linux ≥ 4.0); false when not allowed. */
function resetPeak(pid: number): boolean {
  try {
    fs.writeFileSync(`/proc/${pid}/clear_refs`, "5");
    return procStatusKb(pid, "VmHWM") <= procStatusKb(pid, "VmRSS") + 1024;
  } catch {
    return false;
  }
}

function startServerProcess(env: Record<string, string>): Promise<{ proc: ChildProcess; url: string }> {
  const proc = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], { cwd: ROOT, env: { ...process.env, ...env }, stdio: ["ignore", "pipe", "inherit"] });
  return new Promise((resolve, reject) => {
    let out = "";
    proc.stdout!.on("data", (b: Buffer) => {
      out += b.toString();
      const m = /listening on (http:\/\/\S+)/.exec(out);
      if (m) resolve({ proc, url: m[1].replace("localhost", "127.0.0.1") });
    });
    proc.once("exit", (c) => reject(new Error(`server exited (${c}): ${out}`)));
  });
}

async function main() {
  pg("destroy");
  const base = pg("start");
  const databaseUrl = base.replace(/\/postgres$/, "/barhound_bench_upload");
  await ensureDatabase(databaseUrl);
  const db = createKnex(databaseUrl);
  await migrateLatest(db);
  await seedDemoUsers(db);
  const [site] = await db("sites").insert({ code: `UPL${Date.now() % 1e6}`, name: "Upload bench site" }).returning("id");
  const [area] = await db("areas").insert({ site_id: site.id, name: "Bench area" }).returning("id");
  const [asset] = await db("assets").insert({ area_id: area.id, tag: `UPLOAD-${Date.now()}`, name: "Bench motor", rated_rpm: 1470, poles: 4, rated_hz: 50, rated_kw: 30, rated_voltage: 400, rated_current: 55, rotor_bars: 28 }).returning("id");

  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-bench-upload-"));
  const dataDir = path.join(tmp, "data");
  const file = path.join(tmp, "large.csv");
  let server: ChildProcess | undefined;
  try {
    const t0 = performance.now();
    const { bytes, rows } = await writeLargeCsv(file, TARGET_MB * 1e6);
    console.log(`file: ${(bytes / 1e6).toFixed(1)} MB, ${rows} rows (time + 3 currents at ${SAMPLE_RATE} Hz), written in ${((performance.now() - t0) / 1000).toFixed(1)} s; ${os.cpus().length} CPUs, load ${os.loadavg()[0].toFixed(1)}`);

    const started = await startServerProcess({
      NODE_ENV: "test", // quiet request log; otherwise the server runs as in development
      JWT_SECRET: "bench-only-secret",
      DATABASE_URL: databaseUrl,
      PORT: "0",
      DATA_DIR: dataDir,
      MAIL_FAKE: "false",
      BLOB_DRIVER: "fs",
      UPLOAD_LIMIT_MB: String(Math.max(512, Math.ceil(bytes / 1024 / 1024) + 16)),
    });
    server = started.proc;
    const pid = server.pid!;
    const tech = DEMO_USERS.find((u) => u.role === "technician")!;
    const login = await fetch(`${started.url}/api/auth/login`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ email: tech.email, password: DEMO_PASSWORD }) });
    const cookie = (login.headers.get("set-cookie") ?? "").split(";")[0];

    for (let run = 1; run <= RUNS; run++) {
      const baseKb = procStatusKb(pid, "VmRSS");
      const peakReset = resetPeak(pid);
      let sampledPeakKb = baseKb;
      const sampler = setInterval(() => {
        const kb = procStatusKb(pid, "VmRSS");
        if (kb > sampledPeakKb) sampledPeakKb = kb;
      }, 10);
      const form = new FormData();
      form.set("assetId", String(asset.id));
      form.append("file", await fs.openAsBlob(file), "large.csv"); // file-backed: the client does not hold it either
      const at = performance.now();
      const res = await fetch(`${started.url}/api/captures`, { method: "POST", body: form, headers: { cookie } });
      const body = await res.text();
      const ms = performance.now() - at;
      clearInterval(sampler);
      const peakKb = peakReset ? Math.max(procStatusKb(pid, "VmHWM"), sampledPeakKb) : sampledPeakKb;
      if (res.status !== 202) throw new Error(`upload refused: ${res.status} ${body}`);
      console.log(
        `run ${run}: ${res.status} in ${(ms / 1000).toFixed(2)} s (${(bytes / 1e6 / (ms / 1000)).toFixed(0)} MB/s) · server RSS ${(baseKb / 1024).toFixed(0)} MB before, ` +
          `peak growth during the upload ${((peakKb - baseKb) / 1024).toFixed(0)} MB (${peakReset ? "VmHWM" : "sampled VmRSS"}), after ${(procStatusKb(pid, "VmRSS") / 1024).toFixed(0)} MB`,
      );
    }
  } finally {
    if (server && server.exitCode === null) {
      const exited = new Promise((r) => server!.once("exit", r));
      server.kill("SIGTERM");
      await exited;
    }
    await db.destroy();
    fs.rmSync(tmp, { recursive: true, force: true });
    if (process.env.BENCH_KEEP !== "1") pg("destroy");
  }
}

main().catch((err) => {
  console.error(err);
  try {
    if (process.env.BENCH_KEEP !== "1") pg("destroy");
  } catch {}
  process.exit(1);
});
