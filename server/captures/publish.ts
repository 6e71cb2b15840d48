import type { Knex } from "knex";
import type { AppContext } from "../context.ts";
import { notifyEvent } from "../events.ts";

export type PipelineEvent = "capture:status" | "finding:new" | "finding:verdict";

/**
 * Announce a live-update event from the server process: straight to the browsers when the realtime module
 * registered `ctx.services.publish`, otherwise through PostgreSQL NOTIFY (which every server LISTENs to).
 * Never throws: a lost live update must not fail an upload.
 */
export async function publishEvent(ctx: AppContext, event: PipelineEvent, payload: Record<string, unknown>): Promise<void> {
  try {
    const publish = ctx.services.publish as ((e: string, p: unknown) => unknown) | undefined;
    if (publish) await publish(event, payload);
    else await notifyEvent(ctx.db, event, payload);
  } catch (err) {
    console.error(`[events] could not publish ${event}:`, (err as Error).message);
  }
}

/** The worker's side: NOTIFY only (it has no sockets). Never throws. */
export async function notifyQuietly(db: Knex, event: PipelineEvent, payload: Record<string, unknown>): Promise<void> {
  await notifyEvent(db, event, payload).catch((err) => console.error(`[events] could not notify ${event}:`, (err as Error).message));
}
