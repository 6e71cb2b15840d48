// Motor model API, against the router alone (no database): the Chapman, *Electric Machinery Fundamentals*
// 4th ed., Example 7-5 / 7-6 circuit (figures from memory, as in the domain sheet §5).

import { describe, expect, it } from "vitest";
import express from "express";
import request from "supertest";
import { motorModelRouter } from "../../server/routes/motor-model.ts";

const app = express().use(express.json()).use("/api/motor-model", motorModelRouter());

/** Chapman Ex. 7-5: 460 V, 60 Hz, 4-pole, Y; R1 0.641, X1 1.106, R2 0.332, X2 0.464, Xm 26.3 Ω; 1100 W rotational. */
const chapman = { lineVoltage: 460, frequencyHz: 60, poles: 4, connection: "star", r1: 0.641, x1: 1.106, r2: 0.332, x2: 0.464, xm: 26.3, rotationalLossW: 1100 };
const { r1, x1, r2, x2, xm, ...ratings } = chapman;
const chapmanNested = { ...ratings, params: { r1, x1, r2, x2, xm } };

describe("POST /api/motor-model/evaluate with a slip", () => {
  it("returns the Chapman Ex. 7-5 operating point at s = 0.022", async () => {
    const res = await request(app).post("/api/motor-model/evaluate").send({ ...chapman, slip: 0.022 });
    expect(res.status).toBe(200);
    const b = res.body;
    expect(b.statorCurrentA).toBeCloseTo(18.88, 1); // 18.89 without intermediate rounding
    expect(Math.abs(b.powerFactor - 0.833)).toBeLessThanOrEqual(0.002);
    expect(Math.abs(b.inputPowerW / 12530 - 1)).toBeLessThan(0.005);
    expect(Math.abs(b.airGapPowerW / 11845 - 1)).toBeLessThan(0.005);
    expect(Math.abs(b.outputPowerW / 10485 - 1)).toBeLessThan(0.005);
    expect(Math.abs(b.inducedTorqueNm / 62.8 - 1)).toBeLessThan(0.005);
    expect(Math.abs(100 * b.efficiency - 83.7)).toBeLessThanOrEqual(0.3);
    expect(b.rpm).toBeCloseTo(1760.4, 6);
    expect(b.flags).toEqual([]);
  });

  it("accepts the constants nested under params, with the same answer", async () => {
    const flat = await request(app).post("/api/motor-model/evaluate").send({ ...chapman, slip: 0.022 });
    const nested = await request(app).post("/api/motor-model/evaluate").send({ ...chapmanNested, slip: 0.022 });
    expect(nested.status).toBe(200);
    expect(nested.body).toEqual(flat.body);
  });

  it("flags a measured current far from the model", async () => {
    const res = await request(app).post("/api/motor-model/evaluate").send({ ...chapman, slip: 0.022, measuredCurrentA: 30 });
    expect(res.body.flags.map((f: { code: string }) => f.code)).toEqual(["current-mismatch"]);
  });
});

describe("POST /api/motor-model/evaluate without a slip", () => {
  it("returns curves, starting, pull-up and breakdown points (Chapman Ex. 7-6 exact form)", async () => {
    const res = await request(app).post("/api/motor-model/evaluate").send(chapman);
    expect(res.status).toBe(200);
    const { curves, start, pullUp, breakdown, thevenin } = res.body;
    for (const key of ["slip", "rpm", "torqueNm", "currentA", "powerFactor", "inputPowerW", "outputPowerW", "efficiency"]) {
      expect(curves[key]).toHaveLength(200);
    }
    expect(curves.rpm[0]).toBe(0);
    expect(curves.rpm[199]).toBe(1800);
    expect(breakdown.slip).toBeCloseTo(0.2014, 4);
    expect(breakdown.torqueNm).toBeCloseTo(230.8, 1);
    expect(start.torqueNm).toBeCloseTo(106.6, 1);
    expect(pullUp.torqueNm).toBeCloseTo(start.torqueNm, 9);
    // Textbook approximate form at V_φ = 460/√3 (Chapman rounds V_φ to 266 V and gets 0.198 / 229 N·m).
    expect(thevenin.approximate.sMax).toBeCloseTo(0.198, 3);
    expect(Math.abs(thevenin.approximate.tauMax - 229)).toBeLessThan(1.5);
  });

  it("honours points", async () => {
    const res = await request(app).post("/api/motor-model/evaluate").send({ ...chapman, points: 50 });
    expect(res.body.curves.torqueNm).toHaveLength(50);
  });
});

