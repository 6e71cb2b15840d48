import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeTestEnv, signedIn, type TestEnv } from "../helpers/context.ts";
import { makeMotor } from "../helpers/pipeline.ts";
import { analysisResult as result, writeAnalysed } from "../helpers/analysis-fixture.ts";
import type { AnalysisResult } from "../../src/engine/types.ts";

// The review queue's waiting clock (GET /review, raisedAt; server/reports/review-counts.ts): it counts only findings
// still without a verdict. With status=all a capture whose findings all have verdicts shows no clock, and one with a
// verdict on one finding waits since its other, open finding was raised. Each finding's verdicts come with it.
let env: TestEnv;
const analysed = (assetId: number, takenAt: string, r: AnalysisResult) => writeAnalysed(env.db, assetId, takenAt, r);
beforeAll(async () => {
  env = await makeTestEnv();
});
afterAll(async () => env?.close());



interface Item {
  captureId: number;
  raisedAt: string | null;
  findings: { id: number; kind: string; status: string; verdicts: { verdict: string; analystName: string; createdAt: string }[] }[];
}

describe("GET /review: the waiting clock counts only findings without a verdict", () => {
  let siteId: number;
  let both: { captureId: number; rotorId: number; vibrationId: number };
  let answered: { captureId: number; findingId: number };
  const EARLY = "2026-05-04T08:00:00.000Z";
  const LATE = "2026-05-06T08:00:00.000Z";

  beforeAll(async () => {
    const m = await makeMotor(env.db);
    siteId = m.site.id;
    const [other] = await env.db("assets").insert({ area_id: m.area.id, tag: `${m.asset.tag}-2`, name: "Second pump", rated_rpm: 1455, poles: 4, rated_hz: 50 }).returning("id");
    // One capture raises a rotor and a vibration finding; the rotor one (raised later) gets a verdict.
    const a = await analysed(m.asset.id, "2026-05-01T08:00:00Z", result("R3", 45, "C", 5.2));
    const rotor = a.findings.find((f) => f.kind === "rotor")!;
    const vibration = a.findings.find((f) => f.kind === "vibration")!;
    await env.db("findings").where({ id: vibration.id }).update({ created_at: EARLY });
    await env.db("findings").where({ id: rotor.id }).update({ created_at: LATE });
    both = { captureId: a.captureId, rotorId: rotor.id, vibrationId: vibration.id };
    // Another capture's only finding gets a verdict.
    const b = await analysed(other.id, "2026-05-02T08:00:00Z", result("R4", 40, null));
    answered = { captureId: b.captureId, findingId: b.findings[0].id };
    await env.db("findings").where({ id: answered.findingId }).update({ created_at: LATE });

    const analyst = await signedIn(env.app, "analyst");
    expect((await analyst.post(`/api/findings/${rotor.id}/verdict`).send({ verdict: "confirmed" })).status).toBe(200);
    expect((await analyst.post(`/api/findings/${answered.findingId}/verdict`).send({ verdict: "remeasure", note: "Load swung; again at steady load." })).status).toBe(200);
  });

  it("waiting (the default): only captures with an open finding, the clock from that finding", async () => {
    const analyst = await signedIn(env.app, "analyst");
    const res = await analyst.get(`/api/review?siteId=${siteId}`);
    expect(res.status).toBe(200);
    expect(res.body.total).toBe(1);
    const [item] = res.body.items as Item[];
    expect(item.captureId).toBe(both.captureId);
    expect(item.findings.map((f) => f.id)).toEqual([both.vibrationId]);
    expect(item.raisedAt).toBe(EARLY);
  });

  it("all, with verdicts: the clock ignores findings that have a verdict, and stops when every one has", async () => {
    const analyst = await signedIn(env.app, "analyst");
    const res = await analyst.get(`/api/review?siteId=${siteId}&status=all`);
    expect(res.status).toBe(200);
    expect(res.body.total).toBe(2);
    const byCapture = new Map((res.body.items as Item[]).map((i) => [i.captureId, i]));
    const mixed = byCapture.get(both.captureId)!;
    expect(mixed.raisedAt).toBe(EARLY); // not LATE: the later finding has its verdict
    expect(mixed.findings.map((f) => [f.id, f.status, f.verdicts.map((v) => v.verdict)])).toEqual(
      expect.arrayContaining([
        [both.rotorId, "confirmed", ["confirmed"]],
        [both.vibrationId, "open", []],
      ]),
    );
    const done = byCapture.get(answered.captureId)!;
    expect(done.raisedAt).toBeNull();
    expect(done.findings).toMatchObject([{ id: answered.findingId, status: "remeasure", verdicts: [{ verdict: "remeasure", analystName: "Tobias Renn", createdAt: expect.any(String) }] }]);
  });

  it("sorting by the clock puts captures that no longer wait last, either way", async () => {
    const analyst = await signedIn(env.app, "analyst");
    for (const sort of ["raisedAt", "-raisedAt"]) {
      const items = (await analyst.get(`/api/review?siteId=${siteId}&status=all&sort=${sort}`)).body.items as Item[];
      expect(items.map((i) => i.captureId), sort).toEqual([both.captureId, answered.captureId]);
    }
  });
});
