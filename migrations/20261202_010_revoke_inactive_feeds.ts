import type { Knex } from "knex";

// Deactivating a user now revokes their calendar link. Links of users who were already inactive before that rule
// are revoked here, so a reactivation cannot bring them back. Nothing to undo: a revoked link stays revoked.
export async function up(knex: Knex): Promise<void> {
  await knex("calendar_feeds")
    .whereNull("revoked_at")
    .whereIn("user_id", knex("users").select("id").where({ active: false }))
    .update({ revoked_at: knex.fn.now() });
}

export async function down(): Promise<void> {}
