import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import pg from "pg";
import { EVENTS_CHANNEL } from "../../server/events.ts";
import { makeTestEnv, signedIn, type TestEnv } from "../helpers/context.ts";
import { makeMotor } from "../helpers/pipeline.ts";
import { analysisResult as result, writeAnalysed } from "../helpers/analysis-fixture.ts";
import { writeAnalysisResult } from "../../server/captures/result.ts";
import { decideFindings } from "../../server/captures/findings.ts";
import type { AnalysisResult } from "../../src/engine/types.ts";

// Findings are raised when a motor gets worse; analysts give verdicts (audited); the review queue, worst first.
let env: TestEnv;
const analysed = (assetId: number, takenAt: string, r: AnalysisResult) => writeAnalysed(env.db, assetId, takenAt, r);
let listener: pg.Client;
const verdictEvents: Record<string, unknown>[] = [];
beforeAll(async () => {
  env = await makeTestEnv();
  listener = new pg.Client({ connectionString: inject("databaseUrl") });
  await listener.connect();
  listener.on("notification", (n) => {
    const e = JSON.parse(n.payload!) as { event: string; payload: Record<string, unknown> };
    if (e.event === "finding:verdict") verdictEvents.push(e.payload);
  });
  await listener.query(`listen ${EVENTS_CHANNEL}`);
});
afterAll(async () => {
  await listener?.end();
  await env?.close();
});

async function until(ok: () => boolean, ms = 5000) {
  const end = Date.now() + ms;
  while (!ok() && Date.now() < end) await new Promise((r) => setTimeout(r, 25));
}



describe("finding rules", () => {
  it("raises on a worse grade or zone, and on a first analysis at Watch / zone C or worse", () => {
    expect(decideFindings({ rotorGrade: "R1", vibrationZone: "A" }, null, null)).toEqual([]);
    expect(decideFindings({ rotorGrade: "R2", vibrationZone: null, sidebandDb: 50 }, null, null)).toMatchObject([{ kind: "rotor", level: "R2", previousLevel: null }]);
    expect(decideFindings({ rotorGrade: "R3", vibrationZone: null }, { rotorGrade: "R3", vibrationZone: null }, null)).toEqual([]);
    expect(decideFindings({ rotorGrade: "R2", vibrationZone: null }, { rotorGrade: "R3", vibrationZone: null }, null)).toEqual([]);
    expect(decideFindings({ rotorGrade: null, vibrationZone: "D", vibrationRms: 12 }, null, { rotorGrade: null, vibrationZone: "C" })).toMatchObject([
      { kind: "vibration", level: "D", previousLevel: "C", summary: expect.stringMatching(/zone D: 12\.00 mm\/s RMS, was zone C/) },
    ]);
    expect(decideFindings({ rotorGrade: null, vibrationZone: "B" }, null, null)).toEqual([]);
  });

  it("through the result write: sound → worse raises one finding; writing the same version twice changes nothing", async () => {
    const { asset } = await makeMotor(env.db);
    const a = await analysed(asset.id, "2026-10-01T08:00:00Z", result("R1", 60, "A"));
    expect(a.findings).toEqual([]);
    const b = await analysed(asset.id, "2026-10-08T08:00:00Z", result("R3", 45, "C", 5.2));
    expect(b.findings.map((f) => `${f.kind}:${f.level}`).sort()).toEqual(["rotor:R3", "vibration:C"]);
    const again = await writeAnalysisResult(env.db, { captureId: b.captureId, version: 1, engineVersion: "test", nameplateVersion: 1, params: {}, result: result("R3", 45), meta: {} });
    expect(again.written).toBe(false);
    expect(await env.db("analyses").where({ capture_id: b.captureId })).toHaveLength(1);
    const rows = await env.db("findings").where({ asset_id: asset.id }).orderBy("kind");
    expect(rows.map((f) => [f.kind, f.level, f.previous_level])).toEqual([["rotor", "R3", "R1"], ["vibration", "C", "A"]]);
    expect(rows[0].summary).toMatch(/Rotor grade R3 Developing: lower sideband 45\.0 dB below the supply line at 80 % load, was R1 Sound on 2026-10-01/);
    // Not assessable in between does not reset the comparison.
    await analysed(asset.id, "2026-10-15T08:00:00Z", result(null, null));
    const c = await analysed(asset.id, "2026-10-22T08:00:00Z", result("R3", 44));
    expect(c.findings).toEqual([]);
  });
});

