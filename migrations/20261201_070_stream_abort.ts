import type { Knex } from "knex";

// Who gave an aborted stream session up: "gateway" (it sent "abort", with its optional reason) or "sweep" (no progress
// for 48 h). Sessions aborted before this migration were all the sweep's.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("stream_sessions", (t) => {
    t.string("aborted_by", 10);
    t.string("abort_reason", 200);
  });
  await knex("stream_sessions").where({ status: "aborted" }).update({ aborted_by: "sweep" });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("stream_sessions", (t) => {
    t.dropColumn("abort_reason");
    t.dropColumn("aborted_by");
  });
}
