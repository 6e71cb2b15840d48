// Capture pipeline benchmark (npm run bench:pipeline): a throw-away PostgreSQL cluster (.data/pg-bench, port
// 55440), the real server on a free port and 1, then 2, worker processes. Uploads N captures of ~2 MB through
// the API, C at a time, and prints captures/minute, p50/p95 upload-to-analysed latency, and checks that every
// capture was analysed exactly once. Env: BENCH_CAPTURES (200), BENCH_CONCURRENCY (20),
// BENCH_WORKER_CONCURRENCY (threads per worker process, 1), BENCH_WORKERS (the worker-process counts to run, "1,2"),
// BENCH_WAIT_S (how long to wait for the last analyses, 900), BENCH_PGPORT (55440), BENCH_KEEP=1 keeps the cluster,
// BENCH_WORKER_NODE_ARGS (extra node flags for the workers, e.g. --cpu-prof). The workers run with BARHOUND_TIMING=1:
// the run prints where each capture's time went and the CPU each process spent per capture.
//
// Targets (the pipeline issue): at least 600 captures/min through the pipeline, p95 upload-to-analysed ≤ 5 s. Each
// run prints one line per target, met or NOT met: speed is reported, never asserted (it depends on the machine and
// its load). Correctness is asserted: the exit code is 1 when any upload was refused, any capture was lost (never
// analysed or failed within BENCH_WAIT_S), failed, or was analysed more than once.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { loadConfig } from "../server/config.ts";
import { createKnex, ensureDatabase } from "../server/db.ts";
import { startServer } from "../server/index.ts";
import { seedDemoUsers, DEMO_PASSWORD, DEMO_USERS } from "../server/seed/demo-users.ts";
import { synthCapture } from "../src/engine/synth.ts";
import { writeCsv } from "../src/engine/parse/index.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const N = Number(process.env.BENCH_CAPTURES ?? 200);
const CONC = Number(process.env.BENCH_CONCURRENCY ?? 20);
const THREADS = process.env.BENCH_WORKER_CONCURRENCY ?? "1";
const WORKER_COUNTS = (process.env.BENCH_WORKERS ?? "1,2").split(",").map(Number).filter((n) => Number.isInteger(n) && n > 0);
const WAIT_MS = Number(process.env.BENCH_WAIT_S ?? 900) * 1000;
/** The pipeline's targets: captures per minute through the pipeline, p95 upload-to-analysed latency. */
const TARGET_PER_MIN = 600;
const TARGET_P95_S = 5;
// BENCH_PGPORT: another port for the bench's own cluster when 55440 is taken (by another checkout's cluster, say).
const PG_ENV = { ...process.env, PG_DIR: path.join(ROOT, ".data/pg-bench"), PGPORT: process.env.BENCH_PGPORT || "55440" };

function pg(cmd: string): string {
  const r = spawnSync("bash", [path.join(ROOT, "scripts/pg.sh"), cmd], { env: PG_ENV, encoding: "utf8" });
  if (r.status !== 0) throw new Error(`scripts/pg.sh ${cmd} failed: ${r.stderr}`);
  return r.stdout.trim();
}

/** Per-job timestamps the worker prints with BARHOUND_TIMING=1 (workers/worker.ts). */
interface JobTiming {
  captureId: number;
  fetchStart: number;
  fetchedAt: number;
  taskStart: number;
  taskEnd: number;
  jobEnd: number;
  completedAt: number;
  step: { parseMs: number; analyzeMs: number; spectraMs: number } | null;
}
const timings: JobTiming[] = [];

function startWorker(databaseUrl: string, dataDir: string): Promise<ChildProcess> {
  // BENCH_WORKER_NODE_ARGS: extra node flags for the worker processes, e.g. "--cpu-prof --cpu-prof-dir=/tmp/prof".
  const extra = (process.env.BENCH_WORKER_NODE_ARGS ?? "").split(" ").filter(Boolean);
  const proc = spawn(process.execPath, [...extra, "--import", "tsx", "workers/worker.ts"], {
    cwd: ROOT,
    env: { ...process.env, NODE_ENV: "development", DATABASE_URL: databaseUrl, DATA_DIR: dataDir, WORKER_CONCURRENCY: THREADS, BARHOUND_WORKER_IDLE_MS: "50", BARHOUND_TIMING: "1" },
    stdio: ["ignore", "pipe", "inherit"],
  });
  return new Promise((resolve, reject) => {
    let out = "";
    let pending = "";
    proc.stdout!.on("data", (b: Buffer) => {
      const text = b.toString();
      if (!out.includes("worker ready")) out += text;
      pending += text;
      const lines = pending.split("\n");
      pending = lines.pop()!;
      for (const l of lines) if (l.startsWith("[timing] ")) timings.push(JSON.parse(l.slice(9)));
      if (out.includes("worker ready")) resolve(proc);
    });
    proc.once("exit", (c) => reject(new Error(`worker exited (${c}): ${out}`)));
  });
}