describe("findings API", () => {
  let findingId: number;
  let assetId: number;
  let siteId: number;

  beforeAll(async () => {
    const m = await makeMotor(env.db, { criticality: "high" });
    assetId = m.asset.id;
    siteId = m.site.id;
    await analysed(assetId, "2026-09-01T08:00:00Z", result("R1", 60));
    const worse = await analysed(assetId, "2026-09-08T08:00:00Z", result("R5", 30));
    findingId = worse.findings[0].id;
    const other = await makeMotor(env.db, { criticality: "low" });
    await analysed(other.asset.id, "2026-09-08T08:00:00Z", result("R2", 52));
  });

  it("lists findings with filters and server-side sort", async () => {
    const agent = await signedIn(env.app, "manager");
    const res = await agent.get(`/api/findings?siteId=${siteId}&status=open`);
    expect(res.status).toBe(200);
    expect(res.body.total).toBe(1);
    expect(res.body.items[0]).toMatchObject({ id: findingId, assetId, kind: "rotor", level: "R5", previousLevel: "R1", criticality: "high", loadPct: 80, verdicts: [] });
    const bySeverity = (await agent.get(`/api/findings?status=open&sort=-severity&pageSize=200`)).body.items;
    const rank = (l: string) => ({ R5: 5, R4: 4, D: 4, R3: 3, C: 3, R2: 2 })[l] ?? 0;
    for (let i = 1; i < bySeverity.length; i++) expect(rank(bySeverity[i - 1].level)).toBeGreaterThanOrEqual(rank(bySeverity[i].level));
    expect((await agent.get(`/api/findings?sort=summary;drop`)).status).toBe(400);
    expect((await agent.get(`/api/findings?status=closed`)).status).toBe(400);
  });

  it("the review queue (analyst, admin) lists captures with open findings, worst first", async () => {
    const analyst = await signedIn(env.app, "analyst");
    const res = await analyst.get(`/api/review?pageSize=200`);
    expect(res.status).toBe(200);
    const sev = res.body.items.map((i: { severity: number }) => i.severity);
    expect([...sev].sort((a, b) => b - a)).toEqual(sev);
    expect(res.body.items.find((i: { assetId: number }) => i.assetId === assetId).findings[0].id).toBe(findingId);
    for (const role of ["technician", "planner", "manager"] as const) expect((await (await signedIn(env.app, role)).get("/api/review")).status).toBe(403);
    expect((await (await signedIn(env.app, "admin")).get("/api/review")).status).toBe(200);
  });

  it("an analyst's verdict is stored, moves the finding's status and is audited as verdict.set", async () => {
    const analyst = await signedIn(env.app, "analyst");
    const bad = await analyst.post(`/api/findings/${findingId}/verdict`).send({ verdict: "maybe" });
    expect(bad.status).toBe(400);
    expect(bad.body.fields.verdict).toBeTruthy();
    const res = await analyst.post(`/api/findings/${findingId}/verdict`).send({ verdict: "remeasure", note: "Load was low; measure again at full load." });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ id: findingId, status: "remeasure", verdicts: [{ verdict: "remeasure", analystName: "Tobias Renn", note: expect.stringMatching(/full load/) }] });
    const second = await analyst.post(`/api/findings/${findingId}/verdict`).send({ verdict: "confirmed" });
    expect(second.body.status).toBe("confirmed");
    expect(second.body.verdicts).toHaveLength(2);
    const trail = await env.db("audit_log").where({ action: "verdict.set", subject_type: "finding", subject_id: String(findingId) }).orderBy("id");
    expect(trail.map((t) => t.details)).toMatchObject([{ from: "open", to: "remeasure" }, { from: "remeasure", to: "confirmed" }]);
    // each verdict is announced, so other analysts' queues and the fleet counts refresh live
    await until(() => verdictEvents.length >= 2);
    expect(verdictEvents).toEqual([
      { id: findingId, assetId, verdict: "remeasure" },
      { id: findingId, assetId, verdict: "confirmed" },
    ]);
    expect((await analyst.get(`/api/findings?siteId=${siteId}&status=open`)).body.total).toBe(0);
    expect((await analyst.post(`/api/findings/99999999/verdict`).send({ verdict: "confirmed" })).status).toBe(404);
  });

  it("only analysts may give verdicts", async () => {
    for (const role of ["technician", "planner", "manager", "admin"] as const) {
      const res = await (await signedIn(env.app, role)).post(`/api/findings/${findingId}/verdict`).send({ verdict: "dismissed" });
      expect(res.status).toBe(403);
    }
    expect((await env.db("verdicts").where({ finding_id: findingId })).length).toBe(2);
  });
});

