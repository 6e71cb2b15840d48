import { afterAll, beforeAll, describe, expect, it } from "vitest";
import crypto from "node:crypto";
import request from "supertest";
import { demoUser, makeTestEnv, signedIn, waitForLockWait, type TestEnv } from "../helpers/context.ts";
import { contentLines, vevents } from "../helpers/ics.ts";
import { hashPassword } from "../../server/auth.ts";
import { routeRegistry } from "../../server/http.ts";
import type { Role } from "../../server/permissions.ts";
import { up } from "../../migrations/20261202_010_revoke_inactive_feeds.ts";

// Calendar subscription: a personal feed link per user, fetched without a session by a calendar application.
// Fixture rows carry the tag prefix "CALF-" and the users the e-mail suffix "calfeed", so they do not meet
// other test files' rows in the shared database.

let env: TestEnv;
const PASSWORD = "calendar-feed-test-pw";
const ids = { site: 0, area: 0, motor: 0, techA: 0, techB: 0, planner: 0 };
const users: Record<"techA" | "techB" | "planner" | "manager", { email: string; name: string; role: Role }> = {
  techA: { email: "edda.korsvik.calfeed@northwend.example", name: "Edda Korsvik", role: "technician" },
  techB: { email: "luca.brennan.calfeed@northwend.example", name: "Luca Brennan", role: "technician" },
  planner: { email: "hale.osei.calfeed@northwend.example", name: "Hale Osei", role: "planner" },
  manager: { email: "runa.tamsin.calfeed@northwend.example", name: "Runa Tamsin", role: "manager" },
};
const insp = { aPlanned: 0, aStarted: 0, aDone: 0, bPlanned: 0, aCancelled: 0 };

// ---------------------------------------------------------------------------------------------------------
const uidOf = (id: number) => `inspection-${id}@barhound.local`;
const uids = (ics: string) => vevents(ics).map((e) => e.UID).sort();
const isoDay = (offsetDays: number) => new Date(Date.now() + offsetDays * 86_400_000).toISOString().slice(0, 10);

/** The path part of a feed URL: what a calendar application fetches (no cookie: a bare supertest request). */
const feedPath = (url: string) => new URL(url).pathname;
const fetchFeed = (url: string) => request(env.app).get(feedPath(url));

async function signIn(who: keyof typeof users) {
  const agent = request.agent(env.app);
  const res = await agent.post("/api/auth/login").send({ email: users[who].email, password: PASSWORD });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return agent;
}

async function createLink(agent: request.Agent) {
  const res = await agent.post("/api/calendar-feed").send({});
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { url: string; token: string; scope: string; link: { prefix: string; createdAt: string; lastUsedAt: string | null } };
}

/** Every open inspection in the database: the whole-plan feed must hold exactly these. */
async function openInspectionUids() {
  const rows: number[] = await env.db("inspections").whereIn("status", ["planned", "in_progress"]).pluck("id");
  return rows.map(uidOf).sort();
}

beforeAll(async () => {
  env = await makeTestEnv({ loginRateLimit: 1000, feedRateLimit: 1000, publicUrl: "https://barhound.northwend.example" });
  const db = env.db;
  const hash = await hashPassword(PASSWORD);
  for (const [key, u] of Object.entries(users)) {
    const [row] = await db("users").insert({ ...u, password_hash: hash, active: true }).returning("id");
    if (key in ids) ids[key as keyof typeof ids] = row.id;
  }
  const [site] = await db("sites").insert({ code: "CALF", name: "Calendar Feed Test Works", timezone: "UTC" }).returning("id");
  const [area] = await db("areas").insert({ site_id: site.id, name: "Intake" }).returning("id");
  const [motor] = await db("assets").insert({ area_id: area.id, tag: "CALF-P1", name: "Intake pump 1", criticality: "high", rated_rpm: 1480, poles: 4, rated_kw: 75 }).returning("id");
  Object.assign(ids, { site: site.id, area: area.id, motor: motor.id });
  const add = async (title: string, assignee: number, status: string, due: number) => {
    const [row] = await db("inspections")
      .insert({ asset_id: motor.id, title, due_date: isoDay(due), assignee_id: assignee, priority: "high", status, created_by: ids.planner })
      .returning("id");
    return row.id as number;
  };
  insp.aPlanned = await add("CALF check bars, A", ids.techA, "planned", 5);
  insp.aStarted = await add("CALF vibration round, A", ids.techA, "in_progress", 1);
  insp.aDone = await add("CALF finished, A", ids.techA, "done", -2);
  insp.aCancelled = await add("CALF cancelled, A", ids.techA, "cancelled", 3);
  insp.bPlanned = await add("CALF terminal box, B", ids.techB, "planned", 7);
});
afterAll(async () => env.close());

