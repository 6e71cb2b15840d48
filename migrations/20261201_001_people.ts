import type { Knex } from "knex";

// Users, sign-in tokens (invite / password reset), the audit trail and the local mail catcher.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("users", (t) => {
    t.increments("id");
    t.string("email", 320).notNullable().unique();
    t.string("name", 200).notNullable();
    t.string("role", 20).notNullable();
    t.string("password_hash", 100);
    t.boolean("active").notNullable().defaultTo(true);
    t.timestamp("last_sign_in_at", { useTz: true });
    t.timestamps(true, true);
  });
  await knex.raw(`alter table users add constraint users_role_check check (role in ('technician','analyst','planner','manager','admin'))`);

  await knex.schema.createTable("user_tokens", (t) => {
    t.increments("id");
    t.integer("user_id").notNullable().references("users.id").onDelete("CASCADE");
    t.string("kind", 10).notNullable(); // invite | reset
    t.string("token_hash", 64).notNullable().unique();
    t.timestamp("expires_at", { useTz: true }).notNullable();
    t.timestamp("used_at", { useTz: true });
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable("audit_log", (t) => {
    t.bigIncrements("id");
    t.timestamp("at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.integer("actor_user_id").references("users.id").onDelete("SET NULL");
    t.string("actor_label", 320);
    t.string("action", 60).notNullable();
    t.string("subject_type", 40);
    t.string("subject_id", 40);
    t.jsonb("details");
    t.string("ip", 64);
    t.index(["at"]);
    t.index(["subject_type", "subject_id"]);
  });

  await knex.schema.createTable("caught_mail", (t) => {
    t.increments("id");
    t.timestamp("received_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.string("mail_from", 320);
    t.text("mail_to");
    t.text("subject");
    t.text("text_body");
    t.text("html_body");
    t.jsonb("attachments"); // [{ filename, contentType, size, content (base64) }]
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists("caught_mail");
  await knex.schema.dropTableIfExists("audit_log");
  await knex.schema.dropTableIfExists("user_tokens");
  await knex.schema.dropTableIfExists("users");
}
