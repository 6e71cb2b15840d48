import crypto from "node:crypto";
import PgBoss from "pg-boss";
import type { Knex } from "knex";
import type { AppContext } from "./context.ts";

// The analysis job queue: pg-boss in the application's own PostgreSQL database (schema "pgboss"), so a
// capture row and its job live in one database and no extra service is needed.

export const ANALYSIS_QUEUE = "capture-analysis";
/** pg-boss's schema in the application database (the stuck-capture sweep reads its job and archive tables). */
export const PGBOSS_SCHEMA = "pgboss";

export interface AnalysisJobData {
  captureId: number;
  /** The analyses.version this job writes; a retry of the same job writes the same version (idempotent). */
  version: number;
}

export interface JobPolicy {
  /** A job active longer than this (worker killed, hung) is failed by maintenance and retried. */
  expireInSeconds: number;
  retryLimit: number;
  retryDelay: number;
  retryBackoff: boolean;
}

/** Queue policy from the environment; the sender and the worker read the same variables. */
export function jobPolicy(env: NodeJS.ProcessEnv = process.env): JobPolicy {
  const n = (v: string | undefined, d: number) => (v === undefined || v === "" || !Number.isFinite(Number(v)) ? d : Number(v));
  return {
    expireInSeconds: Math.max(1, n(env.BARHOUND_JOB_EXPIRE_S, 600)),
    retryLimit: n(env.BARHOUND_JOB_RETRY_LIMIT, 3),
    retryDelay: n(env.BARHOUND_JOB_RETRY_DELAY_S, 5),
    retryBackoff: env.BARHOUND_JOB_RETRY_BACKOFF !== "false",
  };
}

export interface CaptureQueue {
  boss: PgBoss;
  policy: JobPolicy;
  /**
   * One job, outside any transaction. Prefer `sendAnalyses` with `{ trx }` wherever the job goes with a row change
   * (uploads, requeues, the sweep do): a job sent after its row's commit is lost when the process dies in between.
   */
  sendAnalysis(data: AnalysisJobData): Promise<string | null>;
  /**
   * Queue many analysis jobs with one INSERT (pg-boss `insert`). Given a knex transaction, the jobs are written in
   * it: they exist exactly when the transaction that reserved their versions commits.
   */
  sendAnalyses(data: AnalysisJobData[], opts?: { trx?: Knex.Transaction }): Promise<void>;
  stop(): Promise<void>;
}

export interface QueueOptions {
  policy?: Partial<JobPolicy>;
  /** Run pg-boss maintenance (expiring stuck jobs, retries) in this process. The worker does; the server need not. */
  supervise?: boolean;
  maintenanceIntervalSeconds?: number;
  max?: number;
}

/** Start pg-boss and make sure the analysis queue exists with our policy (v10: createQueue before send/work). */
export async function createCaptureQueue(databaseUrl: string, opts: QueueOptions = {}): Promise<CaptureQueue> {
  const policy = { ...jobPolicy(), ...opts.policy };
  const boss = new PgBoss({
    connectionString: databaseUrl,
    schema: PGBOSS_SCHEMA,
    max: opts.max ?? 4,
    supervise: opts.supervise ?? false,
    schedule: false,
    migrate: true,
    ...(opts.maintenanceIntervalSeconds ? { maintenanceIntervalSeconds: opts.maintenanceIntervalSeconds } : {}),
  });
  boss.on("error", (err) => console.error("[queue]", err.message));
  await boss.start();
  await boss.createQueue(ANALYSIS_QUEUE, { name: ANALYSIS_QUEUE, ...policy });
  await boss.updateQueue(ANALYSIS_QUEUE, { name: ANALYSIS_QUEUE, ...policy });
  return {
    boss,
    policy,
    // The job carries its own policy, so whichever process created the queue, the sender's settings apply.
    sendAnalysis: (data) => boss.send(ANALYSIS_QUEUE, data as unknown as object, { ...policy }),
    async sendAnalyses(data, o = {}) {
      if (!data.length) return;
      // One INSERT gives every job the same created_on, and pg-boss then takes them in id order: ids that start
      // with their index keep the caller's order (the rest of a random UUID keeps them unique).
      const jobs = data.map((d, i) => ({ id: i.toString(16).padStart(8, "0") + crypto.randomUUID().slice(8), name: ANALYSIS_QUEUE, data: d as unknown as object, ...policy }));
      await boss.insert(jobs, o.trx ? { db: knexExecutor(o.trx) } : {});
    },
    stop: () => boss.stop({ graceful: false, wait: true, timeout: 2000 }),
  };
}

/**
 * pg-boss's `db` option ({ executeSql(text, values) }) over a knex transaction, so jobs are written in the caller's
 * transaction. pg-boss writes $1…$n placeholders; knex binds "?" in order, so each $n becomes "?" with its value.
 * (pg-boss's SQL has no literal "?" or "$n" of its own.)
 */
export function knexExecutor(trx: Knex | Knex.Transaction) {
  return {
    async executeSql(text: string, values: unknown[] = []) {
      const bindings: unknown[] = [];
      const sql = text.replace(/\$(\d+)/g, (_m, n: string) => (bindings.push(values[Number(n) - 1] ?? null), "?"));
      return (await trx.raw(sql, bindings as Knex.RawBinding[])) as { rows: Record<string, unknown>[] };
    },
  };
}

/** The queue registered in ctx.services.queue (startServer and the test helpers register one). */
export function queueOf(ctx: AppContext): CaptureQueue {
  const q = ctx.services.queue as CaptureQueue | undefined;
  if (!q) throw new Error("no job queue registered in ctx.services.queue");
  return q;
}