/** CPU time (user + system, ms) of a process from /proc/<pid>/stat; 0 when unreadable (not Linux, exited). */
function procCpuMs(pid: number): number {
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, "utf8");
    const f = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    return ((Number(f[11]) + Number(f[12])) * 1000) / CLOCK_TICKS;
  } catch {
    return 0;
  }
}
const CLOCK_TICKS = Number(spawnSync("getconf", ["CLK_TCK"], { encoding: "utf8" }).stdout.trim()) || 100;
/** Total CPU ms of the bench cluster's PostgreSQL: its postmaster (data directory .data/pg-bench) and children. */
function postgresCpuMs(): number {
  const procs: Array<{ pid: number; ppid: number; cmd: string }> = [];
  for (const d of fs.readdirSync("/proc")) {
    if (!/^\d+$/.test(d)) continue;
    try {
      const stat = fs.readFileSync(`/proc/${d}/stat`, "utf8");
      const ppid = Number(stat.slice(stat.lastIndexOf(")") + 2).split(" ")[1]);
      procs.push({ pid: Number(d), ppid, cmd: fs.readFileSync(`/proc/${d}/cmdline`, "utf8") });
    } catch {}
  }
  const masters = new Set(procs.filter((p) => p.cmd.includes("pg-bench") && p.cmd.includes("postgres")).map((p) => p.pid));
  // live backends, plus the postmaster's cutime/cstime (backends that exited in the meantime)
  let exited = 0;
  for (const pid of masters) {
    try {
      const stat = fs.readFileSync(`/proc/${pid}/stat`, "utf8");
      const f = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
      exited += ((Number(f[13]) + Number(f[14])) * 1000) / CLOCK_TICKS;
    } catch {}
  }
  return exited + procs.filter((p) => masters.has(p.pid) || masters.has(p.ppid)).reduce((t, p) => t + procCpuMs(p.pid), 0);
}
const selfCpuMs = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};

const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil((p / 100) * s.length) - 1))];
};