// ---------------------------------------------------------------------------------------------------------

describe("calendar feed link: create, fetch without a session", () => {
  it("a planner creates a link; the feed answers without a cookie with the same calendar the export gives", async () => {
    const planner = await signIn("planner");
    const before = await planner.get("/api/calendar-feed");
    expect(before.status).toBe(200);
    expect(before.body).toEqual({ scope: "plan", link: null });

    const created = await createLink(planner);
    expect(created.scope).toBe("plan");
    expect(created.token).toMatch(/^bhc_[0-9a-f]{8}_[A-Za-z0-9_-]{43}$/);
    expect(created.url).toBe(`https://barhound.northwend.example/api/calendar/${created.token}.ics`);
    expect(created.link.prefix).toBe(`${created.token.slice(0, 12)}_…`);
    expect(created.link.lastUsedAt).toBeNull();

    const res = await fetchFeed(created.url);
    expect(res.status, res.text).toBe(200);
    expect(res.headers["set-cookie"]).toBeUndefined();
    expect(res.headers["content-type"]).toMatch(/^text\/calendar; charset=utf-8/);
    expect(res.headers["cache-control"]).toBe("private, max-age=1800");
    const lines = contentLines(res.text);
    expect(lines[0]).toBe("BEGIN:VCALENDAR");
    expect(lines.at(-1)).toBe("END:VCALENDAR");
    expect(lines).toEqual(expect.arrayContaining(["VERSION:2.0", "METHOD:PUBLISH", "REFRESH-INTERVAL;VALUE=DURATION:PT30M", "X-PUBLISHED-TTL:PT30M"]));
    for (const raw of res.text.split("\r\n")) expect(Buffer.byteLength(raw, "utf8")).toBeLessThanOrEqual(75); // §3.1

    // The whole open plan: planned and in progress, everyone's; done and cancelled ones left out.
    const got = uids(res.text);
    expect(got).toEqual(await openInspectionUids());
    expect(got).toEqual(expect.arrayContaining([uidOf(insp.aPlanned), uidOf(insp.aStarted), uidOf(insp.bPlanned)]));
    expect(got).not.toContain(uidOf(insp.aDone));
    expect(got).not.toContain(uidOf(insp.aCancelled));
    const started = vevents(res.text).find((e) => e.UID === uidOf(insp.aStarted))!;
    expect(started["DTSTART;VALUE=DATE"]).toBe(isoDay(1).replace(/-/g, ""));
    expect(started.SUMMARY).toBe("CALF-P1: CALF vibration round\\, A");

    const exported = await planner.get("/api/inspections.ics");
    expect(exported.status).toBe(200);
    expect(uids(exported.text)).toEqual(got);

    const after = await planner.get("/api/calendar-feed");
    expect(after.body.link.prefix).toBe(created.link.prefix);
    expect(Date.parse(after.body.link.lastUsedAt)).toBeGreaterThanOrEqual(Date.parse(created.link.createdAt));
    expect(JSON.stringify(after.body)).not.toContain(created.token.slice(13)); // the status never carries the secret
  });

  it("stores the sha256 of the token, never the token; the audit trail has only the prefix", async () => {
    const manager = await signIn("manager");
    const { token } = await createLink(manager);
    const rows = await env.db("calendar_feeds").where({ user_id: await userId("manager") });
    expect(rows).toHaveLength(1);
    expect(rows[0].token_hash).toBe(crypto.createHash("sha256").update(token).digest("hex"));
    expect(rows[0].token_prefix).toBe(token.split("_")[1]);
    const secret = token.slice(13);
    expect(JSON.stringify(rows)).not.toContain(secret);
    const logged = await env.db("audit_log").where({ action: "calendar-feed.created", subject_id: String(await userId("manager")) });
    expect(logged).toHaveLength(1);
    expect(JSON.stringify(logged)).not.toContain(secret);
    expect(logged[0].details.tokenPrefix).toBe(`bhc_${token.split("_")[1]}_…`);
  });

  it("answers 404 for an unknown, a malformed and a guessed token, all alike", async () => {
    const made = crypto.randomBytes(32).toString("base64url");
    const answers = await Promise.all(
      [`/api/calendar/bhc_0123abcd_${made}.ics`, "/api/calendar/not-a-token.ics", `/api/calendar/bhg_0123abcd_${made}.ics`].map((p) => request(env.app).get(p)),
    );
    for (const a of answers) {
      expect(a.status).toBe(404);
      expect(a.body).toEqual({ error: "No such calendar.", code: "not-found" });
    }
  });
});

