import { inject } from "vitest";
import request from "supertest";
import type { Knex } from "knex";
import { createKnex } from "../../server/db.ts";
import { loadConfig, type Config } from "../../server/config.ts";
import { createMailer } from "../../server/mail/mailer.ts";
import { startMailFake } from "../../server/mail/fake-smtp.ts";
import { createApp } from "../../server/app.ts";
import type { AppContext } from "../../server/context.ts";
import { seedDemoUsers, DEMO_USERS, DEMO_PASSWORD } from "../../server/seed/demo-users.ts";
import type { Role } from "../../server/permissions.ts";

export interface TestEnv {
  db: Knex;
  config: Config;
  ctx: AppContext;
  app: ReturnType<typeof createApp>;
  close(): Promise<void>;
}

/** A real app on the test database, with the local mail fake on a free port. */
export async function makeTestEnv(overrides: Partial<Config> = {}, extend?: (ctx: AppContext) => Promise<void> | void): Promise<TestEnv> {
  const db = createKnex(inject("databaseUrl"));
  const config = { ...loadConfig({ NODE_ENV: "test", JWT_SECRET: "test-secret-for-barhound-only", DATABASE_URL: inject("databaseUrl") }), ...overrides };
  const fake = await startMailFake({ db, port: 0 });
  config.smtp = { ...config.smtp, port: fake.port, host: "127.0.0.1" };
  config.mailFake = true;
  const ctx: AppContext = { db, config, mailer: createMailer(config), services: {} };
  if (extend) await extend(ctx);
  await seedDemoUsers(db);
  const app = createApp(ctx);
  return {
    db,
    config,
    ctx,
    app,
    async close() {
      await fake.close();
      await db.destroy();
    },
  };
}

export function demoUser(role: Role) {
  return DEMO_USERS.find((u) => u.role === role)!;
}

/** A supertest agent signed in as the demo user of a role. */
export async function signedIn(app: TestEnv["app"], role: Role) {
  const agent = request.agent(app);
  const res = await agent.post("/api/auth/login").send({ email: demoUser(role).email, password: DEMO_PASSWORD });
  if (res.status !== 200) throw new Error(`sign-in as ${role} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return agent;
}

/** Wait for a caught mail to a recipient (the SMTP fake writes asynchronously). */
export async function waitForMail(db: Knex, to: string, subjectLike = "%", timeoutMs = 5000) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const m = await db("caught_mail").where("mail_to", "like", `%${to}%`).andWhere("subject", "like", subjectLike).orderBy("id", "desc").first();
    if (m) return m;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`no mail to ${to} within ${timeoutMs} ms`);
}

/**
 * Wait until a statement matching `queryLike` (SQL ILIKE) waits for a lock in another session: for race tests that
 * hold a lock in a transaction, fire a request, and let go only once the request's statement is queued behind it.
 */
export async function waitForLockWait(db: Knex, queryLike: string, timeoutMs = 5000) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const { rows } = await db.raw(
      "select count(*)::int as n from pg_stat_activity where datname = current_database() and wait_event_type = 'Lock' and query ilike ?",
      [queryLike],
    );
    if (rows[0].n > 0) return;
    await new Promise((r) => setTimeout(r, 20));
  }
  throw new Error(`no statement like ${queryLike} waited for a lock within ${timeoutMs} ms`);
}
