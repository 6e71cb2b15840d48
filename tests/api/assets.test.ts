import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { demoUser, makeTestEnv, signedIn, waitForLockWait, type TestEnv } from "../helpers/context.ts";
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

describe("editing and deleting sites and areas", () => {
  /** A site with the named areas; returns the site id and each area's id by name. */
  const newSite = async (admin: request.Agent, code: string, areaNames: string[], timezone = "Europe/Berlin") => {
    const site = await admin.post("/api/sites").send({ code: `${code}${sfx}`, name: `Works ${code}`, timezone });
    expect(site.status).toBe(201);
    const areas: Record<string, number> = {};
    for (const name of areaNames) {
      const a = await admin.post(`/api/sites/${site.body.id}/areas`).send({ name });
      expect(a.status).toBe(201);
      areas[name] = a.body.id;
    }
    return { id: site.body.id as number, code: `${code}${sfx}`, areas };
  };
  const auditOf = async (admin: request.Agent, subjectType: string, id: number) =>
    (await admin.get(`/api/audit?subjectType=${subjectType}&subjectId=${id}`)).body.items as { action: string; actor: string; details: Record<string, unknown> }[];

  it("an edit changes only the fields sent: renaming a site keeps its time zone", async () => {
    const admin = await signedIn(env.app, "admin");
    const s = await newSite(admin, "E", ["Pump house"], "America/Chicago");
    const res = await admin.patch(`/api/sites/${s.id}`).send({ name: "East works" });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ code: s.code, name: "East works", timezone: "America/Chicago" });
    expect(await env.db("sites").where({ id: s.id }).first()).toMatchObject({ name: "East works", timezone: "America/Chicago" });
    expect((await auditOf(admin, "site", s.id))[0]).toMatchObject({ action: "site.updated", details: { name: "East works" } });
    const bad = await admin.patch(`/api/sites/${s.id}`).send({ timezone: "Mars/Base" });
    expect(bad.status).toBe(400);
    expect(bad.body.fields.timezone).toMatch(/time zone/);
    expect((await env.db("sites").where({ id: s.id }).first()).timezone).toBe("America/Chicago");
  });

  it("refuses fields it does not know on site and area create and edit (400 naming the field), changing nothing", async () => {
    const admin = await signedIn(env.app, "admin");
    const s = await newSite(admin, "U", ["Pump house"], "America/Chicago");
    const unknown = (res: request.Response, field: string) => {
      expect(res.status).toBe(400);
      expect(res.body).toEqual({ error: "Invalid request", code: "bad-request", fields: { [field]: `Unknown field "${field}".` } });
    };
    unknown(await admin.patch(`/api/sites/${s.id}`).send({ name: "Renamed", timeZone: "Europe/Oslo" }), "timeZone");
    expect(await env.db("sites").where({ id: s.id }).first()).toMatchObject({ name: "Works U", timezone: "America/Chicago" });
    unknown(await admin.post("/api/sites").send({ code: `U2${sfx}`, name: "Works U2", colour: "red" }), "colour");
    expect(await env.db("sites").where({ code: `U2${sfx}` }).first()).toBeUndefined();
    unknown(await admin.post(`/api/sites/${s.id}/areas`).send({ name: "Annex", siteId: 1 }), "siteId");
    unknown(await admin.patch(`/api/areas/${s.areas["Pump house"]}`).send({ name: "Pump hall", site_id: 1 }), "site_id");
    expect((await env.db("areas").where({ site_id: s.id })).map((a) => a.name)).toEqual(["Pump house"]);
    // Known and unknown problems together: each on its field.
    const both = await admin.patch(`/api/sites/${s.id}`).send({ timezone: "Mars/Base", nmae: "x" });
    expect(both.body.fields).toEqual({ timezone: expect.stringMatching(/time zone/), nmae: 'Unknown field "nmae".' });
    expect((await auditOf(admin, "site", s.id)).map((a) => a.action)).toEqual(["site.created"]);
  });

  it("a motor or an area added while its site is being deleted gets a 409 naming what is gone, not a 500", async () => {
    const admin = await signedIn(env.app, "admin");
    for (const what of ["area", "motor"] as const) {
      const s = await newSite(admin, what === "area" ? "RA" : "RM", ["Pump house"]);
      // The site's deletion in progress: its transaction holds the site and area rows, as DELETE /api/sites/:id does.
      const trx = await env.db.transaction();
      let adding: Promise<request.Response> | undefined;
      try {
        await trx("sites").where({ id: s.id }).delete(); // its areas go with it (ON DELETE CASCADE)
        adding = (
          what === "area"
            ? admin.post(`/api/sites/${s.id}/areas`).send({ name: "Annex" })
            : admin.post("/api/assets").send(motor({ tag: `R-${sfx}-1`, areaId: s.areas["Pump house"] }))
        ).then((r) => r); // its checks still see the site: the insert's foreign-key check waits for the lock
        await waitForLockWait(env.db, what === "area" ? 'insert into "areas"%' : 'insert into "assets"%');
        await trx.commit();
        const res = await adding;
        expect(res.status).toBe(409);
        expect(res.body).toEqual({
          error: `The ${what === "area" ? "site" : "area (or its site)"} no longer exists (it may have been deleted while this change waited). Nothing was saved.`,
          code: "conflict",
        });
      } finally {
        if (!trx.isCompleted()) await trx.rollback();
        await adding?.catch(() => undefined);
      }
      expect(await env.db("areas").where({ site_id: s.id })).toEqual([]);
      expect(await env.db("assets").where({ tag: `R-${sfx}-1` }).first()).toBeUndefined();
      expect(await env.db("audit_log").where({ action: "area.created" }).whereRaw("details->>'siteId' = ? and details->>'name' = 'Annex'", [String(s.id)])).toEqual([]);
      expect(await env.db("audit_log").where({ action: "asset.created" }).whereRaw("details->>'tag' = ?", [`R-${sfx}-1`])).toEqual([]);
    }
  });

  it("deletes an empty area and audits it; an unknown area is a 404", async () => {
    const admin = await signedIn(env.app, "admin");
    const s = await newSite(admin, "A", ["Pump house", "Annex"]);
    const res = await admin.delete(`/api/areas/${s.areas.Annex}`);
    expect(res.status).toBe(204);
    expect(await env.db("areas").where({ id: s.areas.Annex }).first()).toBeUndefined();
    const listed = (await admin.get("/api/sites")).body.items.find((x: { id: number }) => x.id === s.id);
    expect(listed.areas).toEqual([{ id: s.areas["Pump house"], name: "Pump house" }]);
    const trail = await auditOf(admin, "area", s.areas.Annex);
    expect(trail.map((a) => a.action)).toEqual(["area.deleted", "area.created"]);
    expect(trail[0]).toMatchObject({ actor: demoUser("admin").email, details: { siteId: s.id, name: "Annex" } });
    const again = await admin.delete(`/api/areas/${s.areas.Annex}`);
    expect(again.status).toBe(404);
    expect(again.body.error).toBe("No such area.");
    expect((await admin.delete("/api/areas/99999999")).status).toBe(404);
  });

  it("refuses an area that holds motors (409, says how many and what to do, nothing removed); after a move it goes", async () => {
    const admin = await signedIn(env.app, "admin");
    const s = await newSite(admin, "M", ["Intake", "Outfall"]);
    const ids: number[] = [];
    for (const n of [1, 2]) {
      const m = await admin.post("/api/assets").send(motor({ tag: `M-${sfx}-${n}`, areaId: s.areas.Intake }));
      expect(m.status).toBe(201);
      ids.push(m.body.id);
    }
    const refused = await admin.delete(`/api/areas/${s.areas.Intake}`);
    expect(refused.status).toBe(409);
    expect(refused.body.error).toMatch(/^Area Intake \(Works M\) was not deleted\. It still holds 2 motors: move them to another area or delete them first\.$/);
    expect(await env.db("areas").where({ id: s.areas.Intake }).first()).toMatchObject({ name: "Intake", site_id: s.id });
    expect((await env.db("assets").whereIn("id", ids).select("area_id")).map((r) => r.area_id)).toEqual([s.areas.Intake, s.areas.Intake]);
    expect(await auditOf(admin, "area", s.areas.Intake)).toEqual([expect.objectContaining({ action: "area.created" })]);

    // The advice can be followed: move one motor, delete the other, then the area goes.
    const moved = await admin.patch(`/api/assets/${ids[0]}`).send({ areaId: s.areas.Outfall });
    expect(moved.status).toBe(200);
    expect(moved.body).toMatchObject({ areaId: s.areas.Outfall, areaName: "Outfall", siteId: s.id });
    const one = await admin.delete(`/api/areas/${s.areas.Intake}`);
    expect(one.body.error).toBe(`Area Intake (Works M) was not deleted. It still holds 1 motor: move it to another area or delete it first.`);
    expect((await admin.delete(`/api/assets/${ids[1]}`)).status).toBe(204);
    expect((await admin.delete(`/api/areas/${s.areas.Intake}`)).status).toBe(204);
    expect((await admin.get(`/api/assets/${ids[0]}`)).body.areaName).toBe("Outfall");
  });

  it("deletes a site with only empty areas, its areas with it, and audits it; a revoked gateway stays without a site", async () => {
    const admin = await signedIn(env.app, "admin");
    const s = await newSite(admin, "D", ["Boiler house", "Roof"]);
    const gw = await admin.post("/api/gateways").send({ name: `Old panel ${sfx}`, siteId: s.id });
    expect(gw.status).toBe(201);
    expect((await admin.post(`/api/gateways/${gw.body.id}/revoke`).send({})).status).toBeLessThan(300);
    const res = await admin.delete(`/api/sites/${s.id}`);
    expect(res.status).toBe(204);
    expect(await env.db("sites").where({ id: s.id }).first()).toBeUndefined();
    expect(await env.db("areas").where({ site_id: s.id })).toEqual([]);
    expect(await env.db("areas").whereIn("id", Object.values(s.areas))).toEqual([]);
    expect(await env.db("gateways").where({ id: gw.body.id }).first()).toMatchObject({ site_id: null, revoked_at: expect.any(Date) });
    expect((await admin.get("/api/sites")).body.items.some((x: { id: number }) => x.id === s.id)).toBe(false);
    const trail = await auditOf(admin, "site", s.id);
    expect(trail[0]).toMatchObject({
      action: "site.deleted",
      actor: demoUser("admin").email,
      details: {
        code: s.code,
        name: "Works D",
        timezone: "Europe/Berlin",
        areas: [{ id: s.areas["Boiler house"], name: "Boiler house" }, { id: s.areas.Roof, name: "Roof" }],
        revokedGateways: [gw.body.id],
      },
    });
    const again = await admin.delete(`/api/sites/${s.id}`);
    expect(again.status).toBe(404);
    expect(again.body.error).toBe("No such site.");
    expect((await admin.delete("/api/sites/99999999")).status).toBe(404);
  });

  it("refuses a site that holds motors or has an active gateway (409 with counts and what to do, nothing removed)", async () => {
    const admin = await signedIn(env.app, "admin");
    const s = await newSite(admin, "H", ["Clarifier", "Dosing", "Empty yard"]);
    const other = await newSite(admin, "O", ["Store"]);
    const tags = [
      [`H-${sfx}-1`, s.areas.Clarifier],
      [`H-${sfx}-2`, s.areas.Clarifier],
      [`H-${sfx}-3`, s.areas.Dosing],
    ] as const;
    const ids: number[] = [];
    for (const [tag, area] of tags) ids.push((await admin.post("/api/assets").send(motor({ tag, areaId: area }))).body.id);
    const gw = await admin.post("/api/gateways").send({ name: `Clarifier panel ${sfx}`, siteId: s.id });
    expect(gw.status).toBe(201);

    const refused = await admin.delete(`/api/sites/${s.id}`);
    expect(refused.status).toBe(409);
    expect(refused.body.error).toBe(
      `Site ${s.code} · Works H was not deleted. It still holds 3 motors (Clarifier: 2, Dosing: 1): move them to an area of another site or delete them first. ` +
        `It has an active gateway (Clarifier panel ${sfx}): revoke it under Admin → Gateways first.`,
    );
    expect(await env.db("sites").where({ id: s.id }).first()).toMatchObject({ code: s.code });
    expect((await env.db("areas").where({ site_id: s.id }).orderBy("name")).map((a) => a.name)).toEqual(["Clarifier", "Dosing", "Empty yard"]);
    expect(await env.db("assets").whereIn("id", ids).count<{ count: string }[]>({ count: "*" })).toEqual([{ count: "3" }]);
    expect(await env.db("gateways").where({ id: gw.body.id }).first()).toMatchObject({ site_id: s.id, revoked_at: null });
    expect((await auditOf(admin, "site", s.id)).map((a) => a.action)).toEqual(["site.created"]);

    // Motors moved to another site: only the gateway stands in the way; revoked, the site goes.
    for (const id of ids) expect((await admin.patch(`/api/assets/${id}`).send({ areaId: other.areas.Store })).body.siteId).toBe(other.id);
    const gatewayOnly = await admin.delete(`/api/sites/${s.id}`);
    expect(gatewayOnly.status).toBe(409);
    expect(gatewayOnly.body.error).toBe(`Site ${s.code} · Works H was not deleted. It has an active gateway (Clarifier panel ${sfx}): revoke it under Admin → Gateways first.`);
    await admin.post(`/api/gateways/${gw.body.id}/revoke`).send({});
    expect((await admin.delete(`/api/sites/${s.id}`)).status).toBe(204);
    expect((await env.db("assets").whereIn("id", ids).select("area_id")).map((r) => r.area_id)).toEqual([other.areas.Store, other.areas.Store, other.areas.Store]);
  });

  it("only admins delete sites and areas", async () => {
    const admin = await signedIn(env.app, "admin");
    const s = await newSite(admin, "R", ["Kept"]);
    for (const role of ["technician", "analyst", "planner", "manager"] as const) {
      const agent = await signedIn(env.app, role);
      expect((await agent.delete(`/api/areas/${s.areas.Kept}`)).status).toBe(403);
      expect((await agent.delete(`/api/sites/${s.id}`)).status).toBe(403);
    }
    expect(await env.db("areas").where({ id: s.areas.Kept }).first()).toBeTruthy();
    expect((await request(env.app).delete(`/api/sites/${s.id}`)).status).toBe(401);
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
    expect((await admin.delete(`/api/points/${point.body.id}`)).status).toBe(404);
    // each change to a point is on the motor's audit trail
    const trail = await env.db("audit_log").where({ subject_type: "asset", subject_id: String(id) }).where("action", "like", "point.%").orderBy("id");
    expect(trail.map((t) => [t.action, t.details.pointId])).toEqual([
      ["point.created", point.body.id],
      ["point.updated", point.body.id],
      ["point.deleted", point.body.id],
    ]);
    expect(trail[1].details.fields).toEqual(["ct_ratio"]);

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

  it("an edit changes only the fields sent: a 60 Hz motor renamed, moved or given bearings keeps the rest of its nameplate", async () => {
    const admin = await signedIn(env.app, "admin");
    const made = await admin.post("/api/assets").send(
      motor({ tag: `P-${sfx}-60`, ratedHz: 60, ratedRpm: 1780, drivenEquipment: "compressor", criticality: "low", driveFed: true, machineGroup: 1, support: "flexible", designLetter: "c" }),
    );
    expect(made.status).toBe(201);
    const kept = { ratedHz: 60, ratedRpm: 1780, drivenEquipment: "compressor", criticality: "low", driveFed: true, machineGroup: 1, support: "flexible", designLetter: "C", nameplateVersion: 1 };
    expect(made.body).toMatchObject(kept);
    const id = made.body.id;
    const renamed = await admin.patch(`/api/assets/${id}`).send({ name: "Air compressor 60" });
    expect(renamed.status).toBe(200);
    expect(renamed.body).toMatchObject({ ...kept, name: "Air compressor 60" });
    expect((await admin.patch(`/api/assets/${id}`).send({ areaId })).body).toMatchObject(kept);
    expect((await admin.patch(`/api/assets/${id}`).send({ bearings: { de: { designation: "6314 C3" } } })).body).toMatchObject({ ...kept, nameplateVersion: 2 });
    // The speed rule takes the stored poles and frequency: 1780 rpm is fine at 60 Hz, 1810 is not.
    const fast = await admin.patch(`/api/assets/${id}`).send({ ratedRpm: 1810 });
    expect(fast.status).toBe(400);
    expect(fast.body.fields).toEqual({ ratedRpm: "Full-load speed must be below the synchronous 1800 rpm of a 4-pole motor at 60 Hz" });
    // A field sent as null is cleared; a design letter outside NEMA A–D is refused with the field's message.
    expect((await admin.patch(`/api/assets/${id}`).send({ ratedCurrent: null })).body).toMatchObject({ ratedCurrent: null, nameplateVersion: 3 });
    const letter = await admin.patch(`/api/assets/${id}`).send({ designLetter: "N", powerFactor: 1.3 });
    expect(letter.body.fields).toEqual({ designLetter: "NEMA design letter A, B, C or D", powerFactor: "The power factor is above 0 and at most 1 (e.g. 0.86)" });
    expect(await env.db("assets").where({ id }).first()).toMatchObject({ rated_hz: 60, design_letter: "C", power_factor: null, nameplate_version: 3, criticality: "low" });
    const taken = await admin.patch(`/api/assets/${id}`).send({ tag: `P-${sfx}-1` });
    expect(taken.status).toBe(409);
    expect(taken.body.fields).toEqual({ tag: "Another motor already has this tag" });
    expect((await admin.delete(`/api/assets/${id}`)).status).toBe(204);
  });

  it("the detail counts the motor's captures and stored recordings; a motor with captures is kept (409 says what to do instead)", async () => {
    const admin = await signedIn(env.app, "admin");
    const made = await admin.post("/api/assets").send(motor({ tag: `P-${sfx}-h` }));
    const id = made.body.id;
    expect((await admin.get(`/api/assets/${id}`)).body).toMatchObject({ captureCount: 0, storedCaptureCount: 0 });
    const point = await admin.post(`/api/assets/${id}/points`).send({ name: "Phase A current", kind: "current", position: "A" });
    const dup = await admin.post(`/api/assets/${id}/points`).send({ name: "Phase A current", kind: "vibration" });
    expect(dup.status).toBe(409);
    expect(dup.body.fields).toEqual({ name: "This motor already has a point with this name" });
    const bad = await admin.patch(`/api/points/${point.body.id}`).send({ ctRatio: 0, kind: "pressure" });
    expect(bad.body.fields).toEqual({ ctRatio: "The CT ratio must be above 0", kind: "current, vibration or voltage" });
    const capture = { asset_id: id, taken_at: new Date(), source: "upload", status: "analysed" };
    await env.db("captures").insert([
      { ...capture, blob_key: `captures/test/${sfx}/1.wav`, measurement_point_id: point.body.id },
      { ...capture, blob_key: null },
    ]);
    expect((await admin.get(`/api/assets/${id}`)).body).toMatchObject({ captureCount: 2, storedCaptureCount: 1 });
    const refused = await admin.delete(`/api/assets/${id}`);
    expect(refused.status).toBe(409);
    expect(refused.body.error).toBe(
      `Motor P-${sfx}-h was not deleted: it has 2 captures, and the register keeps a motor with its history. Move it to another area, or leave it in the register.`,
    );
    expect(await env.db("assets").where({ id }).first()).toBeTruthy();
    expect(await env.db("measurement_points").where({ asset_id: id })).toHaveLength(1);
    // Deleting the point keeps the capture, unlinked.
    expect((await admin.delete(`/api/points/${point.body.id}`)).status).toBe(204);
    expect((await env.db("captures").where({ asset_id: id }).select("measurement_point_id")).map((c) => c.measurement_point_id)).toEqual([null, null]);
    await env.db("captures").where({ asset_id: id }).delete();
    expect((await admin.delete(`/api/assets/${id}`)).status).toBe(204);
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
