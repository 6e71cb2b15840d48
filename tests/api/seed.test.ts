// The demo seed: idempotent (a second run changes nothing), and the story it tells holds when the real engine
// analyses the synthetic history. It runs on a database of its own on the test cluster: other files (the browser
// tests' motor histories among them, possibly at the same time) write to the scenario's motors in the shared one,
// and this seed must neither see their rows nor take them away. Assertions still name the scenario's own tags.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Knex } from "knex";
import { register } from "tsx/esm/api";
import { signedIn } from "../helpers/context.ts";
import { createKnex, ensureDatabase, migrateLatest } from "../../server/db.ts";
import { loadConfig } from "../../server/config.ts";
import { createMailer } from "../../server/mail/mailer.ts";
import { createApp } from "../../server/app.ts";
import { createFsBlobStore } from "../../server/blob/fs.ts";
import { seedDemo } from "../../server/seed/index.ts";
import { SEED_MARKER } from "../../server/seed/history.ts";
import { SCENARIO } from "../../server/seed/scenario.ts";
import { SCENARIO_MOTORS, SCENARIO_TAGS, pointsFor } from "../../server/seed/fleet.ts";
import { EXTRA_DEMO_USERS } from "../../server/seed/people.ts";
import { historyPlan } from "../../server/seed/story.ts";
import { bearingsBody } from "../../src/shared/schemas/bearings.ts";
import type { BlobStore } from "../../server/blob/store.ts";
import type { HistorySummary } from "../../server/seed/history.ts";

let db: Knex;
let app: ReturnType<typeof createApp>;
let dataDir: string;
const DB_NAME = "barhound_seed_test";
let blob: BlobStore;
let first: HistorySummary | null;
let second: HistorySummary | null;
let before: Record<string, number>;
let after: Record<string, number>;

const RANK: Record<string, number> = { R1: 1, R2: 2, R3: 3, R4: 4, R5: 5 };

async function assetIds(): Promise<number[]> {
  return (await db("assets").whereIn("tag", SCENARIO_TAGS).select("id")).map((a) => a.id);
}

/** Row counts of everything the seed writes, restricted to the scenario. */
async function counts(): Promise<Record<string, number>> {
  const ids = await assetIds();
  const n = async (q: Knex.QueryBuilder) => Number((await q.count({ c: "*" }))[0].c);
  const siteCodes = SCENARIO.map((s) => s.code);
  return {
    sites: await n(db("sites").whereIn("code", siteCodes)),
    areas: await n(db("areas as ar").join("sites as s", "s.id", "ar.site_id").whereIn("s.code", siteCodes)),
    assets: ids.length,
    points: await n(db("measurement_points").whereIn("asset_id", ids)),
    extraPeople: await n(db("users").whereIn("email", EXTRA_DEMO_USERS.map((u) => u.email))),
    captures: await n(db("captures").whereIn("asset_id", ids)),
    kept: await n(db("captures").whereIn("asset_id", ids).whereNotNull("blob_key")),
    analyses: await n(db("analyses").whereIn("asset_id", ids)),
    findings: await n(db("findings").whereIn("asset_id", ids)),
    verdicts: await n(db("verdicts as v").join("findings as f", "f.id", "v.finding_id").whereIn("f.asset_id", ids)),
    inspections: await n(db("inspections").whereIn("asset_id", ids)),
    events: await n(db("inspection_events as e").join("inspections as i", "i.id", "e.inspection_id").whereIn("i.asset_id", ids)),
    markers: await n(db("audit_log").where({ action: SEED_MARKER })),
  };
}

const latest = async (tag: string) =>
  db("analyses as an").join("assets as a", "a.id", "an.asset_id").where("a.tag", tag).andWhere("an.is_current", true).orderBy("an.taken_at", "desc").first("an.*");
const all = async (tag: string) => db("analyses as an").join("assets as a", "a.id", "an.asset_id").where("a.tag", tag).orderBy("an.taken_at").select("an.*");

/** The shared test cluster's URL with another database name (or the maintenance database "postgres"). */
function urlOf(name: string): string {
  const url = new URL(inject("databaseUrl"));
  url.pathname = `/${name}`;
  return url.toString();
}

async function dropDatabase() {
  const admin = createKnex(urlOf("postgres"), { min: 0, max: 1 });
  try {
    await admin.raw(`drop database if exists "${DB_NAME}" with (force)`);
  } finally {
    await admin.destroy();
  }
}

beforeAll(async () => {
  await dropDatabase();
  await ensureDatabase(urlOf(DB_NAME));
  db = createKnex(urlOf(DB_NAME));
  const unregister = register(); // knex imports the .ts migrations itself (as tests/setup/global-setup.ts does)
  try {
    await migrateLatest(db);
  } finally {
    await unregister();
  }
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-seed-"));
  blob = createFsBlobStore(path.join(dataDir, "blobs"));
  const config = loadConfig({ NODE_ENV: "test", JWT_SECRET: "test-secret-for-barhound-only", DATABASE_URL: urlOf(DB_NAME), DATA_DIR: dataDir });
  app = createApp({ db, config, mailer: createMailer(config), services: { blob } });
  first = await seedDemo(db, { blob, log: () => {} });
  before = await counts();
  second = await seedDemo(db, { blob, log: () => {} });
  after = await counts();
}, 300_000);