describe("POST /api/motor-model/evaluate validation", () => {
  it("answers 400 with field messages for a bad flat body", async () => {
    const { r2: _drop, ...noR2 } = chapman;
    const res = await request(app).post("/api/motor-model/evaluate").send({ ...noR2, connection: "wye", poles: 3, slip: 5 });
    expect(res.status).toBe(400);
    expect(res.body.error).toBe("Invalid request");
    expect(Object.keys(res.body.fields).sort()).toEqual(["connection", "poles", "r2", "slip"]);
    expect(res.body.fields.poles).toMatch(/even/);
  });

  it("names nested fields by their path", async () => {
    const res = await request(app)
      .post("/api/motor-model/evaluate")
      .send({ ...chapmanNested, params: { ...chapmanNested.params, xm: -1 } });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.fields)).toEqual(["params.xm"]);
  });

  it("answers 400 for an empty body", async () => {
    const res = await request(app).post("/api/motor-model/evaluate").send({});
    expect(res.status).toBe(400);
    expect(res.body.fields).toHaveProperty("lineVoltage");
  });
});

describe("POST /api/motor-model/estimate", () => {
  const plate = { ratedKw: 75, ratedVoltage: 400, ratedCurrent: 131, ratedHz: 50, poles: 4, ratedRpm: 1485, efficiency: 95, powerFactor: 0.87 };

  it("returns a circuit that reproduces the nameplate, with sources and assumptions", async () => {
    const res = await request(app).post("/api/motor-model/estimate").send(plate);
    expect(res.status).toBe(200);
    const b = res.body;
    expect(Math.abs(b.ratedPoint.outputPowerW / 75000 - 1)).toBeLessThan(0.01);
    expect(b.ratedPoint.efficiency).toBeCloseTo(0.95, 3); // 95 given as a percentage
    expect(b.input.params).toHaveProperty("r2");
    expect(b.sources.r2).toBe("nameplate-estimate");
    expect(b.assumptions.length).toBeGreaterThan(5);
    expect(b.breakdown.slip).toBeGreaterThan(0.01);
  });

  it("gives a cage motor a deep-bar rotor that starts near the typical design B values, and /evaluate takes its circuit back unchanged", async () => {
    const est = await request(app).post("/api/motor-model/estimate").send(plate);
    const { params, ...ratings } = est.body.input;
    expect(params.rotorLockedR2).toBeGreaterThan(params.r2);
    expect(params.rotorLockedX2).toBeLessThan(params.x2);
    const fullLoadTorque = 75000 / ((2 * Math.PI * 1485) / 60);
    // 1.5 × torque and 6.5 × current: typical values inside the NEMA design table's 70–275 % and 600–700 % (EASA
    // handbook after NEMA MG 10 Table 2-1); the estimate aims for them exactly.
    expect(est.body.start.torqueNm / fullLoadTorque).toBeCloseTo(1.5, 3);
    expect(est.body.start.currentA / 131).toBeCloseTo(6.5, 3);
    const nested = await request(app).post("/api/motor-model/evaluate").send({ ...ratings, params });
    expect(nested.status).toBe(200);
    expect(nested.body.start).toEqual(est.body.start);
    expect(nested.body.pullUp).toEqual(est.body.pullUp);
    expect(nested.body.breakdown).toEqual(est.body.breakdown);
    const flat = await request(app).post("/api/motor-model/evaluate").send({ ...ratings, ...params });
    expect(flat.body.start).toEqual(est.body.start);
  });

  it("answers 400 for a standstill R2 of 0 or a negative standstill X2", async () => {
    const res = await request(app).post("/api/motor-model/evaluate").send({ ...chapman, rotorLockedR2: 0, rotorLockedX2: -1 });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.fields).sort()).toEqual(["rotorLockedR2", "rotorLockedX2"]);
  });

  it("answers 422 for a physically impossible nameplate", async () => {
    const res = await request(app).post("/api/motor-model/estimate").send({ ...plate, ratedRpm: 1510 });
    expect(res.status).toBe(422);
    expect(res.body.error).toMatch(/check poles, rated rpm/);
  });

  it("answers 400 for a missing rated current", async () => {
    const { ratedCurrent: _drop, ...rest } = plate;
    const res = await request(app).post("/api/motor-model/estimate").send(rest);
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.fields)).toEqual(["ratedCurrent"]);
  });
});

describe("POST /api/motor-model/from-tests", () => {
  it("derives a circuit from no-load and locked-rotor readings", async () => {
    const res = await request(app)
      .post("/api/motor-model/from-tests")
      .send({
        noLoad: { V: 460, I: 9.936, P: 1291.9, f: 60 },
        lockedRotor: { V: 60, I: 33.62, P: 3221, f: 15 },
        statorResistanceDc: 0.641,
        designLetter: "B",
        refine: true,
      });
    expect(res.status).toBe(200);
    expect(res.body.params.r2).toBeCloseTo(0.332, 2);
    expect(res.body.params.xm).toBeCloseTo(26.3, 0);
    expect(res.body.sources.xm).toBe("no-load/locked-rotor test");
  });
});
