import { describe, expect, it } from "vitest";
import { captureFile, makeMotor, pipelineWithoutWorker, waitFor } from "../helpers/pipeline.ts";
import { storeCaptureAndQueue } from "../../server/captures/ingest.ts";
import { runAnalysisJob, type JobDeps } from "../../server/captures/analysis-job.ts";
import { blobStoreOf } from "../../server/blob/index.ts";
import { ANALYSIS_QUEUE, queueOf, type AnalysisJobData } from "../../server/queue.ts";
import analysisTask from "../../workers/analysis-task.ts";

// A transient failure in the analysis job (not the file's fault: a worker thread that died, a storage hiccup) is
// retried by pg-boss: the capture goes queued → analysing → queued ("Attempt n failed, retrying: …") → analysing →
// analysed, or ends failed with the reason after the last attempt. The job runs here as workers/worker.ts runs it
// (fetch with metadata, runAnalysisJob, complete or fail), in this process, so the thread's work can be replaced
// through JobDeps.runTask, the dependency the worker itself injects.
const RETRY_LIMIT = 2; // three attempts in all

const pipe = pipelineWithoutWorker({ retryLimit: RETRY_LIMIT, retryDelay: 0, retryBackoff: false, expireInSeconds: 60 });

const capture = (id: number) => pipe.env.db("captures").where({ id }).first();
const jobOf = async (captureId: number) =>
  (await pipe.env.db.raw(`select state::text as state, retry_count, output from pgboss.job where name = ? and data->>'captureId' = ?`, [ANALYSIS_QUEUE, String(captureId)])).rows as {
    state: string;
    retry_count: number;
    output: { outcome?: string; message?: string } | null;
  }[];

/** One pass of the worker's fetch loop (workers/worker.ts) over the next job, with the given thread work. */
async function attempt(captureId: number, runTask: JobDeps["runTask"]) {
  const boss = queueOf(pipe.env.ctx).boss;
  const [job] = await waitFor(async () => {
    const got = await boss.fetch<AnalysisJobData>(ANALYSIS_QUEUE, { batchSize: 1, includeMetadata: true });
    return got.length ? got : null;
  }, 5000, "the job");
  expect(job.data.captureId).toBe(captureId);
  try {
    const outcome = await runAnalysisJob({ db: pipe.env.db, blob: blobStoreOf(pipe.env.ctx), runTask }, job.data, { retryCount: job.retryCount, retryLimit: job.retryLimit });
    await boss.complete(ANALYSIS_QUEUE, job.id, { outcome });
    return { retryCount: job.retryCount, outcome, thrown: null };
  } catch (err) {
    await boss.fail(ANALYSIS_QUEUE, job.id, { message: (err as Error).message });
    return { retryCount: job.retryCount, outcome: null, thrown: (err as Error).message };
  }
}

const realTask: JobDeps["runTask"] = async (input) => analysisTask(input);
/** Thread work that fails the first `times` calls with a transient error, then does the real analysis. */
function failing(times: number, message: string) {
  let calls = 0;
  return async (input: Parameters<JobDeps["runTask"]>[0]) => {
    calls++;
    if (calls <= times) throw new Error(message);
    return realTask(input);
  };
}

async function store(assetId: number, seed: number) {
  return (await storeCaptureAndQueue(pipe.env.ctx, { assetId, takenAt: new Date(), source: "upload", fileName: `retry-${seed}.csv`, format: "csv", bytes: captureFile({ seed }) })).id;
}
const statusesOf = (id: number) => pipe.events.filter((e) => e.event === "capture:status" && e.payload.id === id).map((e) => e.payload.status);

describe("analysis job retries", () => {
  it("fails transiently once, is retried by pg-boss and ends analysed once", async () => {
    const { asset } = await makeMotor(pipe.env.db);
    const id = await store(asset.id, 41);
    const runTask = failing(1, "analysis thread exited unexpectedly");

    const first = await attempt(id, runTask);
    expect(first).toEqual({ retryCount: 0, outcome: null, thrown: "analysis thread exited unexpectedly" });
    // Between attempts: queued, with the reason, and the job waiting for its retry.
    expect(await capture(id)).toMatchObject({ status: "queued", attempts: 1, error: "Attempt 1 failed, retrying: analysis thread exited unexpectedly" });
    expect(await jobOf(id)).toEqual([expect.objectContaining({ state: "retry", retry_count: 0 })]);

    const second = await attempt(id, runTask);
    expect(second).toEqual({ retryCount: 1, outcome: "analysed", thrown: null });
    expect(await capture(id)).toMatchObject({ status: "analysed", attempts: 2, error: null });
    expect(await pipe.env.db("analyses").where({ capture_id: id })).toHaveLength(1);
    expect(await jobOf(id)).toEqual([expect.objectContaining({ state: "completed", retry_count: 1, output: { outcome: "analysed" } })]);
    await waitFor(async () => statusesOf(id).includes("analysed"), 5000, "capture:status analysed");
    expect(statusesOf(id)).toEqual(["queued", "analysing", "queued", "analysing", "analysed"]);
  });

  it("fails transiently on every attempt: retried up to the limit, then failed with the reason", async () => {
    const { asset } = await makeMotor(pipe.env.db);
    const id = await store(asset.id, 42);
    const runTask = failing(Infinity, "blob store timed out");

    for (let n = 0; n < RETRY_LIMIT; n++) {
      expect(await attempt(id, runTask)).toEqual({ retryCount: n, outcome: null, thrown: "blob store timed out" });
      expect(await capture(id)).toMatchObject({ status: "queued", attempts: n + 1, error: `Attempt ${n + 1} failed, retrying: blob store timed out` });
    }
    // The last attempt marks the capture failed with the reason itself, and the job completes (nothing left to retry).
    expect(await attempt(id, runTask)).toEqual({ retryCount: RETRY_LIMIT, outcome: "failed", thrown: null });
    expect(await capture(id)).toMatchObject({ status: "failed", attempts: RETRY_LIMIT + 1, error: "blob store timed out" });
    expect(await pipe.env.db("analyses").where({ capture_id: id })).toHaveLength(0);
    expect(await jobOf(id)).toEqual([expect.objectContaining({ state: "completed", retry_count: RETRY_LIMIT, output: { outcome: "failed" } })]);
    await waitFor(async () => statusesOf(id).includes("failed"), 5000, "capture:status failed");
    expect(statusesOf(id)).toEqual(["queued", "analysing", "queued", "analysing", "queued", "analysing", "failed"]);
    expect(pipe.events.find((e) => e.payload.id === id && e.payload.status === "failed")!.payload).toEqual({ id, assetId: asset.id, status: "failed", error: "blob store timed out" });
    // No more jobs for it: nothing will pick it up again until someone re-queues it.
    expect(await queueOf(pipe.env.ctx).boss.fetch(ANALYSIS_QUEUE, { batchSize: 1 })).toEqual([]);
  });
});
