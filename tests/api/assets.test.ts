import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { makeTestEnv, signedIn, type TestEnv } from "../helpers/context.ts";
import { routeRegistry } from "../../server/http.ts";
import { ROLES, can } from "../../server/permissions.ts";

// Sites, areas, motors, measurement points and the register import.
let env: TestEnv;
const sfx = Date.now().toString(36);
let siteId: number;
let areaId: number;

beforeAll(async () => {
  env = await makeTestEnv();
});
afterAll(async () => env?.close());

const motor = (over: Record<string, unknown> = {}) => ({
  tag: `P-${sfx}-1`,
  name: "Cooling water pump 1",
  areaId,
  drivenEquipment: "pump",
  criticality: "high",
  ratedKw: 55,
  ratedVoltage: 400,
  ratedCurrent: 98,
  ratedHz: 50,
  ratedRpm: 1480,
  poles: 4,
  rotorBars: 28,
  ...over,
});

describe("sites and areas", () => {
  it("an admin creates a site and an area; everyone can list them; others get 403", async () => {
    const admin = await signedIn(env.app, "admin");
    const site = await admin.post("/api/sites").send({ code: `S${sfx}`, name: "North works", timezone: "Europe/Berlin" });
    expect(site.status).toBe(201);
    siteId = site.body.id;
    const area = await admin.post(`/api/sites/${siteId}/areas`).send({ name: "Boiler house" });
    expect(area.status).toBe(201);
    areaId = area.body.id;
    expect((await admin.post("/api/sites").send({ code: `S${sfx}`, name: "Again" })).status).toBe(409);
    expect((await admin.post("/api/sites").send({ code: "x y", name: "", timezone: "Mars/Base" })).body.fields).toMatchObject({
      code: expect.any(String),
      name: expect.any(String),
      timezone: expect.any(String),
    });
    expect((await admin.patch(`/api/areas/${areaId}`).send({ name: "Boiler hall" })).body.name).toBe("Boiler hall");
    const tech = await signedIn(env.app, "technician");
    const list = await tech.get("/api/sites");
    expect(list.body.items.find((s: { id: number }) => s.id === siteId)).toMatchObject({ code: `S${sfx}`, areas: [{ id: areaId, name: "Boiler hall" }] });
    expect((await tech.post("/api/sites").send({ code: "Z1", name: "Nope" })).status).toBe(403);
    expect((await (await signedIn(env.app, "planner")).patch(`/api/sites/${siteId}`).send({ name: "x" })).status).toBe(403);
    expect((await (await signedIn(env.app, "manager")).post(`/api/sites/${siteId}/areas`).send({ name: "x" })).status).toBe(403);
  });
});

