import type { Knex } from "knex";

// Sites, areas, motors (assets) with their nameplate, measurement points, gateways and gateway tokens.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("sites", (t) => {
    t.increments("id");
    t.string("code", 20).notNullable().unique();
    t.string("name", 200).notNullable();
    t.string("timezone", 60).notNullable().defaultTo("UTC");
    t.timestamps(true, true);
  });
  await knex.schema.createTable("areas", (t) => {
    t.increments("id");
    t.integer("site_id").notNullable().references("sites.id").onDelete("CASCADE");
    t.string("name", 200).notNullable();
    t.unique(["site_id", "name"]);
  });
  await knex.schema.createTable("assets", (t) => {
    t.increments("id");
    t.integer("area_id").notNullable().references("areas.id");
    t.string("tag", 60).notNullable().unique();
    t.string("name", 200).notNullable();
    t.string("driven_equipment", 40).notNullable().defaultTo("pump");
    t.string("criticality", 10).notNullable().defaultTo("medium"); // low | medium | high
    t.float("rated_kw");
    t.float("rated_voltage");
    t.float("rated_current");
    t.float("rated_hz").notNullable().defaultTo(50);
    t.float("rated_rpm").notNullable();
    t.integer("poles").notNullable();
    t.integer("rotor_bars");
    t.integer("stator_slots");
    t.string("design_letter", 2);
    t.string("efficiency_class", 10);
    t.float("efficiency_pct");
    t.float("power_factor");
    t.string("connection", 10); // star | delta
    t.boolean("drive_fed").notNullable().defaultTo(false);
    t.integer("machine_group").notNullable().defaultTo(2);
    t.string("support", 10).notNullable().defaultTo("rigid");
    t.jsonb("motor_model"); // measured circuit parameters, when given
    t.integer("nameplate_version").notNullable().defaultTo(1);
    t.timestamps(true, true);
  });
  await knex.schema.createTable("measurement_points", (t) => {
    t.increments("id");
    t.integer("asset_id").notNullable().references("assets.id").onDelete("CASCADE");
    t.string("name", 100).notNullable();
    t.string("kind", 20).notNullable(); // current | vibration | voltage
    t.string("position", 10); // A/B/C phase, H/V/A axis
    t.float("ct_ratio");
    t.float("sensitivity"); // mV per unit for accelerometers
    t.string("unit", 10).notNullable().defaultTo("A");
    t.unique(["asset_id", "name"]);
  });
  await knex.schema.createTable("gateways", (t) => {
    t.increments("id");
    t.integer("site_id").references("sites.id").onDelete("SET NULL");
    t.string("name", 200).notNullable();
    t.string("token_prefix", 12).notNullable();
    t.string("token_hash", 64).notNullable().unique();
    t.integer("created_by").references("users.id").onDelete("SET NULL");
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp("revoked_at", { useTz: true });
    t.timestamp("last_seen_at", { useTz: true });
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const t of ["gateways", "measurement_points", "assets", "areas", "sites"]) await knex.schema.dropTableIfExists(t);
}
