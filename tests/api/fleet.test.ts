import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { makeTestEnv, signedIn, type TestEnv } from "../helpers/context.ts";
import { routeRegistry } from "../../server/http.ts";
import { can, ROLES, type Permission, type Role } from "../../server/permissions.ts";
import { loadBin, loadHistogram } from "../../server/reports/fleet-data.ts";

// Fleet health from a hand-built set of analyses: counts per grade and zone, worst first, this week's changes,
// the load histogram and overdue inspections; its CSV export and the printable site report.
// Fixture rows use the tags "FLEETT-*" (site under test) and "FLEETU-*" (a second site that must stay out).

let env: TestEnv;
const agents = {} as Record<Role, request.Agent>;
const site = { t: 0, u: 0 };
const asset: Record<string, number> = {};
const DAY = 86_400_000;
const ago = (days: number) => new Date(Date.now() - days * DAY);
const isoDay = (offsetDays: number) => new Date(Date.now() + offsetDays * DAY).toISOString().slice(0, 10);

async function analysis(tag: string, o: { grade?: string; db?: number; load?: number; zone?: string; rms?: number; at: Date; current?: boolean; notAssessable?: boolean }) {
  const [cap] = await env.db("captures").insert({ asset_id: asset[tag], taken_at: o.at, source: "upload", status: "analysed", format: "csv" }).returning("id");
  await env.db("analyses").insert({
    capture_id: cap.id,
    asset_id: asset[tag],
    version: 1,
    is_current: o.current ?? true,
    engine_version: "test",
    nameplate_version: 1,
    params: "{}",
    result: "{}",
    taken_at: o.at,
    rotor_grade: o.notAssessable ? null : (o.grade ?? null),
    rotor_assessable: !o.notAssessable && !!o.grade,
    sideband_db: o.db ?? null,
    load_pct: o.load ?? null,
    vibration_zone: o.zone ?? null,
    vibration_rms: o.rms ?? null,
  });
}

beforeAll(async () => {
  env = await makeTestEnv({ loginRateLimit: 1000 });
  for (const role of ROLES) agents[role] = await signedIn(env.app, role);
  const db = env.db;
  const [t] = await db("sites").insert({ code: "FLEETT", name: "Fleet <Test> & Co", timezone: "UTC" }).returning("id");
  const [u] = await db("sites").insert({ code: "FLEETU", name: "Other works", timezone: "UTC" }).returning("id");
  site.t = t.id;
  site.u = u.id;
  const [pumps] = await db("areas").insert({ site_id: t.id, name: "Pumps" }).returning("id");
  const [fans] = await db("areas").insert({ site_id: t.id, name: "Fans, north" }).returning("id");
  const [empty] = await db("areas").insert({ site_id: t.id, name: "Spare bay" }).returning("id");
  const [other] = await db("areas").insert({ site_id: u.id, name: "Hall" }).returning("id");
  void empty;
  const motors: [string, number, string][] = [
    ["FLEETT-P1", pumps.id, "high"], ["FLEETT-P2", pumps.id, "medium"], ["FLEETT-P3", pumps.id, "high"], ["FLEETT-P4", pumps.id, "low"], ["FLEETT-P5", pumps.id, "low"],
    ["FLEETT-F1", fans.id, "medium"], ["FLEETT-F2", fans.id, "medium"], ["FLEETT-F3", fans.id, "low"], ["FLEETT-F4", fans.id, "low"],
    ["FLEETU-U1", other.id, "high"],
  ];
  const rows = await db("assets")
    .insert(motors.map(([tag, area_id, criticality]) => ({ tag, area_id, criticality, name: `Motor ${tag}`, rated_rpm: 1480, poles: 4, rated_kw: 55 })))
    .returning(["id", "tag"]);
  for (const r of rows) asset[r.tag] = r.id;

  await analysis("FLEETT-P1", { grade: "R1", db: 58, load: 75, zone: "A", rms: 1.2, at: ago(2) });
  await analysis("FLEETT-P1", { grade: "R5", db: 30, load: 75, zone: "D", at: ago(1), current: false }); // superseded: ignored
  await analysis("FLEETT-P2", { grade: "R2", db: 50, load: 60, zone: "A", at: ago(20) });
  await analysis("FLEETT-P2", { grade: "R3", db: 45, load: 35, zone: "B", rms: 3.1, at: ago(1) });
  await analysis("FLEETT-P3", { grade: "R5", db: 33, load: 115, zone: "D", rms: 9.8, at: ago(3) });
  await analysis("FLEETT-P4", { grade: "R2", db: 51, load: 70, at: ago(10) });
  await analysis("FLEETT-P4", { notAssessable: true, load: 20, at: ago(1) }); // light load: latest is not assessable
  await analysis("FLEETT-F1", { grade: "R2", db: 49, load: 90, zone: "B", at: ago(10) });
  await analysis("FLEETT-F1", { grade: "R4", db: 38, load: 95, zone: "C", rms: 5.2, at: ago(2) });
  await analysis("FLEETT-F2", { grade: "R4", db: 37, load: 100, zone: "C", at: ago(9.5) }); // zone C → B: outside the window
  await analysis("FLEETT-F2", { grade: "R4", db: 37, load: 100, zone: "B", at: ago(9) });
  await analysis("FLEETT-F2", { grade: "R5", db: 35, load: 104, zone: "B", at: ago(8.5) }); // change outside the 7-day window
  await analysis("FLEETT-F2", { grade: "R5", db: 35, load: 105, zone: "B", rms: 2.5, at: ago(0.1) });
  await analysis("FLEETT-F3", { grade: "R2", db: 50, load: 45, zone: "A", at: ago(5) });
  await analysis("FLEETT-F3", { grade: "R1", db: 60, load: 40, zone: "A", rms: 0.9, at: ago(0.5) });
  await analysis("FLEETT-F4", { grade: "R1", db: 58, load: 125, zone: "C", rms: 5.0, at: ago(6) });
  await analysis("FLEETT-F4", { load: 128, at: ago(5) }); // no vibration reading in between: the zone is compared across it
  await analysis("FLEETT-F4", { grade: "R1", db: 59, load: 130, zone: "A", rms: 1.0, at: ago(4) }); // zone C → A: better
  await analysis("FLEETU-U1", { grade: "R5", db: 31, load: 80, zone: "D", at: ago(1) });

  const insp = (tag: string, due: number, status: string) => ({ asset_id: asset[tag], title: `Inspect ${tag} ${status} ${due}`, due_date: isoDay(due), status });
  await db("inspections").insert([
    insp("FLEETT-P3", -3, "planned"), // overdue
    insp("FLEETT-F1", -10, "in_progress"), // overdue
    insp("FLEETT-P3", -1, "done"),
    insp("FLEETT-P3", -5, "cancelled"),
    insp("FLEETT-P3", 1, "planned"),
    insp("FLEETT-F1", 0, "planned"), // due today: not overdue yet
    insp("FLEETU-U1", -2, "planned"), // the other site's
  ]);
});
afterAll(async () => env.close());

