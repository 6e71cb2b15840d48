import { describe, expect, it } from "vitest";
import { signedIn } from "../helpers/context.ts";
import { captureFile, makeMotor, waitFor, pipelineWithWorker } from "../helpers/pipeline.ts";
import { storeCapturesAndQueue } from "../../server/captures/ingest.ts";
import { ANALYSIS_QUEUE } from "../../server/queue.ts";

// Re-analysis of every capture of a motor: one UPDATE reserves the versions, one INSERT queues the jobs (one
// transaction); a real worker then analyses each capture exactly once more.
const pipe = pipelineWithWorker();
const N = 50;

const jobsFor = async (ids: number[], version: number) =>
  (
    await pipe.env.db.raw(
      `select data->>'captureId' as capture_id, created_on from pgboss.job where name = ? and data->>'captureId' = any(?::text[]) and (data->>'version')::int = ?`,
      [ANALYSIS_QUEUE, ids.map(String), version],
    )
  ).rows as { capture_id: string; created_on: Date }[];

describe("re-analysis of a motor", () => {
  it(`queues all ${N} captures in one batch; each ends analysed exactly once more, at version 2`, async () => {
    const { asset } = await makeMotor(pipe.env.db);
    const bytes = captureFile({ seed: 3, durationS: 4 });
    const stored = await storeCapturesAndQueue(
      pipe.env.ctx,
      Array.from({ length: N }, (_, i) => ({ assetId: asset.id, takenAt: new Date(Date.UTC(2026, 9, 1 + i)), source: "upload" as const, fileName: `c${i}.csv`, format: "csv", bytes })),
    );
    const ids = stored.map((s) => s.id);
    await waitFor(async () => (await pipe.env.db("captures").whereIn("id", ids).where({ status: "analysed" })).length === N, 60_000, "first analyses");

    const res = await (await signedIn(pipe.env.app, "analyst")).post(`/api/assets/${asset.id}/reanalyse`);
    expect(res.status).toBe(202);
    expect(res.body).toEqual({ queued: N });
    // One UPDATE, one INSERT: every version reserved in the same statement, every job written at the same instant.
    const rows = await pipe.env.db("captures").whereIn("id", ids).select("analysis_version", "queued_at");
    expect(new Set(rows.map((r) => r.analysis_version))).toEqual(new Set([2]));
    expect(new Set(rows.map((r) => +r.queued_at)).size).toBe(1);
    const jobs = await jobsFor(ids, 2);
    expect(jobs).toHaveLength(N);
    expect(new Set(jobs.map((j) => +j.created_on)).size).toBe(1);

    await waitFor(async () => (await pipe.env.db("captures").whereIn("id", ids).where({ status: "analysed" })).length === N, 60_000, "re-analyses");
    const analyses = await pipe.env.db("analyses").whereIn("capture_id", ids).select("capture_id", "version", "is_current");
    expect(analyses).toHaveLength(2 * N);
    for (const id of ids) {
      const mine = analyses.filter((a) => a.capture_id === id).sort((a, b) => a.version - b.version);
      expect(mine.map((a) => [a.version, a.is_current])).toEqual([[1, false], [2, true]]);
    }
    // One attempt per version: no job ran twice.
    expect(new Set((await pipe.env.db("captures").whereIn("id", ids).select("attempts")).map((r) => r.attempts))).toEqual(new Set([2]));
    expect(await jobsFor(ids, 2)).toHaveLength(N);
  }, 120_000);
});
