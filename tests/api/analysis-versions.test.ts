import { describe, expect, it } from "vitest";
import request from "supertest";
import { signedIn } from "../helpers/context.ts";
import { captureFile, makeMotor, waitFor, pipelineWithWorker } from "../helpers/pipeline.ts";
import { ROLES } from "../../server/permissions.ts";

// Analysis versions of a capture: after a nameplate fix and a re-analysis by a real worker, both versions are
// listed (newest first, the current one marked) with the nameplate each used and their readings, and the older
// full result can still be read.
const pipe = pipelineWithWorker();

const statusOf = async (id: number) => (await pipe.env.db("captures").where({ id }).first("status")).status as string;

describe("analysis versions of a capture", () => {
  let assetId: number;
  let captureId: number;
  let otherCaptureId: number;
  let v1Id: number;
  let v1Detail: Record<string, unknown>;

  it("one version before any re-analysis: the list holds it, current, with its readings", async () => {
    // A 4-pole 50 Hz motor at 1455 rpm full load (nameplate slip 3 %); the capture runs at 3 % slip.
    assetId = (await makeMotor(pipe.env.db, { rated_rpm: 1455 })).asset.id;
    const tech = await signedIn(pipe.env.app, "technician");
    const up = await tech
      .post("/api/captures")
      .field("assetId", String(assetId))
      .field("takenAt", "2026-11-01T08:00:00Z")
      .attach("file", captureFile({ sidebandDb: 62, seed: 21 }), "v.csv")
      .attach("file", captureFile({ sidebandDb: 62, seed: 22 }), "w.csv");
    expect(up.status).toBe(202);
    [captureId, otherCaptureId] = up.body.captures.map((c: { id: number }) => c.id);
    await waitFor(async () => (await statusOf(captureId)) === "analysed" && (await statusOf(otherCaptureId)) === "analysed", 30_000, "first analyses");

    const viewer = await signedIn(pipe.env.app, "manager");
    const res = await viewer.get(`/api/captures/${captureId}/analyses`);
    expect(res.status).toBe(200);
    expect(res.body.items).toHaveLength(1);
    const [v1] = res.body.items;
    expect(v1).toMatchObject({ version: 1, isCurrent: true, engineVersion: expect.any(String), nameplateVersion: 1, rotorGrade: "R1", rotorAssessable: true, rotorReason: null });
    expect(v1.params.nameplate).toMatchObject({ ratedRpm: 1455, poles: 4 });
    expect(v1.supplyHz).toBeCloseTo(50, 1);
    expect(v1.slip).toBeCloseTo(0.03, 2);
    for (const k of ["rpm", "loadPct", "sidebandDb"]) expect(typeof v1[k], k).toBe("number");
    expect(v1).toHaveProperty("vibrationRms", null); // a current-only capture
    expect(v1).toHaveProperty("vibrationZone", null);
    expect(Date.parse(v1.createdAt)).not.toBeNaN();
    v1Id = v1.id;
    v1Detail = (await viewer.get(`/api/captures/${captureId}`)).body.analysis;
  });

  it("the single-version route answers the same shape as the capture detail's analysis", async () => {
    const res = await (await signedIn(pipe.env.app, "technician")).get(`/api/captures/${captureId}/analyses/${v1Id}`);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ ...v1Detail, isCurrent: true });
  });

  it("after a nameplate fix and a re-analysis: both versions, newest first, the current flag moved, readings differ", async () => {
    const admin = await signedIn(pipe.env.app, "admin");
    // The nameplate's full-load speed was misread: 1440 rpm (slip 4 %), so the slip-method load changes.
    const patched = await admin.patch(`/api/assets/${assetId}`).send({ ratedRpm: 1440 });
    expect(patched.status).toBe(200);
    expect(patched.body.nameplateVersion).toBe(2);
    const rq = await (await signedIn(pipe.env.app, "analyst")).post(`/api/assets/${assetId}/reanalyse`);
    expect(rq.status).toBe(202);
    await waitFor(async () => {
      const rows = await pipe.env.db("analyses").where({ capture_id: captureId, is_current: true }).first("version");
      return rows?.version === 2 && (await statusOf(captureId)) === "analysed";
    }, 30_000, "re-analysis");

    const viewer = await signedIn(pipe.env.app, "planner");
    const res = await viewer.get(`/api/captures/${captureId}/analyses`);
    expect(res.status).toBe(200);
    const items = res.body.items;
    expect(items.map((v: { version: number; isCurrent: boolean; nameplateVersion: number }) => [v.version, v.isCurrent, v.nameplateVersion])).toEqual([
      [2, true, 2],
      [1, false, 1],
    ]);
    const [v2, v1] = items;
    expect(v1.id).toBe(v1Id);
    expect(v2.params.nameplate.ratedRpm).toBe(1440);
    expect(v1.params.nameplate.ratedRpm).toBe(1455);
    // Same recording, same measured slip; the load from slip ÷ nameplate slip is lower against the larger rated slip.
    expect(v2.slip).toBeCloseTo(v1.slip, 6);
    expect(v2.loadPct).toBeLessThan(v1.loadPct);
    expect(v1.loadPct / v2.loadPct).toBeCloseTo(4 / 3, 1);

    // The capture detail agrees: its current analysis is v2, its version list names both.
    const cap = (await viewer.get(`/api/captures/${captureId}`)).body;
    expect(cap.analysis).toMatchObject({ id: v2.id, version: 2, loadPct: v2.loadPct });
    expect(cap.analyses.map((a: { id: number }) => a.id).sort()).toEqual([v1.id, v2.id].sort());
  });

  it("the old version's full result is still there, no longer current; the new one is the detail's analysis", async () => {
    const viewer = await signedIn(pipe.env.app, "technician");
    const old = await viewer.get(`/api/captures/${captureId}/analyses/${v1Id}`);
    expect(old.status).toBe(200);
    expect(old.body).toEqual({ ...v1Detail, isCurrent: false });
    expect(old.body.brokenBar.grade).toBe("R1");
    expect(Array.isArray(old.body.markers)).toBe(true);

    const cap = (await viewer.get(`/api/captures/${captureId}`)).body;
    const cur = await viewer.get(`/api/captures/${captureId}/analyses/${cap.analysis.id}`);
    expect(cur.status).toBe(200);
    expect(cur.body).toEqual({ ...cap.analysis, isCurrent: true });
    expect(cur.body.loadPct).not.toBe(old.body.loadPct);
  });

  it("404s: unknown capture, a malformed id, an analysis of another capture, an unknown analysis", async () => {
    const viewer = await signedIn(pipe.env.app, "manager");
    for (const path of ["/api/captures/999999/analyses", "/api/captures/abc/analyses", "/api/captures/999999/analyses/1", `/api/captures/999999/analyses/${v1Id}`]) {
      const res = await viewer.get(path);
      expect(res.status, path).toBe(404);
      expect(res.body, path).toMatchObject({ error: "No such capture.", code: "not-found" });
    }
    const otherV = await pipe.env.db("analyses").where({ capture_id: otherCaptureId }).first("id");
    for (const path of [`/api/captures/${otherCaptureId}/analyses/${v1Id}`, `/api/captures/${captureId}/analyses/${otherV.id}`, `/api/captures/${captureId}/analyses/999999`, `/api/captures/${captureId}/analyses/x`]) {
      const res = await viewer.get(path);
      expect(res.status, path).toBe(404);
      expect(res.body, path).toMatchObject({ error: "No such analysis of this capture.", code: "not-found" });
    }
    // A capture that exists but has no analysis yet: an empty list, not a 404.
    const [bare] = await pipe.env.db("captures")
      .insert({ asset_id: assetId, taken_at: new Date(), source: "upload", file_name: "never.csv", format: "csv", status: "received" })
      .returning("id");
    expect((await viewer.get(`/api/captures/${bare.id}/analyses`)).body).toEqual({ items: [] });
  });

  it("every role reads analyses as it reads a capture (fleet.read); no session gets 401", async () => {
    for (const role of ROLES) {
      const agent = await signedIn(pipe.env.app, role);
      expect((await agent.get(`/api/captures/${captureId}`)).status, role).toBe(200);
      expect((await agent.get(`/api/captures/${captureId}/analyses`)).status, role).toBe(200);
      expect((await agent.get(`/api/captures/${captureId}/analyses/${v1Id}`)).status, role).toBe(200);
    }
    expect((await request(pipe.env.app).get(`/api/captures/${captureId}/analyses`)).status).toBe(401);
    expect((await request(pipe.env.app).get(`/api/captures/${captureId}/analyses/${v1Id}`)).status).toBe(401);
  });
});