describe("load histogram bins", () => {
  it("puts each load % in its 10 % bin, the edges in the upper bin, ≥ 120 % in one open bin", () => {
    expect([0, 9.99, 10, 39.9, 40, 110, 119.9, 120, 250, -5].map(loadBin)).toEqual([0, 0, 1, 3, 4, 11, 11, 12, 12, 0]);
    const bins = loadHistogram([5, 15, 15, 125]);
    expect(bins).toHaveLength(13);
    expect(bins[0]).toEqual({ fromPct: 0, toPct: 10, count: 1 });
    expect(bins[1]).toEqual({ fromPct: 10, toPct: 20, count: 2 });
    expect(bins[12]).toEqual({ fromPct: 120, toPct: null, count: 1 });
  });
});

describe("GET /fleet", () => {
  let body: Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any
  beforeAll(async () => {
    const res = await agents.technician.get(`/api/fleet?siteId=${site.t}`);
    expect(res.status).toBe(200);
    body = res.body;
  });

  it("counts motors per rotor grade from each motor's current latest analysis, per site and area", () => {
    expect(body.sites).toHaveLength(1);
    const s = body.sites[0];
    expect(s).toMatchObject({ code: "FLEETT", motors: 9 });
    expect(s.grades).toEqual({ R1: 3, R2: 0, R3: 1, R4: 1, R5: 2, notAssessable: 1, noData: 1 });
    const byName = Object.fromEntries(s.areas.map((a: { name: string }) => [a.name, a]));
    expect(byName.Pumps.grades).toEqual({ R1: 1, R2: 0, R3: 1, R4: 0, R5: 1, notAssessable: 1, noData: 1 });
    expect(byName["Fans, north"].grades).toEqual({ R1: 2, R2: 0, R3: 0, R4: 1, R5: 1, notAssessable: 0, noData: 0 });
    expect(byName["Spare bay"]).toMatchObject({ motors: 0, grades: { R1: 0, noData: 0 } });
    expect(body.totals.grades).toEqual(s.grades);
  });

  it("counts vibration zones, with motors lacking vibration data apart", () => {
    expect(body.sites[0].zones).toEqual({ A: 3, B: 2, C: 1, D: 1, none: 2 });
    const pumps = body.sites[0].areas.find((a: { name: string }) => a.name === "Pumps");
    expect(pumps.zones).toEqual({ A: 1, B: 1, C: 0, D: 1, none: 2 });
  });

  it("lists the worst motors first: grade, then sideband depth", () => {
    expect(body.worst.map((m: { tag: string }) => m.tag)).toEqual(["FLEETT-P3", "FLEETT-F2", "FLEETT-F1", "FLEETT-P2", "FLEETT-P1", "FLEETT-F4", "FLEETT-F3"]);
    expect(body.worst[0]).toMatchObject({ rotorGrade: "R5", gradeLabel: "R5 Severe", sidebandDb: 33, loadPct: 115, vibrationZone: "D" });
    expect(body.motors.slice(-2).map((m: { tag: string; gradeLabel: string }) => [m.tag, m.gradeLabel])).toEqual([
      ["FLEETT-P4", "Not assessable"],
      ["FLEETT-P5", "No data"],
    ]);
  });

  type Change = { kind: string; tag: string; from: string; to: string; direction: string; fromLabel: string; toLabel: string; at: string; analysisId: number; captureId: number };
  const line = (c: Change) => `${c.tag} ${c.kind} ${c.from}→${c.to} ${c.direction}`;

  it("reports grade changes of the last 7 days only, ignoring superseded analyses", () => {
    const changes = (body.changes as Change[]).filter((c) => c.kind === "rotor").map(line).sort();
    expect(changes).toEqual(["FLEETT-F1 rotor R2→R4 worse", "FLEETT-F3 rotor R2→R1 better", "FLEETT-P2 rotor R2→R3 worse"]);
    expect(body.changes.find((c: Change) => c.tag === "FLEETT-F1" && c.kind === "rotor")).toMatchObject({ fromLabel: "R2 Watch", toLabel: "R4 Serious" });
  });

  it("reports vibration zone changes too, worse and better, each with when and the capture that showed it", async () => {
    const zones = (body.changes as Change[]).filter((c) => c.kind === "vibration");
    // P2 A→B and F1 B→C in the window; F4 C→A across an analysis without vibration; F2's C→B is 9 days old
    expect(zones.map(line).sort()).toEqual(["FLEETT-F1 vibration B→C worse", "FLEETT-F4 vibration C→A better", "FLEETT-P2 vibration A→B worse"]);
    const f1 = zones.find((c) => c.tag === "FLEETT-F1")!;
    expect(f1).toMatchObject({ fromLabel: "Zone B", toLabel: "Zone C", name: "Motor FLEETT-F1", areaName: "Fans, north" });
    expect(Date.now() - Date.parse(f1.at)).toBeGreaterThan(1.9 * DAY);
    expect(Date.now() - Date.parse(f1.at)).toBeLessThan(2.1 * DAY);
    const capture = await env.db("analyses").where({ id: f1.analysisId }).first("capture_id", "vibration_zone");
    expect(capture).toEqual({ capture_id: f1.captureId, vibration_zone: "C" });
  });

  it("lists the changes worst first: worse before better, then the level reached, the step, the latest", () => {
    expect((body.changes as Change[]).map(line)).toEqual([
      "FLEETT-F1 rotor R2→R4 worse", // R4 reached
      "FLEETT-P2 rotor R2→R3 worse", // R3 and zone C on one scale; P2's a day ago, F1's two
      "FLEETT-F1 vibration B→C worse",
      "FLEETT-P2 vibration A→B worse",
      "FLEETT-F4 vibration C→A better", // a step of two before one
      "FLEETT-F3 rotor R2→R1 better",
    ]);
  });

  it("bins load % in 10 % steps and lists motors under 40 % and over 110 %", () => {
    const counts = Object.fromEntries(body.load.bins.filter((b: { count: number }) => b.count).map((b: { fromPct: number; count: number }) => [b.fromPct, b.count]));
    expect(counts).toEqual({ 20: 1, 30: 1, 40: 1, 70: 1, 90: 1, 100: 1, 110: 1, 120: 1 });
    expect(body.load).toMatchObject({ binPct: 10, underPct: 40, overPct: 110, withoutLoad: 1 });
    expect(body.load.under.map((m: { tag: string }) => m.tag)).toEqual(["FLEETT-P4", "FLEETT-P2"]); // 40 % exactly is not under
    expect(body.load.over.map((m: { tag: string }) => m.tag)).toEqual(["FLEETT-F4", "FLEETT-P3"]); // 105 % is not over
  });

  it("counts overdue inspections: due before the site's today, not done or cancelled", () => {
    expect(body.overdue.count).toBe(2);
    expect(body.sites[0].overdueInspections).toBe(2);
    expect(body.overdue.items.map((o: { assetTag: string; daysOverdue: number; status: string }) => [o.assetTag, o.daysOverdue, o.status])).toEqual([
      ["FLEETT-F1", 10, "in_progress"],
      ["FLEETT-P3", 3, "planned"],
    ]);
    const p3 = body.motors.find((m: { tag: string }) => m.tag === "FLEETT-P3");
    expect(p3).toMatchObject({ openInspections: 2, overdueInspections: 1 });
  });

  it("without siteId covers every site; an unknown site is 404", async () => {
    const all = await agents.manager.get("/api/fleet");
    expect(all.status).toBe(200);
    const codes = all.body.sites.map((s: { code: string }) => s.code);
    expect(codes).toEqual(expect.arrayContaining(["FLEETT", "FLEETU"]));
    expect(all.body.sites.find((s: { code: string }) => s.code === "FLEETU")).toMatchObject({ motors: 1, overdueInspections: 1, grades: { R5: 1 } });
    expect((await agents.manager.get("/api/fleet?siteId=999999")).status).toBe(404);
    expect((await agents.manager.get("/api/fleet?siteId=abc")).status).toBe(400);
  });
});