describe("assets", () => {
  let id: number;
  it("creates, reads, updates (nameplate version) and deletes a motor; validation answers with fields", async () => {
    const admin = await signedIn(env.app, "admin");
    const res = await admin.post("/api/assets").send(motor());
    expect(res.status).toBe(201);
    id = res.body.id;
    expect(res.body).toMatchObject({ tag: `P-${sfx}-1`, siteId, areaId, siteName: "North works", nameplateVersion: 1, latest: null, openFindings: 0 });
    expect((await admin.post("/api/assets").send(motor())).status).toBe(409);
    const bad = await admin.post("/api/assets").send(motor({ tag: `P-${sfx}-x`, poles: 3, ratedRpm: 0, criticality: "urgent" }));
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.fields)).toEqual(expect.arrayContaining(["poles", "ratedRpm", "criticality"]));
    const fast = await admin.post("/api/assets").send(motor({ tag: `P-${sfx}-y`, ratedRpm: 1510 }));
    expect(fast.body.fields.ratedRpm).toMatch(/synchronous 1500 rpm/);
    expect((await admin.post("/api/assets").send(motor({ tag: `P-${sfx}-z`, areaId: 99999999 }))).body.fields.areaId).toBeTruthy();

    expect((await admin.patch(`/api/assets/${id}`).send({ name: "CW pump 1" })).body.nameplateVersion).toBe(1);
    const np = await admin.patch(`/api/assets/${id}`).send({ rotorBars: 32, statorSlots: 36 });
    expect(np.body).toMatchObject({ rotorBars: 32, statorSlots: 36, nameplateVersion: 2 });
    expect((await admin.patch(`/api/assets/${id}`).send({ rotorBars: 32 })).body.nameplateVersion).toBe(2);
    expect((await admin.patch(`/api/assets/${id}`).send({ bogus: 1 })).status).toBe(400);

    const point = await admin.post(`/api/assets/${id}/points`).send({ name: "Phase A", kind: "current", position: "A", ctRatio: 100 });
    expect(point.status).toBe(201);
    expect(point.body).toMatchObject({ name: "Phase A", unit: "A", ctRatio: 100 });
    expect((await admin.patch(`/api/points/${point.body.id}`).send({ ctRatio: 200 })).body.ctRatio).toBe(200);
    const detail = (await (await signedIn(env.app, "technician")).get(`/api/assets/${id}`)).body;
    expect(detail.measurementPoints).toEqual([expect.objectContaining({ id: point.body.id, kind: "current", ctRatio: 200 })]);
    expect((await admin.delete(`/api/points/${point.body.id}`)).status).toBe(204);

    const model = await admin.get(`/api/assets/${id}/motor-model`);
    expect(model.status).toBe(200);
    expect(model.body).toMatchObject({ input: expect.any(Object), curves: expect.anything(), keyPoints: expect.any(Object), operatingPoints: [] });
    // Estimated from the nameplate (design B assumed): a deep-bar rotor that starts at the typical 1.5 × torque and
    // 6.5 × current (inside the NEMA design table's 70–275 % and 600–700 %), not a single cage's fraction of them.
    const fullLoadTorque = 55000 / ((2 * Math.PI * 1480) / 60);
    expect(model.body.keyPoints.start.torqueNm / fullLoadTorque).toBeCloseTo(1.5, 2);
    expect(model.body.keyPoints.start.currentA / 98).toBeCloseTo(6.5, 2);
    expect(model.body.sources.rotorLockedR2).toBe("nameplate-estimate");
  });

  it("lists with server-side filters, sort and paging; unknown sort column is a 400", async () => {
    const admin = await signedIn(env.app, "admin");
    for (let i = 2; i <= 5; i++)
      expect((await admin.post("/api/assets").send(motor({ tag: `P-${sfx}-${i}`, name: `Fan ${i}`, drivenEquipment: i % 2 ? "fan" : "pump", ratedKw: 10 * i }))).status).toBe(201);
    const tech = await signedIn(env.app, "technician");
    const all = (await tech.get(`/api/assets?siteId=${siteId}&sort=-ratedKw&pageSize=2&page=1`)).body;
    expect(all.total).toBe(5);
    expect(all.items.map((a: { ratedKw: number }) => a.ratedKw)).toEqual([55, 50]);
    const page3 = (await tech.get(`/api/assets?siteId=${siteId}&sort=-ratedKw&pageSize=2&page=3`)).body;
    expect(page3.items).toHaveLength(1);
    const fans = (await tech.get(`/api/assets?siteId=${siteId}&drivenEquipment=fan`)).body;
    expect(fans.items.map((a: { tag: string }) => a.tag).sort()).toEqual([`P-${sfx}-3`, `P-${sfx}-5`]);
    expect((await tech.get(`/api/assets?siteId=${siteId}&q=fan 4`)).body.total).toBe(1);
    expect((await tech.get(`/api/assets?siteId=${siteId}&grade=none`)).body.total).toBe(5);
    expect((await tech.get(`/api/assets?siteId=${siteId}&grade=R3`)).body.total).toBe(0);
    expect((await tech.get(`/api/assets?grade=R9`)).status).toBe(400);
    const badSort = await tech.get(`/api/assets?sort=password_hash`);
    expect(badSort.status).toBe(400);
    expect(badSort.body.fields.sort).toMatch(/tag/);
  });

  it("only admins write motors and points; deleting a motor", async () => {
    for (const role of ["technician", "analyst", "planner", "manager"] as const) {
      const agent = await signedIn(env.app, role);
      expect((await agent.post("/api/assets").send(motor({ tag: `P-${sfx}-r` }))).status).toBe(403);
      expect((await agent.patch(`/api/assets/${id}`).send({ name: "x" })).status).toBe(403);
      expect((await agent.delete(`/api/assets/${id}`)).status).toBe(403);
      expect((await agent.post(`/api/assets/${id}/points`).send({ name: "x", kind: "current" })).status).toBe(403);
      expect((await agent.post(`/api/assets/import`).attach("file", Buffer.from("tag\n"), "r.csv")).status).toBe(403);
    }
    const admin = await signedIn(env.app, "admin");
    expect((await admin.delete(`/api/assets/${id}`)).status).toBe(204);
    expect((await admin.get(`/api/assets/${id}`)).status).toBe(404);
    expect((await request(env.app).get(`/api/assets`)).status).toBe(401);
  });
});

