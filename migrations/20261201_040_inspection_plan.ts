import type { Knex } from "knex";

// What the inspection plan needs beyond the base tables: the calendar SEQUENCE per inspection (RFC 5545 §3.8.7.4,
// bumped when the due date moves or the inspection is cancelled, so calendar clients replace the old event), and a
// kind + details on history rows so reschedules and reassignments sit in the same history as status moves.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("inspections", (t) => {
    t.integer("ics_sequence").notNullable().defaultTo(0);
    t.index(["asset_id", "status"]);
  });
  await knex.schema.alterTable("inspection_events", (t) => {
    t.string("kind", 12).notNullable().defaultTo("status"); // created | status | rescheduled | reassigned | changed
    t.jsonb("details");
    t.index(["inspection_id", "at"]);
  });
  await knex.raw(
    `alter table inspections add constraint inspections_status_check check (status in ('planned','in_progress','done','cancelled'))`,
  );
  await knex.raw(`alter table inspections add constraint inspections_priority_check check (priority in ('urgent','high','normal','low'))`);
  // One open inspection per finding, also when two planners press "schedule" at the same moment.
  await knex.raw(
    `create unique index inspections_one_open_per_finding on inspections (finding_id) where finding_id is not null and status in ('planned','in_progress')`,
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw(`drop index if exists inspections_one_open_per_finding`);
  await knex.raw(`alter table inspections drop constraint if exists inspections_priority_check`);
  await knex.raw(`alter table inspections drop constraint if exists inspections_status_check`);
  await knex.schema.alterTable("inspection_events", (t) => {
    t.dropIndex(["inspection_id", "at"]);
    t.dropColumn("details");
    t.dropColumn("kind");
  });
  await knex.schema.alterTable("inspections", (t) => {
    t.dropIndex(["asset_id", "status"]);
    t.dropColumn("ics_sequence");
  });
}
