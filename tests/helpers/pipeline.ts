// Test helpers for the capture pipeline: an app with a blob store and job queue, a real worker process,
// motors with unique tags, and synthetic capture files.
import { afterAll, beforeAll, inject } from "vitest";
import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type { Knex } from "knex";
import { makeTestEnv, type TestEnv } from "./context.ts";
import type { Config } from "../../server/config.ts";
import { installPipeline } from "../../server/captures/pipeline.ts";
import { ANALYSIS_QUEUE, queueOf, type JobPolicy } from "../../server/queue.ts";
import { EVENTS_CHANNEL } from "../../server/events.ts";
import pg from "pg";
import { synthCapture, type SynthOptions } from "../../src/engine/synth.ts";
import { writeCsv, writeWav } from "../../src/engine/parse/index.ts";

const ROOT = path.resolve(import.meta.dirname, "../..");

export interface PipelineEnv extends TestEnv {
  dataDir: string;
  blobDir: string;
}

/** makeTestEnv plus services.blob (files under a fresh temp dataDir) and services.queue (pg-boss). */
export async function makePipelineEnv(overrides: Partial<Config> = {}, policy: Partial<JobPolicy> = {}): Promise<PipelineEnv> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-pipe-"));
  const env = await makeTestEnv({ dataDir, ...overrides }, (ctx) => installPipeline(ctx, { policy }));
  return {
    ...env,
    dataDir,
    blobDir: path.join(dataDir, "blobs"),
    async close() {
      for (const c of (env.ctx.services.onClose as (() => Promise<void>)[] | undefined) ?? []) await c().catch(() => {});
      await env.close();
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

/** Every file under a folder (relative paths), [] when it does not exist. */
export function listFiles(dir: string): string[] {
  if (!fs.existsSync(dir)) return [];
  return (fs.readdirSync(dir, { recursive: true, withFileTypes: true }) as fs.Dirent[])
    .filter((e) => e.isFile())
    .map((e) => path.relative(dir, path.join(e.parentPath ?? (e as unknown as { path: string }).path, e.name)));
}

let seq = 0;
/** A site, an area and a motor with tags unique to this run. */
export async function makeMotor(db: Knex, over: Record<string, unknown> = {}) {
  const suffix = `${Date.now().toString(36)}${(seq++).toString(36)}${Math.floor(Math.random() * 1e4)}`;
  const [site] = await db("sites").insert({ code: `T${suffix}`.slice(0, 20), name: `Test site ${suffix}` }).returning("*");
  const [area] = await db("areas").insert({ site_id: site.id, name: "Pump house" }).returning("*");
  const [asset] = await db("assets")
    .insert({ area_id: area.id, tag: `M-${suffix}`, name: `Cooling pump ${suffix}`, rated_rpm: 1455, poles: 4, rated_hz: 50, rated_kw: 11, rated_voltage: 400, rated_current: 20, rotor_bars: 28, ...over })
    .returning("*");
  return { site, area, asset, suffix };
}

/** A synthetic 4-pole current capture (CSV by default), rotor condition set by brokenBars or sidebandDb. */
export function captureFile(opts: Partial<SynthOptions> & { format?: "csv" | "wav" } = {}): Buffer {
  const { format = "csv", ...synth } = opts;
  const s = synthCapture({ poles: 4, slip: 0.03, sampleRate: 5000, durationS: 8, phases: 1, seed: 7, ...synth });
  if (format === "wav") return Buffer.from(writeWav(s.capture));
  return Buffer.from(writeCsv(s.capture, { timeColumn: false, digits: 6 }));
}

export interface WorkerProcess {
  proc: ChildProcess;
  output: () => string;
  ready: Promise<void>;
  stop(signal?: NodeJS.Signals): Promise<void>;
}

/** Spawn workers/worker.ts against the test database; resolves `ready` on its "worker ready" line. */
export function startWorker(env: Record<string, string> = {}, dataDir?: string): WorkerProcess {
  let out = "";
  const proc = spawn(process.execPath, ["--import", "tsx", "workers/worker.ts"], {
    cwd: ROOT,
    env: {
      ...process.env,
      NODE_ENV: "test",
      DATABASE_URL: inject("databaseUrl"),
      ...(dataDir ? { DATA_DIR: dataDir } : {}),
      WORKER_CONCURRENCY: "2",
      BARHOUND_WORKER_IDLE_MS: "100",
      ...env,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const ready = new Promise<void>((resolve, reject) => {
    const onData = (b: Buffer) => {
      out += b.toString();
      if (out.includes("worker ready")) resolve();
    };
    proc.stdout!.on("data", onData);
    proc.stderr!.on("data", (b: Buffer) => (out += b.toString()));
    proc.once("exit", (code) => reject(new Error(`worker exited (${code}) before ready:\n${out}`)));
    setTimeout(() => reject(new Error(`worker not ready in 30 s:\n${out}`)), 30_000).unref();
  });
  ready.catch(() => {});
  return {
    proc,
    output: () => out,
    ready,
    stop: (signal = "SIGTERM") =>
      new Promise<void>((resolve) => {
        if (proc.exitCode !== null || proc.signalCode !== null) return resolve();
        proc.once("exit", () => resolve());
        proc.kill(signal);
      }),
  };
}

/** Poll until fn returns a truthy value. */
export async function waitFor<T>(fn: () => Promise<T | null | undefined | false>, timeoutMs = 20_000, what = "condition"): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/**
 * A pipeline app and one real worker process for a test file's lifetime (started before its tests, the worker
 * killed and the app closed after). Read `.env` and `.worker` inside the tests.
 */
export function pipelineWithWorker(policy: Partial<JobPolicy> = { expireInSeconds: 30, retryLimit: 2, retryDelay: 1, retryBackoff: false }): {
  readonly env: PipelineEnv;
  readonly worker: WorkerProcess;
} {
  const state = {} as { env: PipelineEnv; worker: WorkerProcess };
  beforeAll(async () => {
    state.env = await makePipelineEnv({}, policy);
    state.worker = startWorker({}, state.env.dataDir);
    await state.worker.ready;
  }, 60_000);
  afterAll(async () => {
    await state.worker?.stop("SIGKILL");
    await state.env?.close();
  });
  return state;
}

/**
 * A pipeline app with no worker (the test plays the worker), its analysis queue emptied of jobs earlier test files
 * left unstarted, and a listener that collects every event published on the events channel. Read `.env` and
 * `.events` inside the tests.
 */
export function pipelineWithoutWorker(policy: Partial<JobPolicy>): {
  readonly env: PipelineEnv;
  readonly events: { event: string; payload: Record<string, unknown> }[];
} {
  const state = { events: [] } as unknown as { env: PipelineEnv; events: { event: string; payload: Record<string, unknown> }[]; listener: pg.Client };
  beforeAll(async () => {
    state.env = await makePipelineEnv({}, policy);
    await queueOf(state.env.ctx).boss.purgeQueue(ANALYSIS_QUEUE);
    state.listener = new pg.Client({ connectionString: inject("databaseUrl") });
    await state.listener.connect();
    state.listener.on("notification", (n) => state.events.push(JSON.parse(n.payload!)));
    await state.listener.query(`listen ${EVENTS_CHANNEL}`);
  });
  afterAll(async () => {
    await state.listener?.end();
    await state.env?.close();
  });
  return state;
}
