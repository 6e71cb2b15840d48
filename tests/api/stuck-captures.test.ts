import { describe, expect, it } from "vitest";
import { signedIn } from "../helpers/context.ts";
import { captureFile, makeMotor, pipelineWithoutWorker, waitFor } from "../helpers/pipeline.ts";
import { storeCaptureAndQueue } from "../../server/captures/ingest.ts";
import { sweepStuckCaptures } from "../../server/captures/stuck-sweep.ts";
import { ANALYSIS_QUEUE, queueOf, type AnalysisJobData } from "../../server/queue.ts";

// A capture whose job will never finish (retries used up by timeouts, job cancelled or lost) is marked failed by the
// worker's sweep, with a reason and a capture:status event. No worker here: the test plays the worker that dies.
const EXPIRE_S = 1;

const pipe = pipelineWithoutWorker({ expireInSeconds: EXPIRE_S, retryLimit: 1, retryDelay: 0, retryBackoff: false });

const sweep = (over: Partial<Parameters<typeof sweepStuckCaptures>[1]> = {}) => sweepStuckCaptures(pipe.env.db, { expireInSeconds: EXPIRE_S, graceSeconds: 0, ...over });
const capture = (id: number) => pipe.env.db("captures").where({ id }).first();
const jobsOf = async (captureId: number) =>
  (await pipe.env.db.raw(`select id, state::text as state, retry_count from pgboss.job where name = ? and data->>'captureId' = ?`, [ANALYSIS_QUEUE, String(captureId)])).rows as {
    id: string;
    state: string;
    retry_count: number;
  }[];

async function store(assetId: number) {
  return (await storeCaptureAndQueue(pipe.env.ctx, { assetId, takenAt: new Date(), source: "upload", fileName: "stuck.csv", format: "csv", bytes: captureFile({ seed: 5 }) })).id;
}

/** What a worker does before it dies: take the job and mark the capture analysing (as runAnalysisJob does). */
async function takeAndDie(captureId: number) {
  const boss = queueOf(pipe.env.ctx).boss;
  const job = await waitFor(async () => (await boss.fetch<AnalysisJobData>(ANALYSIS_QUEUE, { batchSize: 1 }))[0], 5000, "the job");
  expect(job.data.captureId).toBe(captureId);
  await pipe.env.db("captures").where({ id: captureId }).update({ status: "analysing", attempts: pipe.env.db.raw("attempts + 1"), updated_at: pipe.env.db.fn.now() });
  await new Promise((r) => setTimeout(r, EXPIRE_S * 1000 + 150));
  await boss.maintain(); // pg-boss maintenance: fails the expired active job (retry, or failed when retries are used up)
}