afterAll(async () => {
  await db?.destroy();
  await dropDatabase();
  if (dataDir) fs.rmSync(dataDir, { recursive: true, force: true });
}, 60_000);

describe("demo seed", () => {
  it("creates the scenario: sites, areas, motors with nameplates, current and vibration points, extra staff", async () => {
    expect(before.sites).toBe(3);
    expect(before.areas).toBe(SCENARIO.reduce((n, s) => n + s.areas.length, 0));
    expect(before.assets).toBe(35);
    expect(before.points).toBe(SCENARIO_MOTORS.reduce((n, m) => n + pointsFor(m).length, 0));
    expect(before.extraPeople).toBe(3);
    const p03 = await db("assets").where({ tag: "TWT-HLP-P03" }).first();
    expect(p03).toMatchObject({ poles: 4, rated_rpm: 1488, rated_hz: 50, rotor_bars: 46, criticality: "high" });
    const points = await db("measurement_points").where({ asset_id: p03.id }).orderBy("id");
    expect(points.map((p) => `${p.kind}:${p.position}`)).toEqual(["current:A", "current:B", "current:C", "vibration:H", "vibration:V"]);
    expect((await db("assets").where({ tag: "TWT-INT-P01" }).first()).drive_fed).toBe(true);
  });

  it("analyses six months of synthetic captures with the engine, keeping few recordings", async () => {
    const plan = historyPlan(new Date());
    expect(first?.skipped).toBe(false);
    expect(before.captures).toBe(plan.length);
    expect(before.captures).toBeGreaterThan(400);
    expect(before.analyses).toBe(before.captures);
    // the latest of every motor plus the last three of each story motor
    const storyMotors = SCENARIO_MOTORS.filter((m) => m.story).length;
    expect(before.kept).toBe(35 + 2 * storyMotors);
    const ids = await assetIds();
    const span = (await db("captures").whereIn("asset_id", ids).min("taken_at as from").max("taken_at as to").first())!;
    const days = (Date.now() - new Date(span.from).getTime()) / 86_400_000;
    expect(days).toBeGreaterThan(160);
    expect(new Date(span.to).getTime()).toBeLessThan(Date.now());
    const kept = await db("captures").whereIn("asset_id", ids).whereNotNull("blob_key").select("blob_key", "sample_rate", "duration_s");
    for (const k of kept) {
      expect(await blob.exists(k.blob_key)).toBe(true);
      expect(k.sample_rate).toBe(5000);
      expect(k.duration_s).toBeGreaterThanOrEqual(20);
    }
    // every analysis is the engine's, versioned like the pipeline's
    const a = await db("analyses").whereIn("asset_id", ids).first("engine_version", "params", "result");
    expect(a.engine_version).toMatch(/^\d+\.\d+\.\d+/);
    expect(a.result.engineVersion).toBe(a.engine_version);
    expect(a.params.nameplate.poles).toBeGreaterThan(0);
  });

  it("is idempotent: a second run changes nothing", () => {
    expect(second?.skipped).toBe(true);
    expect(after).toEqual(before);
    expect(after.markers).toBe(1);
  });

  it("healthy motors read deep sidebands, normal load and clean quality", async () => {
    for (const m of SCENARIO_MOTORS.filter((x) => !x.story)) {
      for (const an of await all(m.tag)) {
        expect(an.rotor_grade, m.tag).toBe("R1");
        expect(an.sideband_db, m.tag).toBeGreaterThanOrEqual(55.5);
        expect(an.load_pct, m.tag).toBeGreaterThan(45);
        expect(an.result.quality, m.tag).toEqual([]);
      }
    }
  });

  it("TWT-HLP-P03 and GBT-CNV-C07 develop a rotor fault: worse than R2 at the end, with findings and verdicts", async () => {
    for (const [tag, worst] of [["TWT-HLP-P03", "R4"], ["GBT-CNV-C07", "R3"]] as const) {
      const l = await latest(tag);
      expect(RANK[l.rotor_grade]).toBeGreaterThan(2);
      expect(l.rotor_grade).toBe(worst);
      const history = await all(tag);
      expect(history[0].rotor_grade).toBe("R1");
      expect(history[0].sideband_db).toBeGreaterThan(56);
      const findings = await db("findings as f").join("assets as a", "a.id", "f.asset_id").where("a.tag", tag).orderBy("f.created_at").select("f.*");
      expect(findings.map((f) => f.level)).toEqual(tag === "TWT-HLP-P03" ? ["R2", "R3", "R4"] : ["R2", "R3"]);
      expect(findings.some((f) => f.status === "confirmed")).toBe(true);
    }
    const p03 = await db("findings as f").join("assets as a", "a.id", "f.asset_id").where("a.tag", "TWT-HLP-P03").orderBy("f.created_at").select("f.status");
    expect(p03.map((f) => f.status)).toEqual(["remeasure", "confirmed", "confirmed"]);
  });

  it("KRB-VNT-F02 is lightly loaded: rotor not assessable for light load", async () => {
    for (const an of await all("KRB-VNT-F02")) {
      expect(an.rotor_assessable).toBe(false);
      expect(an.load_pct).toBeLessThan(40);
      expect(an.result.brokenBar.reason).toMatch(/^light load/);
    }
  });

  it("TWT-INT-P01 runs on a drive at 43–47 Hz", async () => {
    for (const an of await all("TWT-INT-P01")) {
      expect(an.supply_hz).toBeGreaterThanOrEqual(43);
      expect(an.supply_hz).toBeLessThanOrEqual(47);
      expect(an.rotor_grade).toBe("R1");
    }
  });

  it("watched motors carry bearing geometry the register accepts; KRB-PMP-P01 shows its outer-race line, the others none", async () => {
    const withBearings = SCENARIO_MOTORS.filter((m) => m.bearings);
    expect(withBearings.length).toBeGreaterThanOrEqual(3);
    for (const m of withBearings) {
      // the same rules as POST /api/assets (src/shared/schemas/bearings.ts)
      expect(bearingsBody.safeParse(m.bearings).success, m.tag).toBe(true);
      const row = await db("assets").where({ tag: m.tag }).first();
      expect(row.bearing_de_designation, m.tag).toBe(m.bearings!.de!.designation);
      const an = await latest(m.tag);
      expect(an.params.nameplate.bearings.map((b: { position: string }) => b.position), m.tag).toEqual(["DE", "NDE"]);
      const found = (an.result.bearings.bearings as { position: string; defects: { defect: string; lines: { status: string }[] }[] }[]).flatMap((b) =>
        b.defects.filter((d) => d.lines.some((l) => l.status === "found")).map((d) => `${d.defect} ${b.position}`),
      );
      expect(found, m.tag).toEqual(m.tag === "KRB-PMP-P01" ? ["BPFO DE"] : []);
      expect(an.result.markers.some((k: { family: string }) => k.family === "bearing"), m.tag).toBe(true);
    }
    // an indication only: the pump's zone stays A on the captures with the line
    for (const an of (await all("KRB-PMP-P01")).slice(-3)) expect(an.vibration_zone).toBe("A");
  });

  it("GBT-CMP-K02 has a dismissed load-oscillation false alarm and is flagged since", async () => {
    const f = await db("findings as f").join("assets as a", "a.id", "f.asset_id").where("a.tag", "GBT-CMP-K02").select("f.*");
    expect(f).toHaveLength(1);
    expect(f[0].status).toBe("dismissed");
    const v = await db("verdicts").where({ finding_id: f[0].id });
    expect(v.map((x) => x.verdict)).toEqual(["dismissed"]);
    expect(v[0].note).toMatch(/load oscillation/i);
    const l = await latest("GBT-CMP-K02");
    expect(l.rotor_assessable).toBe(false);
    expect(l.result.brokenBar.loadOscillationSuspected).toBe(true);
  });

  it("plans inspections: created by the planner, assigned to technicians, done and overdue ones, with history", async () => {
    const ids = await assetIds();
    const rows = await db("inspections as i")
      .join("users as u", "u.id", "i.assignee_id")
      .join("users as c", "c.id", "i.created_by")
      .whereIn("i.asset_id", ids)
      .select("i.*", "u.role as assignee_role", "c.role as creator_role", db.raw("to_char(i.due_date, 'YYYY-MM-DD') as due"));
    const today = new Date().toISOString().slice(0, 10);
    expect(rows.every((r) => r.assignee_role === "technician" && r.creator_role === "planner")).toBe(true);
    expect(rows.filter((r) => r.status === "done").length).toBeGreaterThanOrEqual(2);
    expect(rows.filter((r) => ["planned", "in_progress"].includes(r.status) && r.due < today).length).toBeGreaterThanOrEqual(2);
    for (const r of rows) {
      const events = await db("inspection_events").where({ inspection_id: r.id }).orderBy("at");
      expect(events[0].kind).toBe("created");
      expect(events.at(-1)!.to_status).toBe(r.status);
    }
  });

  it("the API shows the story: spectrum of a kept recording, a clear answer for one not kept", async () => {
    const agent = await signedIn(app, "analyst");
    const ids = await assetIds();
    const keptCap = await db("captures").whereIn("asset_id", ids).whereNotNull("blob_key").first("id");
    const gone = await db("captures").whereIn("asset_id", ids).whereNull("blob_key").first("id");
    const ok = await agent.get(`/api/captures/${keptCap.id}/spectrum?kind=current&fmin=40&fmax=60&buckets=500`);
    expect(ok.status).toBe(200);
    expect(ok.body.hz.length).toBeGreaterThan(10);
    const no = await agent.get(`/api/captures/${gone.id}/spectrum?kind=current`);
    expect(no.status).toBe(410);
    expect(no.body.error).toMatch(/record|raw|kept/i);
    const detail = await agent.get(`/api/captures/${gone.id}`);
    expect(detail.status).toBe(200);
    expect(detail.body.analysis?.brokenBar ?? detail.body.analysis).toBeTruthy();
  });
});
