import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import jwt from "jsonwebtoken";
import bcrypt from "bcryptjs";
import { makeTestEnv, signedIn, demoUser, waitForMail, type TestEnv } from "../helpers/context.ts";
import { DEMO_PASSWORD } from "../../server/seed/demo-users.ts";
import { BCRYPT_COST } from "../../server/auth.ts";

let env: TestEnv;
beforeAll(async () => {
  env = await makeTestEnv({ loginRateLimit: 5 });
});
afterAll(async () => env.close());

describe("sign-in", () => {
  it("signs in with the right password and sets a safe session cookie", async () => {
    const u = demoUser("analyst");
    const res = await request(env.app).post("/api/auth/login").send({ email: u.email.toUpperCase(), password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ email: u.email, role: "analyst" });
    expect(res.body.permissions).toContain("verdicts.write");
    const cookie = String(res.headers["set-cookie"]);
    expect(cookie).toMatch(/^bh_session=/);
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Lax/);
    expect(cookie).toMatch(/Max-Age=\d+/);
  });

  it("stores passwords as bcrypt hashes of cost ≥ 10", async () => {
    const row = await env.db("users").where({ email: demoUser("admin").email }).first();
    expect(row.password_hash).toMatch(/^\$2[aby]\$/);
    expect(bcrypt.getRounds(row.password_hash)).toBe(BCRYPT_COST);
    expect(BCRYPT_COST).toBeGreaterThanOrEqual(10);
  });

  it("refuses a wrong password with 401 and audits the failure", async () => {
    const u = demoUser("planner");
    const res = await request(env.app).post("/api/auth/login").send({ email: u.email, password: "not-the-password" });
    expect(res.status).toBe(401);
    expect(res.body.error).toMatch(/wrong e-mail or password/i);
    const a = await env.db("audit_log").where({ action: "sign-in.failed", actor_label: u.email }).first();
    expect(a).toBeTruthy();
  });

  it("answers 400 with field messages for a malformed body", async () => {
    const res = await request(env.app).post("/api/auth/login").send({ email: "nope", password: "" });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.fields)).toEqual(expect.arrayContaining(["email", "password"]));
  });

  it("/api/me returns the user and role with a session, 401 without", async () => {
    const agent = await signedIn(env.app, "manager");
    const me = await agent.get("/api/me");
    expect(me.status).toBe(200);
    expect(me.body.user.role).toBe("manager");
    expect((await request(env.app).get("/api/me")).status).toBe(401);
  });

  it("rejects an expired token and a token signed with another secret", async () => {
    const u = await env.db("users").where({ email: demoUser("technician").email }).first();
    const expired = jwt.sign({ sub: String(u.id), role: u.role, exp: Math.floor(Date.now() / 1000) - 10 }, env.config.jwtSecret);
    expect((await request(env.app).get("/api/me").set("Cookie", `bh_session=${expired}`)).status).toBe(401);
    const forged = jwt.sign({ sub: String(u.id), role: "admin" }, "another-secret");
    expect((await request(env.app).get("/api/me").set("Cookie", `bh_session=${forged}`)).status).toBe(401);
  });

  it("sign-out clears the cookie", async () => {
    const agent = await signedIn(env.app, "technician");
    const res = await agent.post("/api/auth/logout");
    expect(res.status).toBe(204);
    expect(String(res.headers["set-cookie"])).toMatch(/bh_session=;/);
    expect((await agent.get("/api/me")).status).toBe(401);
  });

  it("sends security headers", async () => {
    const res = await request(env.app).get("/api/health");
    expect(res.status).toBe(200);
    expect(res.headers["content-security-policy"]).toBeTruthy();
    expect(res.headers["x-content-type-options"]).toBe("nosniff");
  });
});

describe("invite and password reset", () => {
  it("an admin invites a user; the link from the mail sets the password once", async () => {
    const admin = await signedIn(env.app, "admin");
    const email = `new.tech.${Date.now()}@northwend.example`;
    const inv = await admin.post("/api/users/invite").send({ email, name: "Noor Halvik", role: "technician" });
    expect(inv.status).toBe(201);
    expect(inv.body.invited).toBe(true);
    const mail = await waitForMail(env.db, email, "%invited%");
    const token = /set-password\?token=([\w-]+)/.exec(mail.text_body)![1];
    const info = await request(env.app).get(`/api/auth/token/${token}`);
    expect(info.body).toMatchObject({ kind: "invite", email });
    expect((await request(env.app).post("/api/auth/set-password").send({ token, password: "short" })).status).toBe(400);
    expect((await request(env.app).post("/api/auth/set-password").send({ token, password: "a-long-enough-pass" })).status).toBe(200);
    const login = await request(env.app).post("/api/auth/login").send({ email, password: "a-long-enough-pass" });
    expect(login.status).toBe(200);
    const again = await request(env.app).post("/api/auth/set-password").send({ token, password: "another-long-pass" });
    expect(again.status).toBe(400);
    expect(again.body.error).toMatch(/already been used/);
    expect(await env.db("audit_log").where({ action: "user.invited", subject_id: String(inv.body.id) }).first()).toBeTruthy();
  });

  it("a reset link works once and expires", async () => {
    const email = `reset.${Date.now()}@northwend.example`;
    const admin = await signedIn(env.app, "admin");
    const inv = await admin.post("/api/users/invite").send({ email, name: "Ravi Osterloh", role: "analyst" });
    expect(inv.status).toBe(201);
    expect((await request(env.app).post("/api/auth/forgot").send({ email })).status).toBe(202);
    expect((await request(env.app).post("/api/auth/forgot").send({ email: "nobody@northwend.example" })).status).toBe(202);
    const mail = await waitForMail(env.db, email, "%reset%");
    const token = /set-password\?token=([\w-]+)/.exec(mail.text_body)![1];
    await env.db("user_tokens").where({ kind: "reset" }).update({ expires_at: new Date(Date.now() - 1000) });
    const late = await request(env.app).post("/api/auth/set-password").send({ token, password: "a-long-enough-pass" });
    expect(late.status).toBe(400);
    expect(late.body.error).toMatch(/expired/);
  });

  it("role change and deactivation are audited; a deactivated user cannot sign in", async () => {
    const admin = await signedIn(env.app, "admin");
    const email = `role.${Date.now()}@northwend.example`;
    const inv = await admin.post("/api/users/invite").send({ email, name: "Lena Brask", role: "technician" });
    const patch = await admin.patch(`/api/users/${inv.body.id}`).send({ role: "planner" });
    expect(patch.body.role).toBe("planner");
    expect(await env.db("audit_log").where({ action: "user.role-changed", subject_id: String(inv.body.id) }).first()).toMatchObject({
      details: { from: "technician", to: "planner" },
    });
    await env.db("users").where({ id: inv.body.id }).update({ password_hash: await bcrypt.hash("a-long-enough-pass", 10) });
    expect((await admin.patch(`/api/users/${inv.body.id}`).send({ active: false })).status).toBe(200);
    expect((await request(env.app).post("/api/auth/login").send({ email, password: "a-long-enough-pass" })).status).toBe(401);
  });
});

describe("rate limit", () => {
  it("limits repeated failed sign-ins", async () => {
    const fresh = await makeTestEnv({ loginRateLimit: 3 });
    try {
      const statuses: number[] = [];
      for (let i = 0; i < 5; i++) statuses.push((await request(fresh.app).post("/api/auth/login").send({ email: "x@northwend.example", password: "wrong" })).status);
      expect(statuses.slice(0, 3)).toEqual([401, 401, 401]);
      expect(statuses[4]).toBe(429);
    } finally {
      await fresh.close();
    }
  });
});