async function userId(who: keyof typeof users): Promise<number> {
  return (await env.db("users").where({ email: users[who].email }).first("id")).id;
}

describe("rotate and revoke", () => {
  it("rotating gives a new link and the old one is dead at once; one active link per user", async () => {
    const planner = await signIn("planner");
    const first = await createLink(planner);
    expect((await fetchFeed(first.url)).status).toBe(200);
    const second = await createLink(planner);
    expect(second.token).not.toBe(first.token);
    expect(second.link.lastUsedAt).toBeNull();

    const old = await fetchFeed(first.url);
    expect(old.status).toBe(404);
    expect(old.body).toEqual({ error: "No such calendar.", code: "not-found" }); // a revoked link looks like an unknown one
    expect((await fetchFeed(second.url)).status).toBe(200);

    const active = await env.db("calendar_feeds").where({ user_id: ids.planner }).whereNull("revoked_at");
    expect(active).toHaveLength(1);
    expect(active[0].token_prefix).toBe(second.token.split("_")[1]);
    const rotated = await env.db("audit_log").where({ action: "calendar-feed.rotated", subject_id: String(ids.planner) }).orderBy("id", "desc").first();
    expect(rotated.details).toEqual({ tokenPrefix: second.link.prefix, replaced: first.link.prefix });

    // Two clicks at the same moment still leave exactly one active link.
    const [x, y] = await Promise.all([planner.post("/api/calendar-feed").send({}), planner.post("/api/calendar-feed").send({})]);
    expect([x.status, y.status]).toEqual([201, 201]);
    expect(await env.db("calendar_feeds").where({ user_id: ids.planner }).whereNull("revoked_at").count({ n: "*" })).toEqual([{ n: "1" }]);
    const live = await Promise.all([fetchFeed(x.body.url), fetchFeed(y.body.url)]);
    expect(live.map((r) => r.status).sort()).toEqual([200, 404]);
  });

  it("revoking kills the link; status shows none; revoking again changes nothing", async () => {
    const planner = await signIn("planner");
    const link = await createLink(planner);
    const revoked = await planner.delete("/api/calendar-feed");
    expect(revoked.status).toBe(200);
    expect(revoked.body).toEqual({ scope: "plan", link: null });
    expect((await fetchFeed(link.url)).status).toBe(404);
    expect((await planner.get("/api/calendar-feed")).body.link).toBeNull();
    const row = await env.db("calendar_feeds").where({ token_hash: crypto.createHash("sha256").update(link.token).digest("hex") }).first();
    expect(row.revoked_at).not.toBeNull();

    const auditBefore = await env.db("audit_log").where({ action: "calendar-feed.revoked", subject_id: String(ids.planner) }).count({ n: "*" });
    const again = await planner.delete("/api/calendar-feed");
    expect(again.status).toBe(200);
    expect(again.body.link).toBeNull();
    expect(await env.db("audit_log").where({ action: "calendar-feed.revoked", subject_id: String(ids.planner) }).count({ n: "*" })).toEqual(auditBefore);
  });
});

