import { beforeAll, describe, expect, it } from "vitest";
import { signedIn } from "../helpers/context.ts";
import { captureFile, makeMotor, waitFor, pipelineWithWorker } from "../helpers/pipeline.ts";
import { storeCapturesAndQueue } from "../../server/captures/ingest.ts";
import { modelReading, type MotorModelInput } from "../../src/engine/motor-model/index.ts";

// A motor's measured model (PUT / DELETE /api/assets/:id/motor-model) with a real worker: the nameplate estimate
// first, with each value's source; operating points at their measured current (CT ratio applied) and flagged when
// the current is far from the model's; measured circuit values saved, the captures re-analysed with them; the test
// readings turned into a circuit; validation, refusals by role, back to the estimate.
const pipe = pipelineWithWorker();

const analysedAt = (ids: number[], version: number) =>
  waitFor(async () => (await pipe.env.db("captures").whereIn("id", ids).where({ status: "analysed", analysis_version: version })).length === ids.length, 60_000, `analyses v${version}`);
const currentAnalyses = async (ids: number[]) =>
  new Map((await pipe.env.db("analyses").whereIn("capture_id", ids).where({ is_current: true }).select("capture_id", "version", "slip", "result", "params")).map((a) => [a.capture_id as number, a]));

describe("a motor's measured model", () => {
  let assetId: number;
  let ids: { normal: number; high: number; secondary: number };
  let estimateParams: MotorModelInput["params"];

  beforeAll(async () => {
    // 11 kW, 400 V, 20 A, 1455 rpm, 4 poles, 50 Hz: the captures run at the rated slip 0.03.
    const { asset } = await makeMotor(pipe.env.db);
    assetId = asset.id;
    const [point] = await pipe.env.db("measurement_points").insert({ asset_id: assetId, name: "Feeder CT", kind: "current", position: "A", unit: "A", ct_ratio: 100 }).returning("id");
    const at = (d: number) => new Date(Date.UTC(2026, 10, d, 8));
    const stored = await storeCapturesAndQueue(pipe.env.ctx, [
      { assetId, takenAt: at(1), source: "upload", fileName: "normal.csv", format: "csv", bytes: captureFile({ seed: 21, currentRmsA: 20 }) },
      // Far more current than the model draws at this slip: the point must be flagged.
      { assetId, takenAt: at(2), source: "upload", fileName: "high.csv", format: "csv", bytes: captureFile({ seed: 22, currentRmsA: 45 }) },
      // The CT secondary: 0.2 A for 20 A on a 100 : 1 transformer.
      { assetId, takenAt: at(3), source: "upload", fileName: "secondary.csv", format: "csv", bytes: captureFile({ seed: 23, currentRmsA: 0.2 }), measurementPointId: point.id },
    ]);
    ids = { normal: stored[0].id, high: stored[1].id, secondary: stored[2].id };
    await analysedAt(Object.values(ids), 1);
  }, 90_000);

  it("starts from the nameplate estimate: each value with its source and basis, the analyses carry the model's load", async () => {
    const res = await (await signedIn(pipe.env.app, "technician")).get(`/api/assets/${assetId}/motor-model`);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ origin: "nameplate-estimate", measured: null, currentTolerancePct: 25 });
    estimateParams = res.body.input.params;
    const names = res.body.circuit.map((c: { name: string }) => c.name);
    expect(names).toEqual(["r1", "x1", "r2", "x2", "xm", "rc", "rotorLockedR2", "rotorLockedX2", "rotationalLossW"]);
    for (const c of res.body.circuit) {
      expect(c.source, c.name).toBe("nameplate estimate");
      expect(c.basis.length, c.name).toBeGreaterThan(10);
      expect(c.value, c.name).toBeGreaterThan(0);
    }
    expect(res.body.circuit.find((c: { name: string }) => c.name === "r2").basis).toMatch(/rated 11 kW/);

    const an = await currentAnalyses(Object.values(ids));
    for (const id of Object.values(ids)) {
      const a = an.get(id)!;
      expect(a.result.engineVersion).toBe("1.2.0");
      expect(a.params.motorModel).toEqual({ source: "nameplate-estimate" });
      expect(a.result.model).toMatchObject({ source: "nameplate-estimate", slipMethodLoadPct: expect.any(Number) });
      // At the rated slip the estimate reads full load, like the slip method.
      expect(a.result.model.loadPct).toBeGreaterThan(90);
      expect(a.result.model.loadPct).toBeLessThan(110);
    }
  });

  it("places the operating points at their measured current (CT ratio applied) and flags the one far from the model", async () => {
    const { operatingPoints: ops } = (await (await signedIn(pipe.env.app, "manager")).get(`/api/assets/${assetId}/motor-model`)).body;
    expect(ops.map((o: { captureId: number }) => o.captureId)).toEqual([ids.normal, ids.high, ids.secondary]);
    const [normal, high, secondary] = ops;
    expect(normal.currentA).toBeCloseTo(20, 0);
    expect(normal.modelCurrentA).toBeGreaterThan(17);
    expect(normal.modelCurrentA).toBeLessThan(23);
    expect(normal.flags).toEqual([]);
    expect(high.currentA).toBeCloseTo(45, 0);
    expect(high.currentRatio).toBeGreaterThan(1.9);
    expect(high.flags.map((f: { code: string }) => f.code)).toEqual(["current-mismatch"]);
    expect(high.flags[0].message).toMatch(/Measured current 45\.\d A is \+\d+ % from the model's/);
    expect(secondary.currentA).toBeCloseTo(20, 0);
    expect(secondary.flags).toEqual([]);
    // The stored result says the same.
    const an = await currentAnalyses([ids.high, ids.secondary]);
    expect(an.get(ids.high)!.result.model.flags.map((f: { code: string }) => f.code)).toEqual(["current-mismatch"]);
    expect(an.get(ids.secondary)!.result.model.measuredCurrentA).toBeCloseTo(20, 0);
  });

  it("refuses bodies it cannot use, with a message on each field", async () => {
    const admin = await signedIn(pipe.env.app, "admin");
    const put = (body: unknown) => admin.put(`/api/assets/${assetId}/motor-model`).send(body as object);
    const none = await put({});
    expect(none.status).toBe(400);
    expect(none.body.fields.method).toMatch(/circuit .* or tests/);
    const circuit = await put({ method: "circuit", r1: 0.5, x1: -1, xm: 20, rotationalLossW: 100, colour: "red" });
    expect(circuit.status).toBe(400);
    expect(circuit.body.fields).toEqual({ x1: "Must be ≥ 0 Ω.", r2: "Enter R2.", x2: "Enter X2.", colour: 'Unknown field "colour".' });
    const tests = await put({ method: "tests", noLoad: { I: 8, P: 600, f: 50 }, lockedRotor: { V: 80, I: 20, P: -5, f: 12.5 }, designLetter: "E" });
    expect(tests.status).toBe(400);
    expect(tests.body.fields).toEqual({ "noLoad.V": "Enter the voltage.", "lockedRotor.P": "Must be ≥ 0 W.", designLetter: "A, B, C, D or wound" });
    // Well-formed but impossible: more power than √3·V·I.
    const impossible = await put({ method: "tests", noLoad: { V: 400, I: 8, P: 9000, f: 50 }, lockedRotor: { V: 80, I: 20, P: 1500, f: 12.5 }, designLetter: "B" });
    expect(impossible.status).toBe(422);
    expect(impossible.body.error).toMatch(/exceeds/);
    expect((await admin.put(`/api/assets/999999/motor-model`).send({ method: "circuit", r1: 0.5, x1: 1, r2: 0.4, x2: 1.5, xm: 30, rotationalLossW: 100 })).status).toBe(404);
    expect((await pipe.env.db("assets").where({ id: assetId }).first("motor_model")).motor_model).toBeNull();
  });

  it("lets only those who may edit motors save or clear it", async () => {
    const body = { method: "circuit", r1: 0.5, x1: 1, r2: 0.4, x2: 1.5, xm: 30, rotationalLossW: 100 };
    for (const role of ["technician", "analyst", "planner", "manager"] as const) {
      const agent = await signedIn(pipe.env.app, role);
      expect((await agent.put(`/api/assets/${assetId}/motor-model`).send(body)).status, role).toBe(403);
      expect((await agent.delete(`/api/assets/${assetId}/motor-model`)).status, role).toBe(403);
    }
    expect((await pipe.env.db("assets").where({ id: assetId }).first("motor_model")).motor_model).toBeNull();
  });

  it("saves measured circuit values: the source changes, and the re-analysed captures carry the measured circuit's load", async () => {
    const admin = await signedIn(pipe.env.app, "admin");
    // A rotor resistance 25 % above the estimate's: at the same slip the motor delivers about a fifth less.
    const p = estimateParams;
    const circuit = { r1: p.r1, x1: p.x1, r2: p.r2 * 1.25, x2: p.x2, xm: p.xm, rc: p.rc, rotationalLossW: 240 };
    const res = await admin.put(`/api/assets/${assetId}/motor-model?reanalyse=1`).send({ method: "circuit", ...circuit });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ origin: "measured", queued: 3, measured: { method: "circuit", savedBy: { name: expect.any(String) } }, assumptions: [] });
    expect(res.body.circuit.map((c: { name: string; source: string }) => [c.name, c.source])).toEqual([
      ["r1", "entered"], ["x1", "entered"], ["r2", "entered"], ["x2", "entered"], ["xm", "entered"], ["rc", "entered"], ["rotationalLossW", "entered"],
    ]);
    expect(res.body.input).toMatchObject({ lineVoltage: 400, frequencyHz: 50, poles: 4, connection: "star", rotationalLossW: 240 });
    const audit = await pipe.env.db("audit_log").where({ action: "asset.motor-model.saved", subject_id: String(assetId) }).first();
    expect(audit.details).toMatchObject({ method: "circuit", replaced: false, params: { r2: circuit.r2 } });

    await analysedAt(Object.values(ids), 2);
    const measuredInput: MotorModelInput = res.body.input;
    const an = await currentAnalyses(Object.values(ids));
    for (const id of Object.values(ids)) {
      const a = an.get(id)!;
      expect(a.version).toBe(2);
      expect(a.params.motorModel).toMatchObject({ source: "measured", method: "circuit" });
      const expected = modelReading({ input: measuredInput, source: "measured", ratedOutputW: 11_000 }, { slip: a.slip, supplyHz: a.result.supplyHz });
      expect(a.result.model.source).toBe("measured");
      expect(a.result.model.loadPct).toBeCloseTo(expected.loadPct!, 1);
      expect(a.result.model.loadPct).toBeLessThan(90);
      // The slip method does not know the circuit: it still reads full load, and the two are this far apart.
      expect(a.result.model.apartPct).toBeCloseTo(a.result.model.loadPct - a.result.model.slipMethodLoadPct, 1);
    }
    // The motor page follows the measured circuit.
    const ops = (await admin.get(`/api/assets/${assetId}/motor-model`)).body.operatingPoints;
    expect(ops[0].loadPct).toBeCloseTo(an.get(ids.normal)!.result.model.loadPct, 1);
  }, 90_000);

  it("turns no-load and locked-rotor readings into the circuit, naming the test behind each value", async () => {
    const admin = await signedIn(pipe.env.app, "admin");
    const body = {
      method: "tests",
      noLoad: { V: 400, I: 7.2, P: 520, f: 50 },
      lockedRotor: { V: 72, I: 20, P: 1250, f: 12.5 },
      statorResistanceDc: 0.55,
      designLetter: "B",
    };
    const res = await admin.put(`/api/assets/${assetId}/motor-model`).send(body);
    expect(res.status).toBe(200);
    expect(res.body.queued).toBeUndefined();
    expect(res.body.measured).toMatchObject({ method: "tests", entered: body });
    const source = Object.fromEntries(res.body.circuit.map((c: { name: string; source: string }) => [c.name, c.source]));
    expect(source).toEqual({ r1: "entered", x1: "locked-rotor test", r2: "locked-rotor test", x2: "locked-rotor test", xm: "no-load test", rc: "no-load test", rotationalLossW: "no-load test" });
    expect(res.body.circuit.find((c: { name: string }) => c.name === "rc").value).toBeNull();
    expect(res.body.input.params.r1).toBe(0.55);
    const audit = await pipe.env.db("audit_log").where({ action: "asset.motor-model.saved", subject_id: String(assetId) }).orderBy("id", "desc").first();
    expect(audit.details).toMatchObject({ method: "tests", replaced: true });
  });

  it("DELETE goes back to the nameplate estimate and re-analyses on request", async () => {
    const admin = await signedIn(pipe.env.app, "admin");
    const res = await admin.delete(`/api/assets/${assetId}/motor-model?reanalyse=1`);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ cleared: true, queued: 3 });
    expect((await admin.get(`/api/assets/${assetId}/motor-model`)).body.origin).toBe("nameplate-estimate");
    expect(await pipe.env.db("audit_log").where({ action: "asset.motor-model.cleared", subject_id: String(assetId) }).first()).toBeTruthy();
    await analysedAt(Object.values(ids), 3);
    const an = await currentAnalyses(Object.values(ids));
    for (const id of Object.values(ids)) expect(an.get(id)!.result.model.source).toBe("nameplate-estimate");
    // Nothing saved any more: a second DELETE changes nothing.
    expect((await admin.delete(`/api/assets/${assetId}/motor-model`)).body).toEqual({ cleared: false });
    expect((await admin.delete(`/api/assets/999999/motor-model`)).status).toBe(404);
  }, 90_000);
});