describe("stuck-capture sweep", () => {
  it("a job whose attempts all timed out: the capture is marked failed with the reason and a capture:status event", async () => {
    const { asset } = await makeMotor(pipe.env.db);
    const id = await store(asset.id);
    await takeAndDie(id);
    expect((await jobsOf(id)).map((j) => j.state)).toEqual(["retry"]);
    expect((await sweep()).map((s) => s.id)).not.toContain(id); // a retry is coming: leave it
    await takeAndDie(id);
    expect(await jobsOf(id)).toEqual([expect.objectContaining({ state: "failed", retry_count: 1 })]);
    expect((await capture(id)).status).toBe("analysing"); // what the sweep is for

    const swept = await sweep();
    const reason = "Analysis did not finish after 2 attempts; re-queue it from the capture page.";
    expect(swept.filter((s) => s.id === id)).toEqual([{ id, assetId: asset.id, attempts: 2, outcome: "failed", error: reason }]);
    expect(await capture(id)).toMatchObject({ status: "failed", error: reason });
    await waitFor(async () => pipe.events.some((e) => e.event === "capture:status" && e.payload.id === id && e.payload.status === "failed"), 5000, "capture:status failed");
    expect(pipe.events.find((e) => e.payload.id === id && e.payload.status === "failed")!.payload).toEqual({ id, assetId: asset.id, status: "failed", error: reason });
    // Once only: a second sweep finds nothing to do.
    expect((await sweep()).map((s) => s.id)).not.toContain(id);

    // Re-queued from the capture page it waits again, and the sweep leaves its live job alone.
    const rq = await (await signedIn(pipe.env.app, "analyst")).post(`/api/captures/${id}/requeue`);
    expect(rq.status).toBe(202);
    expect(rq.body).toMatchObject({ id, status: "queued", version: 1 });
    expect((await sweep()).map((s) => s.id)).not.toContain(id);
    expect((await capture(id)).status).toBe("queued");
  });

  it("a cancelled job fails its capture; a queued capture with a waiting job is left alone", async () => {
    const { asset } = await makeMotor(pipe.env.db);
    const waiting = await store(asset.id);
    const cancelled = await store(asset.id);
    const [job] = await jobsOf(cancelled);
    await queueOf(pipe.env.ctx).boss.cancel(ANALYSIS_QUEUE, job.id);
    const swept = (await sweep()).map((s) => s.id);
    expect(swept).toContain(cancelled);
    expect(swept).not.toContain(waiting);
    expect(await capture(cancelled)).toMatchObject({ status: "failed", error: "Analysis never started (its job was cancelled or lost); re-queue it from the capture page." });
    expect((await capture(waiting)).status).toBe("queued");
  });

  it("no job at all: failed only once untouched longer than the expiry plus the margin; recent changes are left alone", async () => {
    const { asset } = await makeMotor(pipe.env.db);
    const row = (status: string, minutesAgo: number, attempts = 0) => ({
      asset_id: asset.id, taken_at: new Date(), source: "upload", file_name: "lost.csv", format: "csv", blob_key: `captures/${asset.id}/lost-${status}-${minutesAgo}.csv`,
      status, attempts, analysis_version: 1, updated_at: new Date(Date.now() - minutesAgo * 60_000),
    });
    const [old, fresh, recent] = await pipe.env.db("captures").insert([row("analysing", 60, 1), row("queued", 1), row("queued", 0)]).returning("id");
    const swept = await sweep({ graceSeconds: 30, marginSeconds: 120 });
    const ids = swept.map((s) => s.id);
    expect(ids).toContain(old.id);
    expect(ids).not.toContain(fresh.id); // 60 s untouched < 1 s expiry + 120 s margin
    expect(ids).not.toContain(recent.id); // inside the grace period
    expect(await capture(old.id)).toMatchObject({ status: "failed", error: "Analysis did not finish after 1 attempt; re-queue it from the capture page." });
    expect((await capture(fresh.id)).status).toBe("queued");
  });

  it("a capture left received with no job (a server that died between the row and the job): queued again with its job", async () => {
    const { asset } = await makeMotor(pipe.env.db);
    const row = (name: string, minutesAgo: number) => ({
      asset_id: asset.id, taken_at: new Date(Date.now() - minutesAgo * 60_000), source: "upload", file_name: `${name}.csv`, format: "csv", blob_key: `captures/${asset.id}/${name}.csv`,
      status: "received", analysis_version: 1, updated_at: new Date(Date.now() - minutesAgo * 60_000),
    });
    const [older, lost, recent, withJob] = await pipe.env.db("captures").insert([row("older", 30), row("lost", 10), row("recent", 2), row("with-job", 10)]).returning("id");
    // One whose job was sent before the crash (only the status update was lost): its job will move it on, leave it.
    await queueOf(pipe.env.ctx).sendAnalyses([{ captureId: withJob.id, version: 1 }]);
    const before = pipe.events.length;

    // Without the queue the sweep cannot queue them, and leaves them as they are (never "failed").
    const without = (await sweep()).map((s) => s.id);
    expect(without).not.toContain(older.id);
    expect(without).not.toContain(lost.id);
    expect((await capture(lost.id)).status).toBe("received");

    const swept = (await sweep({ queue: queueOf(pipe.env.ctx) })).filter((s) => s.assetId === asset.id);
    expect(swept.map((s) => [s.id, s.outcome])).toEqual([
      [older.id, "requeued"],
      [lost.id, "requeued"],
    ]);
    for (const id of [older.id, lost.id]) {
      expect(await capture(id)).toMatchObject({ status: "queued", error: null, queued_at: expect.any(Date) });
      expect((await jobsOf(id)).map((j) => j.state)).toEqual(["created"]);
    }
    expect((await capture(recent.id)).status).toBe("received"); // younger than 5 minutes: an upload may still be on its way
    expect((await capture(withJob.id)).status).toBe("received");
    expect(await jobsOf(recent.id)).toEqual([]);
    // Oldest capture first, as requeues are taken; and a capture:status event each.
    const jobs = await pipe.env.db.raw(`select data->>'captureId' as id from pgboss.job where name = ? and data->>'captureId' = any(?) order by created_on, id`, [ANALYSIS_QUEUE, [String(older.id), String(lost.id)]]);
    expect(jobs.rows.map((r: { id: string }) => Number(r.id))).toEqual([older.id, lost.id]);
    await waitFor(async () => pipe.events.slice(before).filter((e) => e.event === "capture:status" && e.payload.status === "queued" && [older.id, lost.id].includes(e.payload.id as number)).length === 2, 5000, "capture:status queued");

    // Once only: the next sweep (another worker's, say) finds them queued with a live job.
    expect((await sweep({ queue: queueOf(pipe.env.ctx) })).map((s) => s.id)).not.toContain(lost.id);
    expect(await jobsOf(lost.id)).toHaveLength(1);
  });
});