describe("who may subscribe, checked at every fetch", () => {
  it("a technician's feed holds only the open inspections assigned to them", async () => {
    const techA = await signIn("techA");
    expect((await techA.get("/api/calendar-feed")).body).toEqual({ scope: "assigned", link: null });
    const a = await createLink(techA);
    expect(a.scope).toBe("assigned");
    const res = await fetchFeed(a.url);
    expect(res.status).toBe(200);
    expect(uids(res.text)).toEqual([uidOf(insp.aPlanned), uidOf(insp.aStarted)].sort());
    expect(contentLines(res.text)).toContain("NAME:Barhound: my inspections");

    const techB = await signIn("techB");
    const b = await createLink(techB);
    expect(uids((await fetchFeed(b.url)).text)).toEqual([uidOf(insp.bPlanned)]);

    // A change to the plan shows at the next fetch: reassigned to A, B's feed is empty.
    await env.db("inspections").where({ id: insp.bPlanned }).update({ assignee_id: ids.techA });
    try {
      expect(uids((await fetchFeed(a.url)).text)).toEqual([uidOf(insp.aPlanned), uidOf(insp.aStarted), uidOf(insp.bPlanned)].sort());
      expect(vevents((await fetchFeed(b.url)).text)).toEqual([]);
    } finally {
      await env.db("inspections").where({ id: insp.bPlanned }).update({ assignee_id: ids.techB });
    }
  });

  it("deactivating a user revokes their link (audited): it answers as a revoked link, also after reactivation", async () => {
    const admin = await signedIn(env.app, "admin");
    const techA = await signIn("techA");
    const link = await createLink(techA);
    expect((await fetchFeed(link.url)).status).toBe(200);
    const hash = crypto.createHash("sha256").update(link.token).digest("hex");

    const deactivated = await admin.patch(`/api/users/${ids.techA}`).send({ active: false });
    expect(deactivated.status).toBe(200);
    try {
      const refused = await fetchFeed(link.url);
      expect(refused.status).toBe(404);
      expect(refused.text).not.toContain("BEGIN:VCALENDAR");
      expect(refused.body).toEqual({ error: "No such calendar.", code: "not-found" }); // what a revoked link answers
      const row = await env.db("calendar_feeds").where({ token_hash: hash }).first();
      expect(row.revoked_at).not.toBeNull();
      expect(await env.db("calendar_feeds").where({ user_id: ids.techA }).whereNull("revoked_at")).toEqual([]);
      const trail = await env.db("audit_log").where({ subject_type: "user", subject_id: String(ids.techA) }).orderBy("id", "desc").limit(2);
      expect(trail.map((a) => a.action)).toEqual(["calendar-feed.revoked", "user.deactivated"]);
      expect(trail[0]).toMatchObject({ actor_label: demoUser("admin").email, details: { tokenPrefix: link.link.prefix, reason: "user deactivated" } });

      // Deactivating again finds no link: nothing more is revoked or audited.
      const revokedBefore = await env.db("audit_log").where({ action: "calendar-feed.revoked", subject_id: String(ids.techA) }).count({ n: "*" });
      expect((await admin.patch(`/api/users/${ids.techA}`).send({ active: false })).status).toBe(200);
      expect(await env.db("audit_log").where({ action: "calendar-feed.revoked", subject_id: String(ids.techA) }).count({ n: "*" })).toEqual(revokedBefore);
    } finally {
      expect((await admin.patch(`/api/users/${ids.techA}`).send({ active: true })).status).toBe(200);
    }
    // Reactivated, the old link stays dead; they make a new one.
    const after = await fetchFeed(link.url);
    expect(after.status).toBe(404);
    expect(after.body).toEqual({ error: "No such calendar.", code: "not-found" });
    const again = await signIn("techA");
    expect((await again.get("/api/calendar-feed")).body).toEqual({ scope: "assigned", link: null });
    const fresh = await createLink(again);
    expect(fresh.token).not.toBe(link.token);
    expect((await fetchFeed(fresh.url)).status).toBe(200);
  });

  it("a link made outside the API for a deactivated user is still refused (403) while they are inactive", async () => {
    const techB = await signIn("techB");
    const link = await createLink(techB);
    await env.db("users").where({ id: ids.techB }).update({ active: false }); // not through the API: nothing revoked
    try {
      const refused = await fetchFeed(link.url);
      expect(refused.status).toBe(403);
      expect(refused.text).not.toContain("BEGIN:VCALENDAR");
      expect(refused.body.error).toMatch(/can no longer be used/);
    } finally {
      await env.db("users").where({ id: ids.techB }).update({ active: true });
    }
    expect((await fetchFeed(link.url)).status).toBe(200);
  });

  it("the migration revokes links of users who were inactive before deactivation revoked them", async () => {
    const techB = await signIn("techB");
    const link = await createLink(techB);
    const other = await createLink(await signIn("techA")); // an active user's link is left alone
    await env.db("users").where({ id: ids.techB }).update({ active: false });
    try {
      await up(env.db);
    } finally {
      await env.db("users").where({ id: ids.techB }).update({ active: true });
    }
    expect((await fetchFeed(link.url)).status).toBe(404);
    expect((await fetchFeed(other.url)).status).toBe(200);
  });

  it("a link asked for while the user is being deactivated is not made (the issue waits for the deactivation)", async () => {
    const admin = await signedIn(env.app, "admin");
    const techB = await signIn("techB");
    await techB.delete("/api/calendar-feed");
    // An admin's deactivation in progress: its transaction holds the user row, as PATCH /users/:id does.
    const trx = await env.db.transaction();
    let issuing: Promise<request.Response> | undefined;
    try {
      await trx("users").where({ id: ids.techB }).update({ active: false });
      issuing = techB.post("/api/calendar-feed").send({}).then((r) => r); // the session still sees the user active
      await waitForLockWait(env.db, 'select "id", "active" from "users"%for update');
      await trx.commit();
      const res = await issuing;
      expect(res.status).toBe(401);
      expect(res.body.token).toBeUndefined();
      expect(await env.db("calendar_feeds").where({ user_id: ids.techB }).whereNull("revoked_at")).toEqual([]);
    } finally {
      if (!trx.isCompleted()) await trx.rollback();
      await issuing?.catch(() => undefined);
      expect((await admin.patch(`/api/users/${ids.techB}`).send({ active: true })).status).toBe(200);
    }
  });

  it("follows the owner's current role: refused without a plan-reading role, re-scoped on a change", async () => {
    const admin = await signedIn(env.app, "admin");
    const manager = await signIn("manager");
    const link = await createLink(manager);
    expect(uids((await fetchFeed(link.url)).text)).toEqual(await openInspectionUids());
    const managerId = await userId("manager");
    try {
      expect((await admin.patch(`/api/users/${managerId}`).send({ role: "analyst" })).status).toBe(200);
      const refused = await fetchFeed(link.url);
      expect(refused.status).toBe(403);
      expect(refused.text).not.toContain("BEGIN:VCALENDAR");

      // Made a technician: the same link now holds only what is assigned to them (nothing yet).
      expect((await admin.patch(`/api/users/${managerId}`).send({ role: "technician" })).status).toBe(200);
      const narrowed = await fetchFeed(link.url);
      expect(narrowed.status).toBe(200);
      expect(vevents(narrowed.text)).toEqual([]);
    } finally {
      await admin.patch(`/api/users/${managerId}`).send({ role: "manager" });
    }
    expect(uids((await fetchFeed(link.url)).text)).toEqual(await openInspectionUids());
  });

  it("an analyst may not make a link; the management routes need a session", async () => {
    const analyst = await signedIn(env.app, "analyst");
    for (const call of [analyst.get("/api/calendar-feed"), analyst.post("/api/calendar-feed").send({}), analyst.delete("/api/calendar-feed")]) {
      const res = await call;
      expect(res.status).toBe(403);
      expect(res.body.error).toBeTruthy();
    }
    for (const call of [request(env.app).get("/api/calendar-feed"), request(env.app).post("/api/calendar-feed").send({}), request(env.app).delete("/api/calendar-feed")])
      expect((await call).status).toBe(401);
  });

  it("registers the management routes with their permission and the feed as public", () => {
    const mine = routeRegistry.filter((r) => r.path.startsWith("/api/calendar")).map((r) => `${r.method} ${r.path} ${r.permission}`);
    expect(mine.sort()).toEqual(
      ["delete /api/calendar-feed calendar.subscribe", "get /api/calendar-feed calendar.subscribe", "get /api/calendar/:token.ics public", "post /api/calendar-feed calendar.subscribe"].sort(),
    );
  });
});

