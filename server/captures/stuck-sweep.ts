// Captures whose analysis will never finish: their job used up its retries by timing out (a worker killed again and
// again, or a hung analysis that pg-boss expired), was cancelled, or is gone. The worker writes "failed" itself when
// an attempt throws; nobody does when the attempt never comes back, and the capture would show "analysing" forever.
// The worker process runs this sweep at start and every minute (workers/worker.ts); any number of workers may.
// It also re-queues captures left "received" with no job: rows written before uploads sent their jobs in the row's
// own transaction, when the server died between the two (today a capture is inserted "queued" with its job).
import type { Knex } from "knex";
import { ANALYSIS_QUEUE, PGBOSS_SCHEMA, type CaptureQueue } from "../queue.ts";
import { notifyQuietly } from "./publish.ts";

export interface SweepOptions {
  /** The queue's job expiry (JobPolicy.expireInSeconds): how long an attempt may run. */
  expireInSeconds: number;
  /** A capture touched more recently than this is left alone (a requeue in flight). Default 60 s. */
  graceSeconds?: number;
  /** With no job at all, wait the expiry plus this before giving up. Default 300 s. */
  marginSeconds?: number;
  /** At most this many captures are looked at per sweep. Default 500. */
  limit?: number;
  /**
   * Re-queue captures left "received" (no job at all) untouched this long. Default 300 s. Needs `queue`: without one
   * they are left alone.
   */
  receivedAfterSeconds?: number;
  /** The job queue, to re-queue lost "received" captures (their job is sent in the transaction that queues them). */
  queue?: Pick<CaptureQueue, "sendAnalyses">;
}

export interface SweptCapture {
  id: number;
  assetId: number;
  attempts: number;
  /** "failed": marked failed with `error`; "requeued": a lost "received" capture given its job (`error` says so). */
  outcome: "failed" | "requeued";
  error: string;
}

export const REQUEUED_NOTE = "Left received with no job (the server stopped before queueing it); queued again.";

const LIVE = new Set(["created", "retry", "active"]);

export function stuckReason(attempts: number): string {
  if (attempts < 1) return "Analysis never started (its job was cancelled or lost); re-queue it from the capture page.";
  return `Analysis did not finish after ${attempts} attempt${attempts === 1 ? "" : "s"}; re-queue it from the capture page.`;
}

/**
 * Mark failed, with the reason and a capture:status event, every queued/analysing capture no job will finish; give
 * a job to every capture left "received" without one (with `opts.queue`).
 */
export async function sweepStuckCaptures(db: Knex, opts: SweepOptions): Promise<SweptCapture[]> {
  const grace = opts.graceSeconds ?? 60;
  const noJobAfter = opts.expireInSeconds + (opts.marginSeconds ?? 300);
  const receivedAfter = opts.receivedAfterSeconds ?? 300;
  const candidates: { id: number; asset_id: number; status: string; analysis_version: number; attempts: number; idle_s: number }[] = await db("captures")
    .where((w) =>
      w
        .where((q) => q.whereIn("status", ["queued", "analysing"]).andWhereRaw("updated_at <= now() - make_interval(secs => ?)", [grace]))
        .orWhere((q) => q.where("status", "received").andWhereRaw("updated_at <= now() - make_interval(secs => ?)", [receivedAfter])),
    )
    .orderBy("updated_at")
    .limit(opts.limit ?? 500)
    .select("id", "asset_id", "status", "analysis_version", "attempts", db.raw("extract(epoch from now() - updated_at)::float8 as idle_s"));
  if (!candidates.length) return [];

  // Their jobs, live or finished (pg-boss moves finished jobs to the archive after a while). One pass over each table.
  const jobSql = (table: string) =>
    `select data->>'captureId' as capture_id, data->>'version' as version, state::text as state, retry_count, started_on
       from ${PGBOSS_SCHEMA}.${table} where name = ? and data->>'captureId' = any(?::text[])`;
  const ids = candidates.map((c) => String(c.id));
  const { rows: jobs } = await db.raw<{ rows: { capture_id: string; version: string; state: string; retry_count: number; started_on: Date | null }[] }>(
    `${jobSql("job")} union all ${jobSql("archive")}`,
    [ANALYSIS_QUEUE, ids, ANALYSIS_QUEUE, ids],
  );
  const byCapture = new Map<string, typeof jobs>();
  for (const j of jobs) {
    const key = `${j.capture_id}:${j.version}`;
    byCapture.set(key, [...(byCapture.get(key) ?? []), j]);
  }

  const swept: SweptCapture[] = [];
  const lostReceived: typeof candidates = [];
  for (const c of candidates) {
    const mine = byCapture.get(`${c.id}:${c.analysis_version}`) ?? [];
    if (mine.some((j) => LIVE.has(j.state))) continue; // still waiting or running: pg-boss will retry or expire it
    if (c.status === "received" && !mine.length) {
      lostReceived.push(c); // never queued: give it its job (below)
      continue;
    }
    if (!mine.length && c.idle_s < noJobAfter) continue; // no job yet: give a sender time before calling it lost
    // retry_count goes up on every fetch after the first; a job never started made no attempt.
    const attempts = mine.length ? Math.max(...mine.map((j) => j.retry_count + (j.started_on ? 1 : 0))) : c.attempts;
    const error = stuckReason(attempts);
    // Conditional: a requeue since we looked (new version, or updated_at now) or a late result wins.
    const updated = await db("captures")
      .where({ id: c.id, analysis_version: c.analysis_version })
      .whereIn("status", c.status === "received" ? ["received"] : ["queued", "analysing"])
      .andWhereRaw("updated_at <= now() - make_interval(secs => ?)", [c.status === "received" ? receivedAfter : grace])
      .update({ status: "failed", error, updated_at: db.fn.now() });
    if (!updated) continue;
    await notifyQuietly(db, "capture:status", { id: c.id, assetId: c.asset_id, status: "failed", error });
    swept.push({ id: c.id, assetId: c.asset_id, attempts, outcome: "failed", error });
  }
  if (lostReceived.length && opts.queue) swept.push(...(await requeueReceived(db, opts.queue, lostReceived.map((c) => c.id), receivedAfter)));
  return swept;
}

/**
 * Queue captures left "received": one UPDATE (still received and untouched, so a second sweeper finds nothing) and
 * their jobs, in one transaction, oldest capture first, as requeueAnalyses does.
 */
async function requeueReceived(db: Knex, queue: Pick<CaptureQueue, "sendAnalyses">, ids: number[], receivedAfter: number): Promise<SweptCapture[]> {
  const rows = await db.transaction(async (trx) => {
    const rows: { id: number; asset_id: number; analysis_version: number; attempts: number; taken_at: Date }[] = await trx("captures")
      .whereIn("id", ids)
      .andWhere("status", "received")
      .andWhereRaw("updated_at <= now() - make_interval(secs => ?)", [receivedAfter])
      .update({ status: "queued", error: null, queued_at: trx.fn.now(), updated_at: trx.fn.now() })
      .returning(["id", "asset_id", "analysis_version", "attempts", "taken_at"]);
    rows.sort((a, b) => +a.taken_at - +b.taken_at || a.id - b.id);
    await queue.sendAnalyses(rows.map((r) => ({ captureId: r.id, version: r.analysis_version })), { trx });
    return rows;
  });
  for (const r of rows) await notifyQuietly(db, "capture:status", { id: r.id, assetId: r.asset_id, status: "queued" });
  return rows.map((r) => ({ id: r.id, assetId: r.asset_id, attempts: r.attempts, outcome: "requeued" as const, error: REQUEUED_NOTE }));
}
