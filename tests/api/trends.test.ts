import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeTestEnv, signedIn, type TestEnv } from "../helpers/context.ts";
import { makeMotor } from "../helpers/pipeline.ts";
import { TREND_POINT_CAP } from "../../server/routes/assets.ts";

// GET /api/assets/:id/trend: a range with more points than the cap answers the newest ones (oldest first, for the
// charts) and says so; under the cap it answers everything and says nothing is missing.
let env: TestEnv;
beforeAll(async () => {
  env = await makeTestEnv();
});
afterAll(async () => env?.close());

const T0 = Date.parse("2026-01-01T00:00:00Z");
const HOUR = 3_600_000;
const at = (i: number) => new Date(T0 + i * HOUR).toISOString();

interface TrendAnswer {
  points: { takenAt: string; analysisId: number; sidebandDb: number | null }[];
  truncated: boolean;
  total: number;
  limit: number;
  shownFrom: string | null;
}

/** `n` captures one hour apart, each with its current analysis; sideband_db = the index, so a point names its row. */
async function motorWithHistory(n: number) {
  const { asset } = await makeMotor(env.db);
  const caps: { id: number }[] = await env.db.batchInsert<Record<string, unknown>, { id: number }[]>(
    "captures",
    Array.from({ length: n }, (_, i) => ({ asset_id: asset.id, taken_at: at(i), source: "upload", file_name: `c${i}.csv`, format: "csv", status: "analysed" })),
    1000,
  ).returning(["id"]);
  await env.db.batchInsert(
    "analyses",
    caps.map((c, i) => ({
      capture_id: c.id,
      asset_id: asset.id,
      version: 1,
      is_current: true,
      engine_version: "test",
      nameplate_version: 1,
      params: {},
      result: {},
      taken_at: at(i),
      sideband_db: i,
      rotor_assessable: true,
    })),
    1000,
  );
  return asset.id as number;
}

describe("GET /api/assets/:id/trend over the cap", () => {
  const EXTRA = 20;
  const N = TREND_POINT_CAP + EXTRA;
  let assetId: number;
  beforeAll(async () => {
    assetId = await motorWithHistory(N);
    // An older version of the newest capture's analysis is not a trend point.
    const newest = await env.db("analyses").where({ asset_id: assetId }).orderBy("taken_at", "desc").first();
    await env.db("analyses").insert({ ...newest, id: undefined, version: 0, is_current: false, sideband_db: -1 });
  });

  it("keeps the newest points, oldest first, and says it left older ones out", async () => {
    const agent = await signedIn(env.app, "manager");
    const res = await agent.get(`/api/assets/${assetId}/trend`);
    expect(res.status).toBe(200);
    const body = res.body as TrendAnswer;
    expect(body.points).toHaveLength(TREND_POINT_CAP);
    expect(body).toMatchObject({ truncated: true, total: N, limit: TREND_POINT_CAP });
    // The EXTRA oldest (0 … 19) are the ones left out; the newest (N − 1) is there.
    expect(body.points[0].sidebandDb).toBe(EXTRA);
    expect(body.points.at(-1)!.sidebandDb).toBe(N - 1);
    expect(body.shownFrom).toBe(at(EXTRA));
    expect(body.points[0].takenAt).toBe(body.shownFrom);
    const t = body.points.map((p) => Date.parse(p.takenAt));
    expect(t.every((v, i) => i === 0 || v > t[i - 1])).toBe(true);
    expect(body.points.some((p) => p.sidebandDb === -1)).toBe(false);
  });

  it("keeps the newest of the range when `to` ends it early", async () => {
    const agent = await signedIn(env.app, "manager");
    const body = (await agent.get(`/api/assets/${assetId}/trend`).query({ to: at(N - 11) })).body as TrendAnswer;
    expect(body).toMatchObject({ truncated: true, total: N - 10 });
    expect(body.points).toHaveLength(TREND_POINT_CAP);
    expect(body.points.at(-1)!.sidebandDb).toBe(N - 11);
    expect(body.points[0].sidebandDb).toBe(N - 10 - TREND_POINT_CAP);
  });

  it("answers the whole range, not truncated, when it holds no more than the cap", async () => {
    const agent = await signedIn(env.app, "manager");
    const body = (await agent.get(`/api/assets/${assetId}/trend`).query({ from: at(EXTRA) })).body as TrendAnswer;
    expect(body.points).toHaveLength(TREND_POINT_CAP);
    expect(body).toMatchObject({ truncated: false, total: TREND_POINT_CAP, shownFrom: at(EXTRA) });
    expect(body.points[0].sidebandDb).toBe(EXTRA);
    expect(body.points.at(-1)!.sidebandDb).toBe(N - 1);
  });

  it("takes a lower limit, bounded by the cap", async () => {
    const agent = await signedIn(env.app, "manager");
    const body = (await agent.get(`/api/assets/${assetId}/trend?limit=10`)).body as TrendAnswer;
    expect(body).toMatchObject({ truncated: true, total: N, limit: 10, shownFrom: at(N - 10) });
    expect(body.points.map((p) => p.sidebandDb)).toEqual(Array.from({ length: 10 }, (_, i) => N - 10 + i));
    const over = await agent.get(`/api/assets/${assetId}/trend?limit=${TREND_POINT_CAP + 1}`);
    expect(over.status).toBe(400);
    expect(over.body.fields.limit).toBe(`limit is at most ${TREND_POINT_CAP}`);
    expect((await agent.get(`/api/assets/${assetId}/trend?limit=0`)).body.fields.limit).toBeTruthy();
  });
});

describe("GET /api/assets/:id/trend under the cap", () => {
  it("answers every point, oldest first, not truncated", async () => {
    const assetId = await motorWithHistory(3);
    const agent = await signedIn(env.app, "technician");
    const body = (await agent.get(`/api/assets/${assetId}/trend`)).body as TrendAnswer;
    expect(body).toMatchObject({ truncated: false, total: 3, limit: TREND_POINT_CAP, shownFrom: at(0) });
    expect(body.points.map((p) => p.sidebandDb)).toEqual([0, 1, 2]);
    // A date alone takes in the whole day (UTC); a date-time is an instant, both ends included.
    expect((await agent.get(`/api/assets/${assetId}/trend?from=${at(1)}&to=${at(1)}`)).body.points.map((p: { sidebandDb: number }) => p.sidebandDb)).toEqual([1]);
    expect((await agent.get(`/api/assets/${assetId}/trend?to=2026-01-01`)).body.total).toBe(3);
    expect((await agent.get(`/api/assets/${assetId}/trend?from=2026-01-02`)).body).toMatchObject({ points: [], total: 0, truncated: false, shownFrom: null });
  });

  it("refuses a bad date, a reversed range and a parameter it does not take, naming the field", async () => {
    const { asset } = await makeMotor(env.db);
    const agent = await signedIn(env.app, "manager");
    const bad = await agent.get(`/api/assets/${asset.id}/trend?from=yesterday`);
    expect(bad.status).toBe(400);
    expect(bad.body.fields.from).toMatch(/Use a date/);
    const reversed = await agent.get(`/api/assets/${asset.id}/trend?from=2026-03-01&to=2026-02-01`);
    expect(reversed.status).toBe(400);
    expect(reversed.body.fields.to).toMatch(/before from/);
    const unknown = await agent.get(`/api/assets/${asset.id}/trend?since=2026-01-01`);
    expect(unknown.status).toBe(400);
    expect(unknown.body.fields).toEqual({ since: 'Unknown field "since".' });
    expect((await agent.get(`/api/assets/99999999/trend`)).status).toBe(404);
  });
});