describe("findings list filters: level, kind, from/to on the finding's creation", () => {
  let assetId: number;
  let manager: Awaited<ReturnType<typeof signedIn>>;
  const ids: Record<string, number> = {};
  const created: Record<string, string> = { "rotor:R3": "2026-10-08T09:00:00Z", "vibration:C": "2026-10-08T09:00:00Z", "rotor:R5": "2026-10-20T15:30:00Z", "vibration:D": "2026-11-02T06:00:00Z" };

  beforeAll(async () => {
    assetId = (await makeMotor(env.db)).asset.id;
    await analysed(assetId, "2026-10-01T08:00:00Z", result("R1", 60, "A"));
    await analysed(assetId, "2026-10-08T08:00:00Z", result("R3", 45, "C", 5.2));
    await analysed(assetId, "2026-10-20T08:00:00Z", result("R5", 30));
    await analysed(assetId, "2026-11-01T08:00:00Z", result(null, null, "D", 12));
    for (const f of await env.db("findings").where({ asset_id: assetId })) {
      const key = `${f.kind}:${f.level}`;
      ids[key] = f.id;
      // The rows are created now; set the creation times the filters are checked against.
      await env.db("findings").where({ id: f.id }).update({ created_at: created[key] });
    }
    expect(Object.keys(ids).sort()).toEqual(Object.keys(created).sort());
    manager = await signedIn(env.app, "manager");
  });

  const keysOf = async (q: Record<string, string>) => {
    const res = await manager.get("/api/findings").query({ assetId, sort: "createdAt", ...q });
    expect(res.status).toBe(200);
    return res.body.items.map((f: { kind: string; level: string }) => `${f.kind}:${f.level}`).sort();
  };

  it("narrows by level (a comma list of grades and zones), kind and from/to", async () => {
    expect(await keysOf({})).toEqual(["rotor:R3", "rotor:R5", "vibration:C", "vibration:D"]);
    expect(await keysOf({ level: "R5" })).toEqual(["rotor:R5"]);
    expect(await keysOf({ level: "r3,C" })).toEqual(["rotor:R3", "vibration:C"]);
    expect(await keysOf({ level: "R4" })).toEqual([]);
    expect(await keysOf({ kind: "vibration" })).toEqual(["vibration:C", "vibration:D"]);
    expect(await keysOf({ kind: "rotor", level: "R3,R4,R5,D" })).toEqual(["rotor:R3", "rotor:R5"]);
    expect(await keysOf({ from: "2026-10-09" })).toEqual(["rotor:R5", "vibration:D"]);
    expect(await keysOf({ to: "2026-10-20" })).toEqual(["rotor:R3", "rotor:R5", "vibration:C"]);
    expect(await keysOf({ to: "2026-10-20T15:00:00Z" })).toEqual(["rotor:R3", "vibration:C"]);
    expect(await keysOf({ from: "2026-10-20T15:30:00Z", to: "2026-10-20T17:30:00+02:00" })).toEqual(["rotor:R5"]);
    expect(await keysOf({ from: "2026-10-01", to: "2026-10-31", level: "R5,D" })).toEqual(["rotor:R5"]);
  });

  it("refuses a bad level, kind or date, a reversed range and a parameter it does not take, naming the field", async () => {
    const fields = async (qs: string) => {
      const res = await manager.get(`/api/findings?${qs}`);
      expect(res.status).toBe(400);
      return res.body.fields as Record<string, string>;
    };
    expect(await fields("level=A")).toEqual({ level: "One or more of: R2, R3, R4, R5, B, C, D (comma-separated)" });
    expect((await fields("level=R5,R9")).level).toMatch(/One or more of/);
    expect(await fields("kind=bearing")).toEqual({ kind: "kind is rotor or vibration" });
    expect((await fields("from=last-week")).from).toMatch(/Use a date/);
    expect((await fields("to=2026-13-01")).to).toMatch(/not a calendar date/);
    expect(await fields("from=2026-11-01&to=2026-10-01")).toEqual({ to: "to is before from: give from ≤ to." });
    expect(await fields(`assetId=${assetId}&grade=R5`)).toEqual({ grade: 'Unknown field "grade".' });
  });
});
