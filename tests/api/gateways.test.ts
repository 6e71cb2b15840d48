import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { makeTestEnv, signedIn, type TestEnv } from "../helpers/context.ts";
import { insertMotor } from "../helpers/realtime.ts";
import { sha256 } from "../../server/tokens.ts";
import type { Role } from "../../server/permissions.ts";

let env: TestEnv;
let siteId: number;
beforeAll(async () => {
  env = await makeTestEnv();
  ({ siteId } = await insertMotor(env.db, "gw"));
});
afterAll(async () => env.close());

describe("gateway admin routes", () => {
  it("creates a gateway and shows its token once; only the hash is stored", async () => {
    const admin = await signedIn(env.app, "admin");
    const res = await admin.post("/api/gateways").send({ name: "Pump house gateway", siteId });
    expect(res.status).toBe(201);
    expect(res.body.token).toMatch(/^bhg_[0-9a-f]{8}_[A-Za-z0-9_-]{32,}$/);
    expect(res.body).toMatchObject({ name: "Pump house gateway", siteId, revokedAt: null });
    const row = await env.db("gateways").where({ id: res.body.id }).first();
    expect(row.token_hash).toBe(sha256(res.body.token));
    expect(JSON.stringify(row)).not.toContain(res.body.token.split("_").slice(2).join("_"));
    expect(res.body.tokenPrefix).toBe(`bhg_${row.token_prefix}_…`);

    const list = await admin.get("/api/gateways");
    expect(list.status).toBe(200);
    const item = list.body.items.find((g: { id: number }) => g.id === res.body.id);
    expect(item).toMatchObject({ name: "Pump house gateway", siteName: expect.any(String), tokenPrefix: res.body.tokenPrefix });
    expect(item.token).toBeUndefined();
    expect(JSON.stringify(list.body)).not.toContain(row.token_hash);
    expect(list.body).toMatchObject({ total: expect.any(Number), page: 1, pageSize: 50 });
    expect(await env.db("audit_log").where({ action: "gateway.created", subject_id: String(res.body.id) }).first()).toBeTruthy();
  });

  it("revokes a gateway (idempotently) and audits it", async () => {
    const admin = await signedIn(env.app, "admin");
    const { body } = await admin.post("/api/gateways").send({ name: "Spare gateway", siteId });
    const rev = await admin.post(`/api/gateways/${body.id}/revoke`);
    expect(rev.status).toBe(200);
    expect(rev.body.revokedAt).toBeTruthy();
    const again = await admin.post(`/api/gateways/${body.id}/revoke`);
    expect(again.body.revokedAt).toBe(rev.body.revokedAt);
    expect(await env.db("audit_log").where({ action: "gateway.revoked", subject_id: String(body.id) }).count("* as n").first()).toMatchObject({ n: "1" });
    const revokedOnly = await admin.get("/api/gateways?revoked=1");
    expect(revokedOnly.body.items.map((g: { id: number }) => g.id)).toContain(body.id);
    expect(revokedOnly.body.items.every((g: { revokedAt: unknown }) => g.revokedAt)).toBe(true);
  });

  it("answers 400 with field messages and 404 for an unknown gateway", async () => {
    const admin = await signedIn(env.app, "admin");
    const bad = await admin.post("/api/gateways").send({ name: "" });
    expect(bad.status).toBe(400);
    expect(bad.body.code).toBe("bad-request");
    expect(Object.keys(bad.body.fields)).toEqual(expect.arrayContaining(["name", "siteId"]));
    const noSite = await admin.post("/api/gateways").send({ name: "Ghost", siteId: 999999 });
    expect(noSite.status).toBe(400);
    expect(noSite.body.fields.siteId).toMatch(/no site/);
    const unknown = await admin.post("/api/gateways/999999/revoke");
    expect(unknown.status).toBe(404);
    expect(unknown.body).toMatchObject({ code: "not-found", error: "No such gateway." });
    expect((await admin.get("/api/gateways?sort=token_hash")).status).toBe(400);
  });

  it("is admin-only: 403 for every other role, 401 without a session", async () => {
    const admin = await signedIn(env.app, "admin");
    const { body } = await admin.post("/api/gateways").send({ name: "Role test gateway", siteId });
    for (const role of ["technician", "analyst", "planner", "manager"] as Role[]) {
      const agent = await signedIn(env.app, role);
      expect((await agent.get("/api/gateways")).status, role).toBe(403);
      expect((await agent.post("/api/gateways").send({ name: "x", siteId })).status, role).toBe(403);
      expect((await agent.post(`/api/gateways/${body.id}/revoke`)).status, role).toBe(403);
    }
    expect((await request(env.app).get("/api/gateways")).status).toBe(401);
    expect((await request(env.app).post("/api/gateways").send({ name: "x", siteId })).status).toBe(401);
    expect((await request(env.app).post(`/api/gateways/${body.id}/revoke`)).status).toBe(401);
    expect((await env.db("gateways").where({ id: body.id }).first()).revoked_at).toBeNull();
  });
});