describe("asset register import", () => {
  it("creates and updates by tag, reports bad rows by line, writes nothing for them", async () => {
    const admin = await signedIn(env.app, "admin");
    const csv = [
      "Tag,Name,Site,Area,Driven equipment,Criticality,Rated kW,Rated voltage,Rated current,Rated Hz,Rated rpm,Poles,Rotor bars,Drive fed",
      `I-${sfx}-1,Feed pump,S${sfx},Boiler hall,pump,high,30,400,55,50,1475,4,28,no`,
      `I-${sfx}-2,"Exhaust fan, east",S${sfx},Roof,fan,medium,15,400,28,50,975,6,,yes`,
      `I-${sfx}-3,Bad poles,S${sfx},Roof,fan,low,15,400,28,50,975,5,,no`,
      `I-${sfx}-4,Unknown site,NOPE${sfx},Roof,fan,low,15,400,28,50,975,6,,no`,
      `I-${sfx}-5,Too fast,S${sfx},Annex,pump,low,15,400,28,50,1600,4,,no`,
      `I-${sfx}-1,Duplicate,S${sfx},Boiler hall,pump,high,30,400,55,50,1475,4,28,no`,
      `I-${sfx}-6,Bad number,S${sfx},Roof,fan,low,fifteen,400,28,50,975,6,,no`,
    ].join("\r\n");
    const res = await admin.post("/api/assets/import").attach("file", Buffer.from(csv), "register.csv");
    expect(res.status).toBe(200);
    expect(res.body.created).toBe(2);
    expect(res.body.updated).toBe(0);
    expect(res.body.errors.map((e: { line: number }) => e.line)).toEqual([4, 5, 6, 7, 8]);
    expect(res.body.errors[0].message).toMatch(/poles/i);
    expect(res.body.errors[1].message).toMatch(/site/i);
    expect(res.body.errors[2].message).toMatch(/synchronous/);
    expect(res.body.errors[3].message).toMatch(/line 2/);
    expect(res.body.errors[4].message).toMatch(/ratedKw/);
    const rows = await env.db("assets").whereLike("tag", `I-${sfx}-%`).orderBy("tag");
    expect(rows.map((r) => r.tag)).toEqual([`I-${sfx}-1`, `I-${sfx}-2`]);
    expect(rows[1]).toMatchObject({ name: "Exhaust fan, east", drive_fed: true, poles: 6 });
    // No area "Annex" from the refused row.
    expect(await env.db("areas").where({ site_id: siteId, name: "Annex" }).first()).toBeUndefined();

    const again = await admin
      .post("/api/assets/import")
      .attach("file", Buffer.from(`tag;site;area;rated rpm;poles\nI-${sfx}-1;S${sfx};Boiler hall;1470;4\n`), "update.csv");
    expect(again.body).toEqual({ created: 0, updated: 1, errors: [] });
    const updated = await env.db("assets").where({ tag: `I-${sfx}-1` }).first();
    expect(updated).toMatchObject({ rated_rpm: 1470, nameplate_version: 2, name: "Feed pump" });

    const noTag = await admin.post("/api/assets/import").attach("file", Buffer.from("name,site\nx,y\n"), "r.csv");
    expect(noTag.body.errors[0]).toMatchObject({ line: 1, message: expect.stringMatching(/tag/) });
  });
});

describe("permission matrix", () => {
  it("every fleet and capture route declares a permission and refuses the roles without it", async () => {
    const mine = routeRegistry.filter((r) => /^\/api\/(sites|areas|assets|points|captures|findings|review)/.test(r.path));
    expect(mine.length).toBeGreaterThanOrEqual(25);
    const agents = Object.fromEntries(await Promise.all(ROLES.map(async (r) => [r, await signedIn(env.app, r)] as const)));
    for (const route of mine) {
      expect(route.permission).not.toBe("public");
      for (const role of ROLES) {
        if (can(role, route.permission as never)) continue;
        const agent = agents[role];
        const path = route.path.replace(/:id/g, "1");
        const res = await agent[route.method](path).send({});
        expect(res.status, `${role} ${route.method} ${path}`).toBe(403);
      }
    }
  }, 60_000);
});
