// The motor model read at a measured operating point (src/engine/motor-model/operating-point.ts): load, output,
// torque, efficiency, power factor and current at the measured slip, the measured current beside the model's, and
// the flags of a point that does not fit (checkOperatingPoint). References: Chapman, *Electric Machinery
// Fundamentals*, 4th ed. (2005), Example 7-5 (from memory, as in the domain sheet §5; the recomputed column there is
// what is checked); the rest are consistency checks against how the nameplate estimate is fitted (estimate.ts: R2
// solved for rated output at rated slip, Xm for rated current) and the equivalent-circuit basis of the slip
// method (domain sheet §4).

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  analysisModelReading,
  atSupplyFrequency,
  breakdownSlip,
  CURRENT_MISMATCH_LIMIT,
  estimateFromNameplate,
  evaluateAtSlip,
  fromTests,
  measuredLineCurrentA,
  modelReading,
  MotorModelError,
  type ModelForReading,
  type MotorModelInput,
  type NameplateForModel,
} from "../../src/engine/motor-model/index.ts";
import { analyzeCapture } from "../../src/engine/analyze.ts";
import { synthCapture } from "../../src/engine/synth.ts";
import { syncRpm } from "../../src/engine/formulas.ts";
import { chapman } from "../helpers/chapman.ts"; // Chapman, Electric Machinery Fundamentals 4th ed., Ex. 7-5

const within = (actual: number | null, expected: number, relTol: number) => {
  expect(actual).not.toBeNull();
  expect(Math.abs((actual as number) - expected) / Math.abs(expected), `${actual} vs ${expected} (±${relTol * 100} %)`).toBeLessThanOrEqual(relTol);
};

const chapmanModel: ModelForReading = { input: chapman, source: "measured", ratedOutputW: 25 * 745.7 };

/** The 11 kW test motor of the API tests: 400 V, 20 A, 1455 rpm, 4 poles, 50 Hz (design B assumed). */
const plate11: NameplateForModel = { poles: 4, ratedRpm: 1455, ratedHz: 50, ratedKw: 11, ratedVoltage: 400, ratedCurrent: 20 };
const est11 = estimateFromNameplate(plate11);
const model11: ModelForReading = { input: est11.input, source: "nameplate-estimate", ratedOutputW: 11_000 };
const ratedSlip11 = (1500 - 1455) / 1500;

describe("model reading at a slip: Chapman Example 7-5 (s = 0.022; domain sheet §5, recomputed column)", () => {
  const r = modelReading(chapmanModel, { slip: 0.022, supplyHz: 60, currentA: 18.89 });
  it("gives the published operating point", () => {
    within(r.outputKw, 10.478, 0.002);
    within(r.inputKw, 12.525, 0.002);
    within(r.torqueNm, 56.84, 0.002);
    within(r.efficiency, 0.8366, 0.002);
    within(r.powerFactor, 0.832, 0.002);
    within(r.modelCurrentA, 18.89, 0.002);
  });
  it("load is the shaft output over rated output (25 hp = 18.64 kW): 56.2 %", () => {
    within(r.loadPct, (100 * 10.478) / 18.6425, 0.003);
  });
  it("the measured current at the model's value gives a ratio of 1 and no flag", () => {
    within(r.currentRatio, 1, 0.002);
    expect(r.flags).toEqual([]);
  });
});

