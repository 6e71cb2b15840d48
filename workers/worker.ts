// The analysis worker process: takes capture-analysis jobs from pg-boss and runs the CPU work in piscina
// threads. Run with `node --import tsx workers/worker.ts` (env DATABASE_URL, WORKER_CONCURRENCY, BLOB_DRIVER…).
// Prints "worker ready" once it is taking jobs. Any number of these may run against one database.
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { Piscina } from "piscina";
import { loadConfig } from "../server/config.ts";
import { createKnex, migrateLatest } from "../server/db.ts";
import { createBlobStore } from "../server/blob/index.ts";
import { ANALYSIS_QUEUE, createCaptureQueue, type AnalysisJobData } from "../server/queue.ts";
import { runAnalysisJob } from "../server/captures/analysis-job.ts";
import { sweepStuckCaptures } from "../server/captures/stuck-sweep.ts";
import type { AnalysisTaskInput } from "./analysis-task.ts";
import type { AnalysisTaskOutput } from "../server/captures/engine-io.ts";
import { synthCapture } from "../src/engine/synth.ts";
import { writeCsv } from "../src/engine/parse/index.ts";

const HERE = path.dirname(fileURLToPath(import.meta.url));

async function main() {
  const config = loadConfig();
  const concurrency = Math.max(1, Math.floor(config.workerConcurrency));
  const db = createKnex(config.databaseUrl, { min: 0, max: concurrency + 2 });
  await migrateLatest(db);
  const blob = await createBlobStore(config);
  const queue = await createCaptureQueue(config.databaseUrl, {
    supervise: true,
    maintenanceIntervalSeconds: Number(process.env.BARHOUND_MAINTENANCE_S) || 30,
    max: 2 + concurrency,
  });
  // piscina runs the TypeScript task through tsx's loader in each thread.
  const pool = new Piscina<AnalysisTaskInput, AnalysisTaskOutput>({
    filename: pathToFileURL(path.join(HERE, "analysis-task.ts")).href,
    execArgv: ["--import", "tsx"],
    minThreads: concurrency,
    maxThreads: concurrency,
    idleTimeout: 60_000,
  });
  // Warm every thread before taking jobs: loading the engine through tsx and JIT-compiling it takes ~0.5–1 s per
  // thread, which the first captures would otherwise wait out. One short synthetic capture per thread, at once.
  await warmUp(pool, concurrency);
  const delayMs = config.env === "test" ? Number(process.env.BARHOUND_TEST_ANALYSIS_DELAY_MS) || 0 : 0;
  const idleMs = Number(process.env.BARHOUND_WORKER_IDLE_MS) || 250;
  const deps = {
    db,
    blob,
    delayMs,
    runTask: (input: AnalysisTaskInput) => {
      // Transfer, not copy, the bytes, but never a shared pool slab (that would detach unrelated buffers).
      const b = input.bytes;
      const own = b.byteOffset === 0 && b.byteLength === b.buffer.byteLength ? b : b.slice();
      return pool.run({ ...input, bytes: own }, { transferList: [own.buffer as ArrayBuffer] });
    },
  };
  // BARHOUND_TIMING=1: one "[timing] {json}" line per job on stdout (epoch ms and the thread's own step times),
  // read by bench/pipeline.ts to split upload-to-analysed into queue wait, job I/O and CPU.
  const timing = process.env.BARHOUND_TIMING === "1";

  // One fetch loop per thread. pg-boss's own work() loop sleeps a full polling interval between jobs even
  // when the queue is full; fetching ourselves keeps the threads busy and the latency low.
  let stopping = false;
  const loops = Array.from({ length: concurrency }, async () => {
    while (!stopping) {
      let jobs;
      const fetchStart = Date.now();
      try {
        jobs = await queue.boss.fetch<AnalysisJobData>(ANALYSIS_QUEUE, { batchSize: 1, includeMetadata: true });
      } catch (err) {
        console.error("[worker] fetch failed:", (err as Error).message);
        await sleep(1000);
        continue;
      }
      if (!jobs.length) {
        await sleep(idleMs);
        continue;
      }
      const job = jobs[0];
      const t = timing ? { captureId: job.data.captureId, fetchStart, fetchedAt: Date.now(), taskStart: 0, taskEnd: 0, jobEnd: 0, completedAt: 0, step: null as unknown } : null;
      const jobDeps = t
        ? {
            ...deps,
            runTask: async (input: AnalysisTaskInput) => {
              t.taskStart = Date.now();
              const out = await deps.runTask(input);
              t.taskEnd = Date.now();
              t.step = (out as { timing?: unknown }).timing ?? null;
              delete (out as { timing?: unknown }).timing;
              return out;
            },
          }
        : deps;
      try {
        const outcome = await runAnalysisJob(jobDeps, job.data, { retryCount: job.retryCount, retryLimit: job.retryLimit });
        if (t) t.jobEnd = Date.now();
        await queue.boss.complete(ANALYSIS_QUEUE, job.id, { outcome });
        if (t) {
          t.completedAt = Date.now();
          console.log(`[timing] ${JSON.stringify(t)}`);
        }
      } catch (err) {
        console.error(`[worker] capture ${job.data.captureId} attempt ${job.retryCount + 1} failed:`, (err as Error).message);
        await queue.boss.fail(ANALYSIS_QUEUE, job.id, { message: (err as Error).message }).catch(() => {});
      }
    }
  });

  // Captures no job will finish (retries used up by timeouts, job cancelled or lost) are marked failed, and captures
  // left "received" with no job are queued: at start, then every BARHOUND_STUCK_SWEEP_S (default 60). Every worker
  // may sweep; the conditional updates make that harmless.
  const sweep = async () => {
    try {
      const swept = await sweepStuckCaptures(db, { expireInSeconds: queue.policy.expireInSeconds, queue });
      for (const s of swept) console.error(`[worker] capture ${s.id}: ${s.error}`);
    } catch (err) {
      console.error("[worker] stuck-capture sweep failed:", (err as Error).message);
    }
  };
  await sweep();
  const sweeper = setInterval(sweep, (Number(process.env.BARHOUND_STUCK_SWEEP_S) || 60) * 1000);

  const stop = async () => {
    stopping = true;
    clearInterval(sweeper);
    await Promise.race([Promise.all(loops), sleep(10_000)]);
    await queue.stop().catch(() => {});
    await pool.destroy().catch(() => {});
    await db.destroy().catch(() => {});
    process.exit(0);
  };
  process.on("SIGINT", stop);
  process.on("SIGTERM", stop);
  console.log(`worker ready (concurrency ${concurrency}, blob ${blob.driver})`);
}

async function warmUp(pool: Piscina<AnalysisTaskInput, AnalysisTaskOutput>, threads: number): Promise<void> {
  try {
    const { capture } = synthCapture({ poles: 4, slip: 0.02, sampleRate: 5000, durationS: 4, phases: 3, brokenBars: 1, seed: 1 });
    const csv = new TextEncoder().encode(writeCsv(capture, { timeColumn: false, digits: 6 }));
    const nameplate = { poles: 4, ratedRpm: 1470, ratedHz: 50, rotorBars: 28 };
    await Promise.all(Array.from({ length: threads }, () => pool.run({ bytes: csv.slice(), fileName: "warm-up.csv", nameplate })));
  } catch (err) {
    console.error("[worker] warm-up failed (continuing):", (err as Error).message);
  }
}

function sleep(ms: number) {
  return new Promise((r) => setTimeout(r, ms));
}

main().catch((err) => {
  console.error("[worker] could not start:", err);
  process.exit(1);
});