describe("GET /fleet.csv", () => {
  it("has one row per motor, worst first, with grades as text", async () => {
    const res = await agents.manager.get(`/api/fleet.csv?siteId=${site.t}`);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^text\/csv/);
    const lines = res.text.split("\r\n").filter(Boolean);
    expect(lines).toHaveLength(1 + 9);
    const header = lines[0].split(",");
    expect(header).toEqual(expect.arrayContaining(["motor_tag", "rotor_grade", "sideband_db", "load_pct", "vibration_zone", "overdue_inspections"]));
    expect(lines[1]).toContain("FLEETT-P3");
    expect(lines[1]).toContain("R5 Severe");
    expect(lines[1]).toContain(",Fleet <Test> & Co,"); // nothing to quote: no comma, quote or line break
    expect(res.text).toContain('"Fans, north"'); // RFC 4180: the comma in the area name is quoted
    expect(lines.some((l) => l.includes("FLEETT-P5") && l.includes("No data"))).toBe(true);
    expect(lines.some((l) => l.includes("FLEETU-U1"))).toBe(false);
  });
});

describe("GET /sites/:id/report", () => {
  it("is a printable one-page HTML report with units and grades as text", async () => {
    const res = await agents.planner.get(`/api/sites/${site.t}/report`);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^text\/html/);
    const html = res.text;
    expect(html).toMatch(/^<!doctype html>/);
    expect(html).toContain("@media print");
    expect(html).toContain("@page");
    expect(html).toContain("Fleet &lt;Test&gt; &amp; Co"); // escaped, never raw markup
    expect(html).not.toContain("<Test>");
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toMatch(/<link[^>]+stylesheet/i); // inline CSS only
    for (const label of ["R1 Sound", "R3 Developing", "R4 Serious", "R5 Severe", "Not assessable", "No data", "Zone D"]) expect(html).toContain(label);
    expect(html).toContain("33.0\u202fdB");
    expect(html).toContain("115\u202f%");
    expect(html).toContain("9.80\u202fmm/s");
    expect(html).toContain("FLEETT-F1");
    expect(html).toContain("<b>FLEETT-F1</b> Zone B → Zone C (worse)"); // zone changes beside the grade changes
    expect(html).not.toContain("FLEETU-U1");
  });

  it("answers 404 for an unknown site", async () => {
    expect((await agents.manager.get("/api/sites/999999/report")).status).toBe(404);
  });
});

describe("role checks on every fleet route", () => {
  const mine = () => routeRegistry.filter((r) => r.path === "/api/fleet" || r.path === "/api/fleet.csv" || r.path === "/api/sites/:id/report");
  it("registers the routes with the permissions the contract names", () => {
    expect(mine().map((r) => `${r.method} ${r.path} ${r.permission}`).sort()).toEqual([
      "get /api/fleet fleet.read",
      "get /api/fleet.csv reports.read",
      "get /api/sites/:id/report reports.read",
    ]);
  });

  it("401 without a session, 403 for roles without the permission, 200 for those with it", async () => {
    for (const route of mine()) {
      const p = route.path.replace(":id", String(site.t));
      expect((await request(env.app).get(p)).status, p).toBe(401);
      for (const role of ROLES) {
        const res = await agents[role].get(p);
        expect(res.status, `${role} ${p}`).toBe(can(role, route.permission as Permission) ? 200 : 403);
      }
    }
  });
});
