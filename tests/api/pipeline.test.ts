import { afterAll, beforeAll, describe, expect, it } from "vitest";
import pg from "pg";
import { inject } from "vitest";
import { signedIn } from "../helpers/context.ts";
import { captureFile, makeMotor, makePipelineEnv, startWorker, waitFor, type PipelineEnv, type WorkerProcess } from "../helpers/pipeline.ts";
import { storeCaptureAndQueue } from "../../server/captures/ingest.ts";
import { runAnalysisJob } from "../../server/captures/analysis-job.ts";
import { blobStoreOf } from "../../server/blob/index.ts";
import analysisTask from "../../workers/analysis-task.ts";
import { clearSignalCaches } from "../../server/captures/signal-views.ts";
import { computeFullSpectrum, spectrumBlobKey } from "../../server/captures/spectrum-store.ts";
import { parseCapture } from "../../src/engine/parse/index.ts";

// End to end with a real worker process: upload → queued → analysing → analysed → trend point and findings;
// failures, requeue, re-analysis after a nameplate change, and a worker killed in the middle of a job.
let env: PipelineEnv;
let worker: WorkerProcess;
const events: { event: string; payload: Record<string, unknown> }[] = [];
let listener: pg.Client;

beforeAll(async () => {
  // Short expiry and retry delay so a job of a killed worker comes back within seconds.
  env = await makePipelineEnv({}, { expireInSeconds: 2, retryLimit: 2, retryDelay: 1, retryBackoff: false });
  worker = startWorker({ BARHOUND_MAINTENANCE_S: "1" }, env.dataDir);
  listener = new pg.Client({ connectionString: inject("databaseUrl") });
  await listener.connect();
  listener.on("notification", (n) => events.push(JSON.parse(n.payload!)));
  await listener.query("listen barhound_events");
  await worker.ready;
}, 60_000);
afterAll(async () => {
  await worker?.stop("SIGKILL");
  await listener?.end();
  await env?.close();
});

const statusOf = async (id: number) => (await env.db("captures").where({ id }).first("status")).status as string;
const waitStatus = (id: number, status: string, ms = 20_000) => waitFor(async () => (await statusOf(id)) === status, ms, `capture ${id} ${status}`);

async function upload(assetId: number, file: Buffer, takenAt: string, name = "cap.csv") {
  const agent = await signedIn(env.app, "technician");
  const res = await agent.post("/api/captures").field("assetId", String(assetId)).field("takenAt", takenAt).attach("file", file, name);
  expect(res.status).toBe(202);
  return res.body.captures[0].id as number;
}

