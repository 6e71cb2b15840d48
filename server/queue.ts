import PgBoss from "pg-boss";
import type { AppContext } from "./context.ts";

// The analysis job queue: pg-boss in the application's own PostgreSQL database (schema "pgboss"), so a
// capture row and its job live in one database and no extra service is needed.

export const ANALYSIS_QUEUE = "capture-analysis";

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
  sendAnalysis(data: AnalysisJobData): Promise<string | null>;
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
    schema: "pgboss",
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
    stop: () => boss.stop({ graceful: false, wait: true, timeout: 2000 }),
  };
}

/** The queue registered in ctx.services.queue (startServer and the test helpers register one). */
export function queueOf(ctx: AppContext): CaptureQueue {
  const q = ctx.services.queue as CaptureQueue | undefined;
  if (!q) throw new Error("no job queue registered in ctx.services.queue");
  return q;
}