describe("rate limits", () => {
  let limited: TestEnv;
  beforeAll(async () => {
    limited = await makeTestEnv({ loginRateLimit: 1000, feedRateLimit: 3 });
  });
  afterAll(async () => limited.close());

  it("limits fetches per link, each link on its own budget", async () => {
    const planner = await signedIn(limited.app, "planner");
    const technician = await signedIn(limited.app, "technician");
    const busy = (await planner.post("/api/calendar-feed").send({})).body.url as string;
    const quiet = (await technician.post("/api/calendar-feed").send({})).body.url as string;
    for (let i = 0; i < 3; i++) expect((await request(limited.app).get(feedPath(busy))).status).toBe(200);
    const over = await request(limited.app).get(feedPath(busy));
    expect(over.status).toBe(429);
    expect(over.body.code).toBe("rate-limited");
    expect((await request(limited.app).get(feedPath(quiet))).status).toBe(200);
  });

  it("caps failed fetches per address at 20 times the per-link budget", async () => {
    const technician = await signedIn(limited.app, "technician");
    const good = (await technician.post("/api/calendar-feed").send({})).body.url as string;
    const statuses: number[] = [];
    for (let i = 0; i < 61; i++) statuses.push((await request(limited.app).get(`/api/calendar/bhc_0000000${i % 10}_${crypto.randomBytes(32).toString("base64url")}.ics`)).status);
    expect(statuses.slice(0, 60).every((s) => s === 404)).toBe(true);
    expect(statuses[60]).toBe(429);
    expect((await request(limited.app).get(feedPath(good))).status).toBe(429); // the address is held back for the window
  });
});