describe("nameplate estimate read at its own rated point (how the estimate is fitted: estimate.ts)", () => {
  it("11 kW motor: 100 % load, rated current, the assumed efficiency, rated torque", () => {
    const r = modelReading(model11, { slip: ratedSlip11, supplyHz: 50, currentA: 20, slipMethodLoadPct: 100 });
    within(r.loadPct, 100, 1e-4);
    within(r.outputKw, 11, 1e-4);
    within(r.modelCurrentA, 20, 1e-4);
    within(r.torqueNm, 11_000 / ((2 * Math.PI * 1455) / 60), 1e-4);
    // No efficiency on the nameplate: the typical 90 % for 11 kW is assumed (design.ts), and the fit reproduces it.
    within(r.efficiency, 0.9, 1e-3);
    expect(r.apartPct).toBeCloseTo(0, 1);
    expect(r.flags).toEqual([]);
  });

  // A few seconds: each case fits a circuit (tens of milliseconds).
  const nameplate = fc
    .record({
      poles: fc.constantFrom(2, 4, 6, 8),
      hz: fc.constantFrom(50, 60),
      kw: fc.double({ min: 2, max: 200, noNaN: true }),
      slip: fc.double({ min: 0.008, max: 0.04, noNaN: true }),
      pf: fc.double({ min: 0.78, max: 0.9, noNaN: true }),
      eta: fc.double({ min: 0.86, max: 0.96, noNaN: true }),
      volts: fc.constantFrom(400, 460, 690),
    })
    .map(({ poles, hz, kw, slip, pf, eta, volts }) => {
      const ns = syncRpm(hz, poles);
      const np: NameplateForModel = {
        poles,
        ratedHz: hz,
        ratedRpm: Math.round(ns * (1 - slip) * 10) / 10,
        ratedKw: kw,
        ratedVoltage: volts,
        ratedCurrent: (kw * 1000) / (Math.sqrt(3) * volts * pf * eta),
        efficiency: eta,
      };
      return np;
    });
  it("property: at the nameplate's rated slip every estimate reads 100 % load and rated current", () => {
    fc.assert(
      fc.property(nameplate, (np) => {
        let input: MotorModelInput;
        try {
          input = estimateFromNameplate(np).input;
        } catch (err) {
          if (err instanceof MotorModelError) return true; // a nameplate the estimate refuses is not this property's business
          throw err;
        }
        const ns = syncRpm(np.ratedHz!, np.poles);
        const r = modelReading({ input, source: "nameplate-estimate", ratedOutputW: np.ratedKw * 1000 }, { slip: (ns - np.ratedRpm) / ns, supplyHz: np.ratedHz });
        return Math.abs((r.loadPct as number) - 100) < 0.01 && Math.abs((r.modelCurrentA as number) / np.ratedCurrent - 1) < 1e-3 && r.flags.length === 0;
      }),
      { numRuns: 12, seed: 20261203 },
    );
  });

  it("property: model load rises with slip over the running region (no load to twice the rated slip)", () => {
    // Not up to breakdown: shaft power P = τ·ω_m peaks at a lower slip than torque does.
    const top = 2 * ratedSlip11;
    expect(top).toBeLessThan(breakdownSlip(est11.input));
    fc.assert(
      fc.property(fc.double({ min: 0.001, max: top, noNaN: true }), fc.double({ min: 0.001, max: top, noNaN: true }), (a, b) => {
        fc.pre(Math.abs(a - b) > 1e-6);
        const [lo, hi] = a < b ? [a, b] : [b, a];
        return (modelReading(model11, { slip: hi }).loadPct as number) > (modelReading(model11, { slip: lo }).loadPct as number);
      }),
    );
  });

  it("at half the rated slip the model stays within 10 points of the slip method's 50 % (torque ∝ s at low slip, §4) without equalling it", () => {
    const r = modelReading(model11, { slip: ratedSlip11 / 2, supplyHz: 50, slipMethodLoadPct: 50 });
    expect(Math.abs(r.apartPct as number)).toBeLessThan(10);
    expect(Math.abs(r.apartPct as number)).toBeGreaterThan(0.1);
    expect(r.apartPct).toBeCloseTo((r.loadPct as number) - 50, 6);
  });
});

