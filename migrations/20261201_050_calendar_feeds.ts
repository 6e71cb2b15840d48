import type { Knex } from "knex";

// Personal calendar feed links (GET /api/calendar/<token>.ics): like gateway tokens, only the sha256 of the whole
// token is kept, with its 8-hex prefix in clear so the owner can tell links apart. Rotating or revoking sets
// revoked_at; rows stay for the audit trail. At most one link per user is active (the partial unique index).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("calendar_feeds", (t) => {
    t.increments("id");
    t.integer("user_id").notNullable().references("users.id").onDelete("CASCADE");
    t.string("token_prefix", 8).notNullable();
    t.string("token_hash", 64).notNullable().unique();
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp("last_used_at", { useTz: true });
    t.timestamp("revoked_at", { useTz: true });
    t.index(["user_id"]);
  });
  await knex.raw(`create unique index calendar_feeds_one_active_per_user on calendar_feeds (user_id) where revoked_at is null`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists("calendar_feeds");
}
