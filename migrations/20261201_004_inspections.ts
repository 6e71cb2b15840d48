import type { Knex } from "knex";

// Inspections planned from findings, their status history and attachments.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("inspections", (t) => {
    t.increments("id");
    t.integer("asset_id").notNullable().references("assets.id");
    t.integer("finding_id").references("findings.id").onDelete("SET NULL");
    t.string("title", 200).notNullable();
    t.text("instructions");
    t.date("due_date").notNullable();
    t.integer("assignee_id").references("users.id").onDelete("SET NULL");
    t.string("priority", 10).notNullable().defaultTo("normal"); // urgent | high | normal | low
    t.string("status", 12).notNullable().defaultTo("planned"); // planned | in_progress | done | cancelled
    t.integer("created_by").references("users.id").onDelete("SET NULL");
    t.text("completion_note");
    t.string("outcome", 40);
    t.timestamp("completed_at", { useTz: true });
    t.timestamps(true, true);
    t.index(["assignee_id", "status"]);
    t.index(["due_date"]);
  });
  await knex.schema.createTable("inspection_events", (t) => {
    t.increments("id");
    t.integer("inspection_id").notNullable().references("inspections.id").onDelete("CASCADE");
    t.timestamp("at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.integer("by_user_id").references("users.id").onDelete("SET NULL");
    t.string("from_status", 12);
    t.string("to_status", 12).notNullable();
    t.text("note");
  });
  await knex.schema.createTable("inspection_attachments", (t) => {
    t.increments("id");
    t.integer("inspection_id").notNullable().references("inspections.id").onDelete("CASCADE");
    t.string("file_name", 300).notNullable();
    t.string("content_type", 100).notNullable();
    t.string("blob_key", 300).notNullable();
    t.bigInteger("byte_size").notNullable();
    t.integer("capture_id").references("captures.id").onDelete("SET NULL");
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const t of ["inspection_attachments", "inspection_events", "inspections"]) await knex.schema.dropTableIfExists(t);
}