describe("capture pipeline", () => {
  let assetId: number;
  let firstId: number;

  it("upload → queued → analysed, with the analysis in GET /captures/:id and a trend point", async () => {
    assetId = (await makeMotor(env.db)).asset.id;
    firstId = await upload(assetId, captureFile({ sidebandDb: 62, seed: 11 }), "2026-11-01T08:00:00Z");
    await waitStatus(firstId, "analysed");
    const agent = await signedIn(env.app, "manager");
    const cap = (await agent.get(`/api/captures/${firstId}`)).body;
    expect(cap.status).toBe("analysed");
    expect(cap.analysis).toMatchObject({ version: 1, engineVersion: expect.any(String) });
    expect(cap.analysis.supplyHz).toBeCloseTo(50, 1);
    expect(cap.analysis.brokenBar.grade).toBe("R1");
    const trend = (await agent.get(`/api/assets/${assetId}/trend`)).body.points;
    expect(trend).toHaveLength(1);
    expect(trend[0]).toMatchObject({ captureId: firstId, rotorGrade: "R1", supplyHz: expect.any(Number) });
    expect(trend[0].sidebandDb).toBeGreaterThan(54);
    const asset = (await agent.get(`/api/assets/${assetId}`)).body;
    expect(asset.latest).toMatchObject({ captureId: firstId, rotorGrade: "R1" });
    // the list carries the current analysis's headline readings (the motor page's capture history shows them)
    const listed = (await agent.get("/api/captures").query({ assetId })).body;
    expect(listed.total).toBe(1);
    expect(listed.items[0].readings).toMatchObject({ rotorGrade: "R1", rotorAssessable: true, sidebandDb: trend[0].sidebandDb, loadPct: trend[0].loadPct });
    expect(await env.db("findings").where({ asset_id: assetId }).count({ n: "*" })).toEqual([{ n: "0" }]);
    const statuses = events.filter((e) => e.event === "capture:status" && e.payload.id === firstId).map((e) => e.payload.status);
    expect(statuses).toEqual(expect.arrayContaining(["analysing", "analysed"]));
  });

  it("a worse rotor grade raises one finding with a readable summary and a finding:new event", async () => {
    const id = await upload(assetId, captureFile({ brokenBars: 3, seed: 12 }), "2026-11-08T08:00:00Z");
    await waitStatus(id, "analysed");
    const agent = await signedIn(env.app, "analyst");
    const list = (await agent.get(`/api/findings?assetId=${assetId}`)).body;
    expect(list.total).toBe(1);
    const f = list.items[0];
    expect(f).toMatchObject({ kind: "rotor", previousLevel: "R1", status: "open", captureId: id });
    expect(["R4", "R5"]).toContain(f.level);
    expect(f.summary).toMatch(/Rotor grade R[45] .*dB below the supply line.*was R1/);
    await waitFor(async () => events.some((e) => e.event === "finding:new" && e.payload.id === f.id), 5000, "finding:new");
    // Same grade again: no new finding.
    const again = await upload(assetId, captureFile({ brokenBars: 3, seed: 13 }), "2026-11-09T08:00:00Z");
    await waitStatus(again, "analysed");
    expect((await agent.get(`/api/findings?assetId=${assetId}`)).body.total).toBe(1);
    const review = (await agent.get(`/api/review`)).body;
    expect(review.items.some((i: { captureId: number }) => i.captureId === id)).toBe(true);
  });

  it("a file that cannot be analysed ends failed with the reason; fixed and requeued it is analysed", async () => {
    const stored = await storeCaptureAndQueue(env.ctx, {
      assetId,
      takenAt: "2026-11-10T08:00:00Z",
      source: "stream",
      fileName: "stream.csv",
      format: "csv",
      bytes: Buffer.from("Ia\n1\n2\n"),
    });
    await waitStatus(stored.id, "failed");
    const agent = await signedIn(env.app, "analyst");
    const cap = (await agent.get(`/api/captures/${stored.id}`)).body;
    expect(cap.error).toMatch(/sample/i);
    expect(cap.analysis).toBeNull();
    // Replace the recording, then requeue.
    const row = await env.db("captures").where({ id: stored.id }).first();
    await blobStoreOf(env.ctx).put(row.blob_key, captureFile({ seed: 14 }));
    await env.db("captures").where({ id: stored.id }).update({ sample_rate: null });
    expect((await (await signedIn(env.app, "technician")).post(`/api/captures/${stored.id}/requeue`)).status).toBe(403);
    const rq = await agent.post(`/api/captures/${stored.id}/requeue`);
    expect(rq.status).toBe(202);
    await waitStatus(stored.id, "analysed");
    expect(await env.db("analyses").where({ capture_id: stored.id }).count({ n: "*" })).toEqual([{ n: "1" }]);
  });

  it("a nameplate change bumps nameplateVersion; re-analysis writes version 2 and keeps version 1", async () => {
    const admin = await signedIn(env.app, "admin");
    const before = (await admin.get(`/api/assets/${assetId}`)).body.nameplateVersion;
    const patched = await admin.patch(`/api/assets/${assetId}`).send({ ratedRpm: 1460 });
    expect(patched.status).toBe(200);
    expect(patched.body.nameplateVersion).toBe(before + 1);
    expect((await admin.patch(`/api/assets/${assetId}`).send({ name: "Renamed pump" })).body.nameplateVersion).toBe(before + 1);
    expect((await (await signedIn(env.app, "technician")).post(`/api/assets/${assetId}/reanalyse`)).status).toBe(403);
    const analyst = await signedIn(env.app, "analyst");
    const rq = await analyst.post(`/api/assets/${assetId}/reanalyse`);
    expect(rq.status).toBe(202);
    expect(rq.body.queued).toBeGreaterThanOrEqual(4);
    await waitFor(async () => {
      const rows = await env.db("analyses").where({ capture_id: firstId }).orderBy("version");
      return rows.length === 2 && rows[1].is_current && (await statusOf(firstId)) === "analysed";
    }, 30_000, "re-analysis");
    const rows = await env.db("analyses").where({ capture_id: firstId }).orderBy("version");
    expect(rows.map((r) => [r.version, r.is_current, r.nameplate_version])).toEqual([
      [1, false, before],
      [2, true, before + 1],
    ]);
    const cap = (await analyst.get(`/api/captures/${firstId}`)).body;
    expect(cap.analysis.version).toBe(2);
    // No finding twice for the same capture on re-analysis.
    await waitFor(async () => (await env.db("captures").where({ asset_id: assetId }).whereNot({ status: "analysed" })).length === 0, 30_000, "all analysed");
    expect((await analyst.get(`/api/findings?assetId=${assetId}`)).body.total).toBe(1);
  });

  it("spectrum and waveform of a capture: decimated min/max, full resolution in a narrow window", async () => {
    const agent = await signedIn(env.app, "technician");
    const s = (await agent.get(`/api/captures/${firstId}/spectrum?buckets=500`)).body;
    expect(s).toMatchObject({ channel: "Ia", unit: "dB", decimated: true });
    expect(s.hz).toHaveLength(500);
    expect(Math.max(...s.max)).toBeCloseTo(0, 0); // the supply line is the 0 dB reference
    const narrow = (await agent.get(`/api/captures/${firstId}/spectrum?fmin=45&fmax=55&buckets=2000`)).body;
    expect(narrow.decimated).toBe(false);
    expect(narrow.hz[1] - narrow.hz[0]).toBeLessThanOrEqual(0.13);
    expect(narrow.min).toEqual(narrow.max);
    const w = (await agent.get(`/api/captures/${firstId}/waveform?from=0&to=1&buckets=200`)).body;
    expect(w).toMatchObject({ unit: "A", decimated: true });
    expect(w.t).toHaveLength(200);
    expect((await agent.get(`/api/captures/${firstId}/spectrum?channel=nope`)).status).toBe(400);
  });

  it("the worker stores each channel's full spectrum; the spectrum route answers from it without the recording", async () => {
    const id = await upload((await makeMotor(env.db)).asset.id, captureFile({ seed: 15, phases: 3, vibration: { unit: "m/s2", axis: "H" } }), "2026-11-11T08:00:00Z", "two-kinds.csv");
    await waitStatus(id, "analysed");
    const row = await env.db("captures").where({ id }).first();
    const blob = blobStoreOf(env.ctx);
    const parsed = parseCapture(await blob.get(row.blob_key), { fileName: "two-kinds.csv" });
    expect(parsed.channels.map((c) => c.kind)).toEqual(["current", "current", "current", "vibration"]);
    const stored = await blob.list(`${row.blob_key}.spectrum/`);
    expect(stored).toEqual(parsed.channels.map((c) => spectrumBlobKey(row.blob_key, c.name)).sort());
    const agent = await signedIn(env.app, "technician");
    // A window narrow enough to come back at full resolution: every bin, so the values can be compared one by one.
    const view = async (channel: string) => (await agent.get(`/api/captures/${id}/spectrum?channel=${encodeURIComponent(channel)}&fmin=20&fmax=120&buckets=20000`)).body;
    const expected = new Map(
      parsed.channels.map((c) => {
        const s = computeFullSpectrum(c, parsed.sampleRate);
        const k0 = Math.ceil((20 - s.series.x0) / s.series.dx - 1e-9);
        const k1 = Math.floor((120 - s.series.x0) / s.series.dx + 1e-9);
        return [c.name, { unit: s.unit, resolutionHz: s.resolutionHz, values: Array.from(s.series.values.subarray(k0, k1 + 1)) }];
      }),
    );
    // The recording is gone: only the stored spectra can answer (a fresh server start: empty caches).
    await blob.delete(row.blob_key);
    clearSignalCaches();
    for (const c of parsed.channels) {
      const v = await view(c.name);
      expect(v).toMatchObject({ channel: c.name, unit: expected.get(c.name)!.unit, decimated: false, resolutionHz: expected.get(c.name)!.resolutionHz });
      expect(v.max).toEqual(expected.get(c.name)!.values);
    }
    expect((await agent.get(`/api/captures/${id}/spectrum?kind=vibration&buckets=300`)).body).toMatchObject({ channel: parsed.channels[3].name, unit: "mm/s" });
    // Without a stored spectrum (older captures) the recording is transformed, as before: same values.
    await blob.put(row.blob_key, captureFile({ seed: 15, phases: 3, vibration: { unit: "m/s2", axis: "H" } }));
    await blob.delete(spectrumBlobKey(row.blob_key, parsed.channels[0].name));
    clearSignalCaches();
    expect((await view(parsed.channels[0].name)).max).toEqual(expected.get(parsed.channels[0].name)!.values);
  });
});

