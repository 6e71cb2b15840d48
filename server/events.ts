import type { Knex } from "knex";

/** The PostgreSQL NOTIFY channel that carries live-update events between processes (server ↔ worker). */
export const EVENTS_CHANNEL = "barhound_events";

/**
 * Announce a live-update event (e.g. "capture:status") to every server process through PostgreSQL NOTIFY.
 * Used by the worker process and by server code that has no socket.io handle. Servers LISTEN on the channel
 * and forward the event to their own browser sockets (server/realtime.ts). Pass a transaction to have the
 * notification delivered only if it commits.
 */
export async function notifyEvent(db: Knex | Knex.Transaction, event: string, payload: unknown): Promise<void> {
  await db.raw("select pg_notify(?, ?)", [EVENTS_CHANNEL, JSON.stringify({ event, payload })]);
}