describe("flags: points that do not fit the model", () => {
  it(`a measured current twice the model's raises current-mismatch (limit ±${100 * CURRENT_MISMATCH_LIMIT} %, common practice)`, () => {
    const modelA = evaluateAtSlip(est11.input, ratedSlip11).statorCurrentA;
    const r = modelReading(model11, { slip: ratedSlip11, currentA: 2 * modelA });
    expect(r.flags.map((f) => f.code)).toEqual(["current-mismatch"]);
    expect(r.flags[0].message).toMatch(/\+100 %/);
    within(r.currentRatio, 2, 1e-3);
    // The readings themselves still come from the slip.
    within(r.loadPct, 100, 1e-4);
  });

  it("property: the current flag is raised exactly when |measured/model − 1| > 25 %", () => {
    const modelA = evaluateAtSlip(est11.input, 0.02).statorCurrentA;
    fc.assert(
      fc.property(fc.double({ min: 0.3, max: 3, noNaN: true }).filter((k) => Math.abs(Math.abs(k - 1) - CURRENT_MISMATCH_LIMIT) > 1e-6), (k) => {
        const flagged = modelReading(model11, { slip: 0.02, currentA: k * modelA }).flags.some((f) => f.code === "current-mismatch");
        return flagged === Math.abs(k - 1) > CURRENT_MISMATCH_LIMIT;
      }),
    );
  });

  it("a slip beyond the breakdown slip raises beyond-breakdown; the values are still given", () => {
    const sb = breakdownSlip(est11.input);
    const r = modelReading(model11, { slip: Math.min(0.95, 1.5 * sb) });
    expect(r.flags.map((f) => f.code)).toEqual(["beyond-breakdown"]);
    expect(r.flags[0].message).toMatch(/wrong nameplate data/);
    expect(r.loadPct).not.toBeNull();
    // A measured model's hint points at the measured values instead of the nameplate.
    expect(modelReading({ ...model11, source: "measured" }, { slip: Math.min(0.95, 1.5 * sb) }).flags[0].message).toMatch(/measured circuit values/);
  });

  it("slip outside motoring gives slip-out-of-range and no values; no slip gives no flags and says why", () => {
    for (const s of [0, -0.01, 1, 1.2]) {
      const r = modelReading(model11, { slip: s, currentA: 20 });
      expect(r.flags.map((f) => f.code)).toEqual(["slip-out-of-range"]);
      expect(r.loadPct).toBeNull();
      expect(r.modelCurrentA).toBeNull();
    }
    const none = modelReading(model11, { slip: null, currentA: 20 });
    expect(none.flags).toEqual([]);
    expect(none.loadPct).toBeNull();
    expect(none.measuredCurrentA).toBe(20);
    expect(none.notes.join(" ")).toMatch(/No slip/);
  });

  it("a precomputed breakdown slip gives the same flags as computing it", () => {
    const sb = breakdownSlip(est11.input);
    for (const s of [0.01, 0.1, 0.3])
      expect(modelReading(model11, { slip: s, currentA: 30 }, { breakdownSlip: sb }).flags).toEqual(modelReading(model11, { slip: s, currentA: 30 }).flags);
  });

  it("without rated kW there is no load %, the rest is given", () => {
    const r = modelReading({ ...model11, ratedOutputW: null }, { slip: ratedSlip11 });
    expect(r.loadPct).toBeNull();
    within(r.outputKw, 11, 1e-4);
  });
});

describe("measured current in real amperes", () => {
  const phases = [
    { channel: "Ia", rmsA: 19 },
    { channel: "Ib", rmsA: 20 },
    { channel: "Ic", rmsA: 21 },
  ];
  it("is the mean of the phases in amperes", () => {
    const chans = phases.map((p) => ({ name: p.channel, kind: "current", unit: "A" }));
    expect(measuredLineCurrentA(phases, chans).currentA).toBeCloseTo(20, 12);
  });
  it("converts mA and kA channels, and applies the CT ratio of a secondary recording", () => {
    const chans = [
      { name: "Ia", kind: "current", unit: "mA" },
      { name: "Ib", kind: "current", unit: "mA" },
      { name: "Ic", kind: "current", unit: "mA" },
    ];
    expect(measuredLineCurrentA(phases, chans).currentA).toBeCloseTo(0.02, 12);
    const ct = measuredLineCurrentA(phases, chans, 1000);
    expect(ct.currentA).toBeCloseTo(20, 9);
    expect(ct.notes.join(" ")).toMatch(/CT ratio 1000/);
    expect(measuredLineCurrentA([{ channel: "I", rmsA: 0.05 }], [{ name: "I", unit: "kA" }]).currentA).toBeCloseTo(50, 9);
  });
  it("leaves out a channel that is not in amperes, and is null without a current phase", () => {
    const r = measuredLineCurrentA([{ channel: "Ia", rmsA: 1.2 }, { channel: "Ib", rmsA: 20 }], [{ name: "Ia", unit: "V" }, { name: "Ib", unit: "A" }]);
    expect(r.currentA).toBe(20);
    expect(r.notes[0]).toMatch(/Ia is in V/);
    expect(measuredLineCurrentA([], []).currentA).toBeNull();
  });
});

describe("supply frequency away from the model's (drive-fed motor)", () => {
  it("within 1 Hz the circuit is used as it is", () => {
    expect(atSupplyFrequency(est11.input, 50.6).input).toBe(est11.input);
  });
  it("at 40 Hz: reactances × 0.8, voltage × 0.8 (constant V/f), resistances kept", () => {
    const { input, note } = atSupplyFrequency(est11.input, 40);
    expect(input.lineVoltage).toBeCloseTo(320, 9);
    expect(input.params.xm / est11.input.params.xm).toBeCloseTo(0.8, 12);
    expect(input.params.x1 / est11.input.params.x1).toBeCloseTo(0.8, 12);
    expect(input.params.r2).toBe(est11.input.params.r2);
    expect(note).toMatch(/constant V\/f/);
  });
  it("at the rated slip speed s·f the torque stays near rated in the constant-flux region (domain sheet §4, drive supply)", () => {
    const ratedTorque = 11_000 / ((2 * Math.PI * 1455) / 60);
    // 40 Hz, slip speed 0.03 × 50 Hz = 1.5 Hz: within 3 % (the stator resistance drop grows as the voltage falls).
    within(modelReading(model11, { slip: 1.5 / 40, supplyHz: 40 }).torqueNm, ratedTorque, 0.03);
    // Above rated frequency the drive holds rated voltage: the flux and the torque at the same slip speed fall.
    expect(modelReading(model11, { slip: 1.5 / 60, supplyHz: 60 }).torqueNm as number).toBeLessThan(0.8 * ratedTorque);
  });
});