describe("exactly once", () => {
  it("a worker killed (SIGKILL) mid-analysis: after a restart the capture is analysed once", async () => {
    await worker.stop("SIGTERM");
    const slow = startWorker({ BARHOUND_TEST_ANALYSIS_DELAY_MS: "8000", BARHOUND_MAINTENANCE_S: "1" }, env.dataDir);
    await slow.ready;
    const assetId = (await makeMotor(env.db)).asset.id;
    const id = await upload(assetId, captureFile({ seed: 21 }), "2026-11-15T08:00:00Z");
    await waitStatus(id, "analysing", 10_000);
    await slow.stop("SIGKILL");
    expect(await statusOf(id)).toBe("analysing");
    worker = startWorker({ BARHOUND_MAINTENANCE_S: "1" }, env.dataDir);
    await worker.ready;
    await waitStatus(id, "analysed", 25_000);
    const rows = await env.db("analyses").where({ capture_id: id });
    expect(rows).toHaveLength(1);
    expect((await env.db("captures").where({ id }).first()).attempts).toBe(2);
  }, 45_000);

  it("two runs of the same job at once write one analysis", async () => {
    const assetId = (await makeMotor(env.db)).asset.id;
    const [row] = await env.db("captures")
      .insert({ asset_id: assetId, taken_at: new Date(), source: "upload", file_name: "twice.csv", format: "csv", blob_key: `captures/${assetId}/twice.csv`, status: "queued" })
      .returning("*");
    await blobStoreOf(env.ctx).put(row.blob_key, captureFile({ seed: 31 }));
    const deps = { db: env.db, blob: blobStoreOf(env.ctx), runTask: async (i: Parameters<typeof analysisTask>[0]) => analysisTask(i) };
    const outcomes = await Promise.all([1, 2, 3].map(() => runAnalysisJob(deps, { captureId: row.id, version: 1 }, { retryCount: 0, retryLimit: 2 })));
    expect(outcomes.filter((o) => o === "analysed")).toHaveLength(1);
    expect(await env.db("analyses").where({ capture_id: row.id })).toHaveLength(1);
    expect(await statusOf(row.id)).toBe("analysed");
  });
});
