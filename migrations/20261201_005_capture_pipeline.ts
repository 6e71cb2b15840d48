import type { Knex } from "knex";

// Capture pipeline bookkeeping: which analysis version the newest queued job will write (so a retried job
// writes the same version and a duplicate run is a no-op), and when a capture was queued and analysed.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("captures", (t) => {
    t.integer("analysis_version").notNullable().defaultTo(1);
    t.timestamp("queued_at", { useTz: true });
    t.timestamp("analysed_at", { useTz: true });
  });
  await knex.raw(`create index analyses_asset_current on analyses (asset_id, taken_at desc) where is_current`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw(`drop index if exists analyses_asset_current`);
  await knex.schema.alterTable("captures", (t) => {
    t.dropColumn("analysis_version");
    t.dropColumn("queued_at");
    t.dropColumn("analysed_at");
  });
}