describe("analyzeCapture with a motor model", () => {
  const nameplate = { poles: 4, ratedRpm: 1455, ratedHz: 50, ratedKw: 11, ratedVoltage: 400, ratedCurrent: 20, rotorBars: 28 };
  const synth = synthCapture({ poles: 4, slip: 0.03, sampleRate: 5000, durationS: 8, phases: 3, seed: 5, currentRmsA: 20 });

  it("adds `model` and changes nothing else in the result", () => {
    const plain = analyzeCapture(synth.capture, nameplate);
    const withModel = analyzeCapture(synth.capture, nameplate, { motorModel: { source: "nameplate-estimate", nameplate: plate11, ratedOutputW: 11_000 } });
    const { model, ...rest } = withModel;
    expect(rest).toEqual(plain);
    expect(plain.model).toBeUndefined();
    expect(model).toMatchObject({ source: "nameplate-estimate", slip: plain.slip, slipMethodLoadPct: 100, flags: [] });
    within(model!.loadPct, 100, 0.01);
    within(model!.measuredCurrentA, 20, 0.01);
  });

  it("a recording of a CT secondary (0.2 A for 20 A, ratio 100) reads the primary current", () => {
    const secondary = synthCapture({ poles: 4, slip: 0.03, sampleRate: 5000, durationS: 8, phases: 1, seed: 5, currentRmsA: 0.2 });
    const a = analyzeCapture(secondary.capture, nameplate, { motorModel: { source: "nameplate-estimate", nameplate: plate11, ratedOutputW: 11_000, ctRatio: 100 } });
    within(a.model!.measuredCurrentA, 20, 0.01);
    expect(a.model!.flags).toEqual([]);
    // Without the ratio the same recording is 1 % of the model's current: flagged.
    const b = analyzeCapture(secondary.capture, nameplate, { motorModel: { source: "nameplate-estimate", nameplate: plate11, ratedOutputW: 11_000 } });
    expect(b.model!.flags.map((f) => f.code)).toEqual(["current-mismatch"]);
  });

  it("a nameplate the estimate refuses gives no model, and the analysis goes on", () => {
    const bad = { ...plate11, ratedRpm: 1499.9, ratedCurrent: 1 };
    const a = analyzeCapture(synth.capture, nameplate, { motorModel: { source: "nameplate-estimate", nameplate: bad, ratedOutputW: 11_000 } });
    expect(a.model).toBeUndefined();
    expect(a.slip).not.toBeNull();
    expect(analysisModelReading({ source: "nameplate-estimate", nameplate: bad }, { slip: 0.03, supplyHz: 50, phases: [] }, [])).toBeNull();
  });
});

describe("where each circuit value came from", () => {
  it("a nameplate estimate gives the basis of every value it sources", () => {
    expect(Object.keys(est11.basis).sort()).toEqual(Object.keys(est11.sources).sort());
    expect(est11.basis.r2).toMatch(/rated 11 kW at the rated slip 0\.0300/);
    expect(est11.basis.xm).toMatch(/rated 20 A/);
  });
  it("the tests name the reading behind each value: locked rotor for R2, X1, X2; no load for Xm and the rotational loss", () => {
    const readings = { noLoad: { V: 460, I: 8.1, P: 650, f: 60 }, lockedRotor: { V: 80, I: 30, P: 2600, f: 15 }, designLetter: "B" as const };
    const { detail } = fromTests({ ...readings, statorResistanceDc: 0.5 });
    expect(Object.fromEntries(Object.entries(detail).map(([k, v]) => [k, v!.source]))).toEqual({
      r1: "entered",
      r2: "locked-rotor test",
      x1: "locked-rotor test",
      x2: "locked-rotor test",
      xm: "no-load test",
      rotationalLossW: "no-load test",
    });
    expect(fromTests(readings).detail.r1).toEqual({ source: "locked-rotor test", basis: expect.stringMatching(/R1 = R2 assumed/) });
  });
});