async function main() {
  pg("destroy");
  const base = pg("start");
  const databaseUrl = base.replace(/\/postgres$/, "/barhound_bench");
  await ensureDatabase(databaseUrl);
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-bench-"));
  // env "test" only to keep the per-request log quiet; the server otherwise runs as in development.
  const config = loadConfig({ ...process.env, NODE_ENV: "test", JWT_SECRET: "bench-only-secret", DATABASE_URL: databaseUrl, PORT: "0", DATA_DIR: dataDir, MAIL_FAKE: "false", BLOB_DRIVER: "fs" });
  const server = await startServer(config);
  const db = server.ctx.db;
  await seedDemoUsers(db);
  const url = `http://127.0.0.1:${server.port}`;
  const tech = DEMO_USERS.find((u) => u.role === "technician")!;
  const login = await fetch(`${url}/api/auth/login`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ email: tech.email, password: DEMO_PASSWORD }) });
  const cookie = (login.headers.get("set-cookie") ?? "").split(";")[0];

  // Ten distinct ~1.5–2 MB three-phase captures, reused round-robin.
  const files = Array.from({ length: 10 }, (_, i) =>
    Buffer.from(writeCsv(synthCapture({ poles: 4, slip: 0.02 + i * 0.001, sampleRate: 5000, durationS: 14, phases: 3, brokenBars: i % 3, seed: 100 + i }).capture, { timeColumn: false, digits: 6 })),
  );
  console.log(`capture files: ${(files.reduce((s, f) => s + f.length, 0) / files.length / 1e6).toFixed(2)} MB average; ${os.cpus().length} CPUs`);
  // Blobs made once: new Blob([buffer]) copies the 2 MB, and the client shares the CPU with the server it measures.
  const blobs = files.map((f) => new Blob([f]));
  const [site] = await db("sites").insert({ code: `BENCH${Date.now() % 1e6}`, name: "Bench site" }).returning("id");
  const [area] = await db("areas").insert({ site_id: site.id, name: "Bench area" }).returning("id");

  const results: string[] = [];
  const problems: string[] = [];
  for (const workers of WORKER_COUNTS) {
    const [asset] = await db("assets").insert({ area_id: area.id, tag: `BENCH-${workers}-${Date.now()}`, name: "Bench motor", rated_rpm: 1470, poles: 4, rated_hz: 50, rated_kw: 30, rated_voltage: 400, rated_current: 55, rotor_bars: 28 }).returning("id");
    const procs = await Promise.all(Array.from({ length: workers }, () => startWorker(databaseUrl, dataDir)));
    const started = new Map<number, number>();
    const uploaded = new Map<number, number>();
    timings.length = 0;
    let next = 0;
    let failedUploads = 0;
    const cpu0 = { self: selfCpuMs(), workers: procs.map((p) => procCpuMs(p.pid!)), pg: postgresCpuMs() };
    const load0 = os.loadavg()[0];
    const t0 = Date.now();
    await Promise.all(
      Array.from({ length: CONC }, async () => {
        while (next < N) {
          const i = next++;
          const form = new FormData();
          form.set("assetId", String(asset.id));
          form.set("takenAt", new Date(Date.UTC(2026, 10, 1) + i * 60_000).toISOString());
          form.append("file", blobs[i % blobs.length], `bench-${i}.csv`);
          const at = Date.now();
          const res = await fetch(`${url}/api/captures`, { method: "POST", body: form, headers: { cookie } });
          if (res.status !== 202) {
            failedUploads++;
            console.error("upload failed", res.status, await res.text());
            continue;
          }
          const body = (await res.json()) as { captures: { id: number }[] };
          started.set(body.captures[0].id, at);
          uploaded.set(body.captures[0].id, Date.now());
        }
      }),
    );
    const uploadS = (Date.now() - t0) / 1000;
    const ids = [...started.keys()];
    // Until every stored capture is analysed or failed; those still waiting after BENCH_WAIT_S count as lost.
    let timedOut = false;
    for (;;) {
      const [{ n }] = await db("captures").whereIn("id", ids).whereIn("status", ["analysed", "failed"]).count({ n: "*" });
      if (Number(n) === ids.length) break;
      if (Date.now() - t0 > WAIT_MS) {
        timedOut = true;
        break;
      }
      await new Promise((r) => setTimeout(r, 200));
    }
    const cpu1 = { self: selfCpuMs(), workers: procs.map((p) => procCpuMs(p.pid!)), pg: postgresCpuMs() };
    const load1 = os.loadavg()[0];
    const rows = await db("captures").whereIn("id", ids).select("id", "status", "analysed_at");
    const counts = await db("analyses").whereIn("capture_id", ids).groupBy("capture_id").select("capture_id").count({ n: "*" });
    const analysed = rows.filter((r) => r.status === "analysed" && r.analysed_at);
    const lat = analysed.map((r) => new Date(r.analysed_at).getTime() - started.get(r.id)!);
    const end = Math.max(t0 + 1, ...analysed.map((r) => new Date(r.analysed_at).getTime()));
    // Throughput counts what came through: captures analysed, from the first upload to the last result.
    const perMin = (analysed.length / ((end - t0) / 1000)) * 60;
    const p95S = lat.length ? pct(lat, 95) / 1000 : Infinity;
    const analysesOf = new Map((counts as { capture_id: number; n: string | number }[]).map((c) => [Number(c.capture_id), Number(c.n)]));
    const duplicated = ids.filter((id) => (analysesOf.get(id) ?? 0) > 1).length;
    const failed = rows.filter((r) => r.status === "failed").length;
    // Lost: stored, but neither analysed nor failed in time, or shown analysed without its analysis.
    const lost = ids.length - analysed.length - failed + analysed.filter((r) => !analysesOf.get(r.id)).length;
    const once = duplicated === 0 && lost === 0 && failed === 0 && ids.length === N;
    const line =
      `${workers} worker${workers > 1 ? "s" : " "} × ${THREADS} thread(s): ${perMin.toFixed(0)} captures/min · uploads done in ${uploadS.toFixed(1)} s · ` +
      `latency ${lat.length ? `p50 ${(pct(lat, 50) / 1000).toFixed(2)} s, p95 ${p95S.toFixed(2)} s` : "– (nothing analysed)"} · ` +
      `${ids.length}/${N} stored, ${failedUploads} refused, ${failed} failed, ${lost} lost${timedOut ? ` (still waiting after ${WAIT_MS / 1000} s)` : ""}, ` +
      `${duplicated} analysed more than once, exactly once: ${once ? "yes" : "NO"}`;
    console.log(line);
    results.push(line);
    const targets = [
      `  target ≥ ${TARGET_PER_MIN}/min: ${perMin >= TARGET_PER_MIN ? "met" : "NOT met"} (${perMin.toFixed(0)}/min)`,
      `  target p95 upload-to-analysed ≤ ${TARGET_P95_S} s: ${p95S <= TARGET_P95_S ? "met" : "NOT met"} (${Number.isFinite(p95S) ? `${p95S.toFixed(2)} s` : "nothing analysed"})`,
    ];
    for (const t of targets) console.log(t);
    results.push(...targets);
    const label = `${workers} worker${workers > 1 ? "s" : ""}`;
    if (failedUploads) problems.push(`${label}: ${failedUploads} upload(s) refused`);
    if (lost) problems.push(`${label}: ${lost} capture(s) lost (never analysed)`);
    if (failed) problems.push(`${label}: ${failed} capture(s) failed`);
    if (duplicated) problems.push(`${label}: ${duplicated} capture(s) analysed more than once`);
    // Where the time goes, per capture (ms, p50 / p95): the upload request, the wait in the queue until a worker
    // fetched the job, the job's reads before the thread ran (capture and asset rows, blob), the thread's parse,
    // analysis and display spectra, the writes after it (spectra blobs, result transaction, notifications), and
    // pg-boss complete. "analysed_at" is the result transaction's now(), so it can precede the job end.
    const byId = new Map(timings.map((t) => [t.captureId, t]));
    const parts: Record<string, number[]> = { upload: [], "queue wait": [], fetch: [], "job reads": [], "thread dispatch": [], parse: [], analyse: [], spectra: [], "job writes": [], complete: [] };
    for (const id of ids) {
      const t = byId.get(id);
      const up = uploaded.get(id);
      if (!t || up === undefined) continue;
      parts.upload.push(up - started.get(id)!);
      parts["queue wait"].push(t.fetchedAt - up);
      parts.fetch.push(t.fetchedAt - t.fetchStart);
      parts["job reads"].push(t.taskStart - t.fetchedAt);
      const thread = t.taskEnd - t.taskStart;
      if (t.step) {
        parts.parse.push(t.step.parseMs);
        parts.analyse.push(t.step.analyzeMs);
        parts.spectra.push(t.step.spectraMs);
        parts["thread dispatch"].push(thread - t.step.parseMs - t.step.analyzeMs - t.step.spectraMs);
      }
      parts["job writes"].push(t.jobEnd - t.taskEnd);
      parts.complete.push(t.completedAt - t.jobEnd);
    }
    const breakdown = Object.entries(parts)
      .filter(([, v]) => v.length)
      .map(([k, v]) => `${k} ${pct(v, 50).toFixed(0)}/${pct(v, 95).toFixed(0)}`)
      .join(" · ");
    console.log(`  per capture, ms p50/p95 (${byId.size} jobs timed): ${breakdown}`);
    results.push(`  ${breakdown}`);
    // CPU per capture by process, which on a shared machine says more than wall time: the bench process is the
    // server plus the upload client (and this polling loop), "workers" the worker processes with their threads.
    const per = (ms: number) => (ms / Math.max(1, ids.length)).toFixed(0);
    const wCpu = cpu1.workers.reduce((a, v, i) => a + v - cpu0.workers[i], 0);
    const cpuLine = `  CPU ms per capture: server+client ${per(cpu1.self - cpu0.self)} · workers ${per(wCpu)} · postgres ${per(cpu1.pg - cpu0.pg)} · 1-min load average ${load0.toFixed(1)} → ${load1.toFixed(1)}`;
    console.log(cpuLine);
    results.push(cpuLine);
    for (const p of procs) p.kill("SIGTERM");
    await Promise.all(procs.map((p) => new Promise((r) => (p.exitCode !== null ? r(null) : p.once("exit", r)))));
  }
  await server.close();
  fs.rmSync(dataDir, { recursive: true, force: true });
  if (process.env.BENCH_KEEP !== "1") pg("destroy");
  console.log("\n" + results.join("\n"));
  // Speed targets are reported above; correctness decides the exit code.
  if (problems.length) {
    console.log(`\ncorrectness: FAILED (${problems.join("; ")})`);
    process.exitCode = 1;
  } else console.log("\ncorrectness: every capture stored and analysed exactly once");
}

main().catch((err) => {
  console.error(err);
  try {
    if (process.env.BENCH_KEEP !== "1") pg("destroy");
  } catch {}
  process.exit(1);
});
