import type { Knex } from "knex";

// Captures, their analyses (versioned), findings and verdicts, streamed-capture sessions.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("captures", (t) => {
    t.increments("id");
    t.integer("asset_id").notNullable().references("assets.id");
    t.integer("measurement_point_id").references("measurement_points.id").onDelete("SET NULL");
    t.timestamp("taken_at", { useTz: true }).notNullable();
    t.integer("taken_by_user_id").references("users.id").onDelete("SET NULL");
    t.integer("gateway_id").references("gateways.id").onDelete("SET NULL");
    t.string("source", 10).notNullable(); // upload | stream
    t.string("file_name", 300);
    t.string("format", 10); // csv | wav | stream
    t.float("sample_rate");
    t.float("duration_s");
    t.integer("channel_count");
    t.jsonb("channels"); // [{ name, kind, unit, position }]
    t.bigInteger("byte_size");
    t.string("blob_key", 300);
    t.string("status", 12).notNullable().defaultTo("received");
    t.text("error");
    t.text("notes");
    t.integer("attempts").notNullable().defaultTo(0);
    t.timestamps(true, true);
    t.index(["asset_id", "taken_at"]);
    t.index(["status"]);
  });
  await knex.raw(`alter table captures add constraint captures_status_check check (status in ('received','queued','analysing','analysed','failed'))`);

  await knex.schema.createTable("analyses", (t) => {
    t.increments("id");
    t.integer("capture_id").notNullable().references("captures.id").onDelete("CASCADE");
    t.integer("asset_id").notNullable().references("assets.id");
    t.integer("version").notNullable();
    t.boolean("is_current").notNullable().defaultTo(true);
    t.string("engine_version", 20).notNullable();
    t.integer("nameplate_version").notNullable();
    t.jsonb("params").notNullable();
    t.jsonb("result").notNullable();
    t.timestamp("taken_at", { useTz: true }).notNullable();
    t.float("supply_hz");
    t.float("slip");
    t.float("rpm");
    t.float("load_pct");
    t.float("sideband_db");
    t.string("rotor_grade", 4); // R1..R5, null when not assessable
    t.boolean("rotor_assessable").notNullable().defaultTo(false);
    t.float("vibration_rms");
    t.string("vibration_zone", 1);
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(["capture_id", "version"]);
    t.index(["asset_id", "taken_at"]);
  });
  await knex.raw(`create unique index analyses_one_current on analyses (capture_id) where is_current`);

  await knex.schema.createTable("findings", (t) => {
    t.increments("id");
    t.integer("asset_id").notNullable().references("assets.id");
    t.integer("analysis_id").notNullable().references("analyses.id").onDelete("CASCADE");
    t.integer("capture_id").notNullable().references("captures.id").onDelete("CASCADE");
    t.string("kind", 12).notNullable(); // rotor | vibration
    t.string("level", 4).notNullable(); // R2..R5 or zone B..D
    t.string("previous_level", 4);
    t.text("summary").notNullable();
    t.string("status", 12).notNullable().defaultTo("open"); // open | confirmed | dismissed | remeasure
    t.timestamps(true, true);
    t.unique(["analysis_id", "kind"]);
    t.index(["asset_id", "status"]);
  });
  await knex.schema.createTable("verdicts", (t) => {
    t.increments("id");
    t.integer("finding_id").notNullable().references("findings.id").onDelete("CASCADE");
    t.integer("analyst_id").references("users.id").onDelete("SET NULL");
    t.string("verdict", 12).notNullable(); // confirmed | dismissed | remeasure
    t.text("note");
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable("stream_sessions", (t) => {
    t.uuid("id").primary();
    t.integer("gateway_id").notNullable().references("gateways.id").onDelete("CASCADE");
    t.integer("asset_id").notNullable().references("assets.id");
    t.integer("measurement_point_id").references("measurement_points.id").onDelete("SET NULL");
    t.float("sample_rate").notNullable();
    t.jsonb("channels").notNullable();
    t.string("sample_format", 10).notNullable(); // f32le | i16le | i32le
    t.integer("next_seq").notNullable().defaultTo(0);
    t.bigInteger("bytes_received").notNullable().defaultTo(0);
    t.string("status", 12).notNullable().defaultTo("open"); // open | ended | aborted
    t.integer("capture_id").references("captures.id").onDelete("SET NULL");
    t.timestamps(true, true);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const t of ["stream_sessions", "verdicts", "findings", "analyses", "captures"]) await knex.schema.dropTableIfExists(t);
}
