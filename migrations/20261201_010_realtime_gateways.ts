import type { Knex } from "knex";

// Live updates across server processes and streamed captures from gateways.
// - socket_io_attachments: the table @socket.io/postgres-adapter uses for messages over NOTIFY's 8000-byte limit
//   (and for binary payloads); its rows are deleted by the adapter after 30 s.
// - stream_sessions.taken_at: when the gateway says the recording started (defaults to the session's start).
export async function up(knex: Knex): Promise<void> {
  await knex.raw(`
    create table if not exists socket_io_attachments (
      id bigserial unique,
      created_at timestamptz default now(),
      payload bytea
    )`);
  await knex.schema.alterTable("stream_sessions", (t) => {
    t.timestamp("taken_at", { useTz: true });
    t.index(["gateway_id", "status"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("stream_sessions", (t) => {
    t.dropIndex(["gateway_id", "status"]);
    t.dropColumn("taken_at");
  });
  await knex.raw("drop table if exists socket_io_attachments");
}
