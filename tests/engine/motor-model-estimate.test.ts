// Motor model from the nameplate (usual assumptions, refined to reproduce the rated point) and from the
// no-load / locked-rotor tests (standard test method), checked by round trips through known circuits.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  estimateFromNameplate,
  evaluateAtSlip,
  fromTests,
  keyPoints,
  MotorModelError,
  nemaMaxLockedRotorCurrentA,
  typicalBreakdownTorqueRatio,
  typicalLockedRotorCurrentRatio,
  typicalLockedRotorTorqueRatio,
  type MotorModelInput,
  type NameplateForModel,
  type TestReading,
} from "../../src/engine/motor-model/index.ts";

const within = (actual: number, expected: number, relTol: number) =>
  expect(Math.abs(actual - expected) / Math.abs(expected), `${actual} vs ${expected} (±${relTol * 100} %)`).toBeLessThanOrEqual(relTol);

/** A typical 4-pole 75 kW 400 V 50 Hz motor: 1485 rpm, 131 A, 95 % efficiency, PF 0.87. */
const np75: NameplateForModel = { ratedKw: 75, ratedVoltage: 400, ratedCurrent: 131, ratedHz: 50, poles: 4, ratedRpm: 1485, efficiency: 0.95, powerFactor: 0.87 };

describe("estimateFromNameplate", () => {
  const est = estimateFromNameplate(np75);
  const rated = evaluateAtSlip(est.input, 0.01);
  const ratedTorque = 75000 / ((1485 * 2 * Math.PI) / 60);

  it("reproduces rated output at rated slip within 1 %", () => {
    within(rated.outputPowerW, 75000, 0.01);
    expect(est.ratedPoint.slip).toBeCloseTo(0.01, 12);
  });

  it("gives plausible efficiency, current and power factor at the rated point", () => {
    expect(rated.efficiency).toBeGreaterThan(0.9);
    expect(rated.efficiency).toBeLessThan(0.97);
    within(rated.statorCurrentA, 131, 0.05);
    expect(rated.powerFactor).toBeGreaterThan(0.82);
    expect(rated.powerFactor).toBeLessThan(0.92);
  });

  it("has the assumed design B breakdown torque (2.25 × full load) and realistic starting torque and current", () => {
    const k = keyPoints(est.input);
    within(k.breakdown.torqueNm / ratedTorque, 2.25, 0.001);
    expect(k.breakdown.slip).toBeGreaterThan(0.02);
    expect(k.breakdown.slip).toBeLessThan(0.15);
    // Deep-bar rotor fitted to typical design B starting values (1.5 × torque, 6.5 × current, from memory).
    expect(k.start.torqueNm / ratedTorque).toBeGreaterThan(1.2);
    expect(k.start.torqueNm / ratedTorque).toBeLessThan(2.2);
    expect(k.start.currentA / 131).toBeGreaterThan(5);
    expect(k.start.currentA / 131).toBeLessThan(8);
  });

  it("labels every value a nameplate estimate and states its assumptions, refinement included", () => {
    expect(Object.values(est.sources).every((s) => s === "nameplate-estimate")).toBe(true);
    expect(Object.keys(est.sources).sort()).toEqual(["r1", "r2", "rc", "rotationalLossW", "rotorLockedR2", "rotorLockedX2", "x1", "x2", "xm"]);
    expect(est.assumptions.length).toBeGreaterThanOrEqual(6);
    expect(est.assumptions.every((a) => typeof a === "string" && a.length > 20)).toBe(true);
    expect(est.assumptions.join("\n")).toMatch(/X1 : X2 = 0\.4 : 0\.6/);
    expect(est.assumptions.join("\n")).toMatch(/Refined numerically: R2 solved/);
    expect(est.assumptions.join("\n")).toMatch(/Starting torque assumed 1\.5 × full-load torque and starting current 6\.5 ×.*from memory/);
    expect(est.assumptions.join("\n")).toMatch(/Deep-bar rotor \(engineering approximation/);
  });

  it("fills in frequency and efficiency when the nameplate lacks them", () => {
    const e = estimateFromNameplate({ ratedKw: 75, ratedVoltage: 400, ratedCurrent: 131, poles: 4, ratedRpm: 1485 });
    expect(e.input.frequencyHz).toBe(50);
    within(e.ratedPoint.outputPowerW, 75000, 0.01);
    expect(e.assumptions.join("\n")).toMatch(/Efficiency not given/);
    expect(e.assumptions.join("\n")).toMatch(/Rated frequency not given: 50 Hz/);
  });

  it("a delta estimate behaves the same at the terminals as the star-equivalent one", () => {
    const d = estimateFromNameplate({ ...np75, connection: "delta" });
    expect(d.input.connection).toBe("delta");
    within(d.input.params.r1, 3 * est.input.params.r1, 1e-6);
    for (const s of [1, 0.2, 0.01]) {
      within(evaluateAtSlip(d.input, s).statorCurrentA, evaluateAtSlip(est.input, s).statorCurrentA, 1e-6);
      within(evaluateAtSlip(d.input, s).inducedTorqueNm, evaluateAtSlip(est.input, s).inducedTorqueNm, 1e-6);
    }
  });

  it("rejects a rated speed at or above synchronous speed, saying what to check", () => {
    expect(() => estimateFromNameplate({ ...np75, ratedRpm: 1500 })).toThrow(MotorModelError);
    expect(() => estimateFromNameplate({ ...np75, ratedRpm: 1500 })).toThrow(/check poles, rated rpm/);
  });

  it("rejects a slip too high for the stated efficiency", () => {
    expect(() => estimateFromNameplate({ ...np75, ratedRpm: 1440, efficiency: 0.97 })).toThrow(/rotor loss/);
  });

  // The generator draws a fresh seed on every run (fast-check prints seed and path when a case fails, which is
  // how the cases below were found); the per-unit circuit depends only on slip, efficiency, power factor and
  // design letter (kW, poles, voltage and frequency scale it), so a shrunk case's "1 kW, 2-pole" is only where
  // shrinking stops, not what makes it fail.
  it("round trip holds over plausible nameplates, and the starting point is the typical one or says why not (fast-check)", () => {
    const plate = fc
      .record({
        ratedKw: fc.double({ min: 1, max: 300, noNaN: true }),
        ratedHz: fc.constantFrom(50, 60),
        poles: fc.constantFrom(2, 4, 6),
        slip: fc.double({ min: 0.008, max: 0.05, noNaN: true }),
        // Losses a few times the rotor copper loss (≈ s·P), as in real motors; a high slip with a very
        // high efficiency is physically impossible and the estimate rightly refuses it.
        lossPerSlip: fc.double({ min: 2.5, max: 6, noNaN: true }),
        powerFactor: fc.double({ min: 0.78, max: 0.9, noNaN: true }),
        ratedVoltage: fc.constantFrom(230, 400, 460, 690),
        designLetter: fc.constantFrom("A" as const, "B" as const, "C" as const, "D" as const),
      })
      .map(({ lossPerSlip, ...r }) => ({ ...r, efficiency: 1 - lossPerSlip * r.slip }))
      .map((r) => ({
        ...r,
        ratedRpm: ((120 * r.ratedHz) / r.poles) * (1 - r.slip),
        ratedCurrent: (r.ratedKw * 1000) / (Math.sqrt(3) * r.ratedVoltage * r.efficiency * r.powerFactor),
      }));
    fc.assert(
      fc.property(plate, (p) => {
        const e = estimateFromNameplate(p);
        const pt = evaluateAtSlip(e.input, p.slip);
        const k = keyPoints(e.input);
        const { r2, x2, rotorLockedR2, rotorLockedX2 } = e.input.params;
        const kR = (rotorLockedR2 as number) / r2;
        const kX = (rotorLockedX2 as number) / x2;
        const notes = e.assumptions.join("\n");
        const fullLoadTorque = (p.ratedKw * 1000) / ((2 * Math.PI * p.ratedRpm) / 60);
        const startTorque = k.start.torqueNm / fullLoadTorque;
        const startCurrent = k.start.currentA / p.ratedCurrent;
        const typicalTorque = typicalLockedRotorTorqueRatio(p.designLetter, p.ratedKw) as number;
        // 6.5 × (A 7.5, D 6.0), or the NEMA MG 1 ¶12.35.1 maximum for a 60 Hz B–D rating where that is less.
        const typicalCurrent = typicalLockedRotorCurrentRatio(p.designLetter, { ...p, frequencyHz: p.ratedHz })?.ratio as number;
        // The typical starting torque, or the least a cage rotor gives (standstill R2 = running R2, fixed by the
        // rated slip) when that is already more, said in the notes.
        const torqueOk =
          Math.abs(startTorque / typicalTorque - 1) < 1e-3 ||
          (kR === 1 && startTorque > typicalTorque && /Starting torque [\d.]+ ×, above the typical/.test(notes));
        // The typical starting current, or the most this stator allows with the standstill rotor leakage at its
        // floor (a quarter of running), said in the notes.
        const currentOk =
          Math.abs(startCurrent / typicalCurrent - 1) < 1e-3 ||
          (Math.abs(kX - 0.25) < 1e-9 && startCurrent < typicalCurrent && /Starting current [\d.]+ ×, below the typical/.test(notes));
        return (
          // The rated point is reproduced (the estimate refuses to return a circuit that misses it).
          Math.abs(pt.outputPowerW / (p.ratedKw * 1000) - 1) < 1e-6 &&
          Math.abs(pt.statorCurrentA / p.ratedCurrent - 1) < 1e-6 &&
          Math.abs(pt.efficiency - p.efficiency) < 0.01 &&
          torqueOk &&
          currentOk &&
          startCurrent < 8 &&
          // A–C: several times rated current (unless the NEMA MG 1 maximum in amperes is less, as for a large
          // rating with a small-motor efficiency); design D's high-resistance rotor can start on less (see below).
          (p.designLetter === "D" || startCurrent > Math.min(4.5, typicalCurrent * (1 - 1e-3))) &&
          // D: at least the 275 % of the NEMA design table (EASA handbook, after NEMA MG 10 Table 2-1), and its
          // torque maximum near that (the table gives breakdown 275 % too: the peak sits towards standstill).
          (p.designLetter !== "D" || (startTorque >= 2.75 * (1 - 1e-6) && k.breakdown.torqueNm / k.start.torqueNm < 1.05))
        );
      }),
      { numRuns: 40 },
    );
  });

  it("design A at 5 % slip, PF 0.9 and 87.5 %: the rated point is met (fitting R2 and Xm in turn circled and stopped 9 % short)", () => {
    const p: NameplateForModel = { ratedKw: 10, ratedHz: 50, poles: 4, ratedVoltage: 400, designLetter: "A", efficiency: 0.875, powerFactor: 0.9, ratedRpm: 1425, ratedCurrent: 18.33 };
    const e = estimateFromNameplate(p);
    within(e.ratedPoint.outputPowerW, 10000, 1e-6);
    within(e.ratedPoint.statorCurrentA, 18.33, 1e-6);
    // The assumed breakdown for a 10 kW design A motor (2.5 × from 15 kW, rising towards small motors).
    within(keyPoints(e.input).breakdown.torqueNm / (10000 / ((2 * Math.PI * 1425) / 60)), typicalBreakdownTorqueRatio("A", 10), 1e-3);
  });

  describe("design D at high slip and loss: the property test's shrunk case (1 kW, 2-pole, 690 V, 50 Hz, 4.48 % slip, 73.1 %)", () => {
    const p: NameplateForModel = {
      ratedKw: 1,
      ratedHz: 50,
      poles: 2,
      ratedVoltage: 690,
      designLetter: "D",
      efficiency: 0.7310032117963343,
      powerFactor: 0.78,
      ratedRpm: 2865.501605897759,
      ratedCurrent: 1.4674942021756736,
    };
    const e = estimateFromNameplate(p);
    const k = keyPoints(e.input);
    const fullLoadTorque = 1000 / ((2 * Math.PI * p.ratedRpm) / 60);

    it("starts at the 275 % of the NEMA design table (EASA handbook, after NEMA MG 10 Table 2-1) with its peak near standstill", () => {
      within(e.ratedPoint.outputPowerW, 1000, 1e-6);
      within(k.start.torqueNm / fullLoadTorque, 2.75, 1e-3);
      expect(k.breakdown.torqueNm / k.start.torqueNm).toBeLessThan(1.05);
      expect(k.breakdown.slip).toBeGreaterThan(0.5);
    });

    it("starts on 4.5 × current, not the typical 6 ×, and says why", () => {
      within(k.start.currentA / p.ratedCurrent, 4.5, 0.01);
      within(e.input.params.rotorLockedX2 as number, 0.25 * e.input.params.x2, 1e-9);
      expect(e.assumptions.join("\n")).toMatch(/Starting current 4\.50 ×, below the typical 6 ×: the stator resistance and leakage/);
    });

    it("no cage rotor reaches 6 × on this stator: even the least standstill resistance (the running R2) with no leakage stays below", () => {
      const { r2 } = e.input.params;
      const extreme = { ...e.input, params: { ...e.input.params, rotorLockedR2: r2, rotorLockedX2: 0 } };
      expect(evaluateAtSlip(extreme, 1).statorCurrentA / p.ratedCurrent).toBeLessThan(6);
    });
  });
});

// Typical general-purpose (design B) nameplates, invented but with catalogue-like figures, from 2.2 to 150 kW,
// 2 to 8 poles, 50 and 60 Hz, against the NEMA design table as reproduced in the EASA Engineering Handbook
// ("General speed-torque characteristics, based on NEMA MG 10 Table 2-1"; domain sheet §1): design B locked-rotor
// torque 70–275 %, breakdown torque 175–300 %, locked-rotor current 600–700 % (that column is on the handbook's page,
// not in the domain sheet's copy). For 60 Hz motors NEMA MG 1 ¶12.35.1 also caps the locked-rotor current in amperes
// (the handbook's table of maximum locked-rotor currents): there the estimate never exceeds that cap, and sits on it
// where it is below 600 % of the rated current.
describe("typical design B nameplates against the NEMA design table (EASA handbook after NEMA MG 10 Table 2-1; NEMA MG 1 ¶12.35.1)", () => {
  const plates: Array<[string, NameplateForModel]> = [
    ["2-pole 60 Hz 460 V 7.5 kW (10 hp)", { ratedKw: 7.5, ratedVoltage: 460, ratedCurrent: 11.95, ratedHz: 60, poles: 2, ratedRpm: 3530, efficiency: 89.5, powerFactor: 0.88 }],
    ["2-pole 50 Hz 400 V 30 kW", { ratedKw: 30, ratedVoltage: 400, ratedCurrent: 52.8, ratedHz: 50, poles: 2, ratedRpm: 2950, efficiency: 93.3, powerFactor: 0.88 }],
    ["4-pole 50 Hz 400 V 2.2 kW", { ratedKw: 2.2, ratedVoltage: 400, ratedCurrent: 4.64, ratedHz: 50, poles: 4, ratedRpm: 1435, efficiency: 86.7, powerFactor: 0.79 }],
    ["4-pole 50 Hz 400 V 15 kW", { ratedKw: 15, ratedVoltage: 400, ratedCurrent: 28.0, ratedHz: 50, poles: 4, ratedRpm: 1465, efficiency: 92.1, powerFactor: 0.84 }],
    ["4-pole 60 Hz 460 V 150 kW (200 hp)", { ratedKw: 150, ratedVoltage: 460, ratedCurrent: 225, ratedHz: 60, poles: 4, ratedRpm: 1788, efficiency: 96.2, powerFactor: 0.87 }],
    ["6-pole 60 Hz 460 V 37 kW (50 hp)", { ratedKw: 37, ratedVoltage: 460, ratedCurrent: 59.5, ratedHz: 60, poles: 6, ratedRpm: 1185, efficiency: 94.1, powerFactor: 0.83 }],
    ["6-pole 50 Hz 690 V 90 kW (delta)", { ratedKw: 90, ratedVoltage: 690, ratedCurrent: 95.5, ratedHz: 50, poles: 6, ratedRpm: 990, efficiency: 95.2, powerFactor: 0.83, connection: "delta" }],
    ["8-pole 50 Hz 400 V 55 kW", { ratedKw: 55, ratedVoltage: 400, ratedCurrent: 105.6, ratedHz: 50, poles: 8, ratedRpm: 740, efficiency: 94.0, powerFactor: 0.8 }],
    ["8-pole 60 Hz 460 V 18.5 kW (25 hp)", { ratedKw: 18.5, ratedVoltage: 460, ratedCurrent: 33.3, ratedHz: 60, poles: 8, ratedRpm: 885, efficiency: 91.7, powerFactor: 0.76 }],
  ];

  it.each(plates)("%s: locked-rotor torque 70–275 %, breakdown 175–300 %, locked-rotor current 600–700 % or the MG 1 cap", (_name, np) => {
    const e = estimateFromNameplate({ ...np, designLetter: "B" });
    const k = keyPoints(e.input);
    const fullLoadTorque = (np.ratedKw * 1000) / ((2 * Math.PI * np.ratedRpm) / 60);
    within(e.ratedPoint.outputPowerW, np.ratedKw * 1000, 1e-6);
    within(e.ratedPoint.statorCurrentA, np.ratedCurrent, 1e-6);
    const lrTorque = k.start.torqueNm / fullLoadTorque;
    expect(lrTorque).toBeGreaterThanOrEqual(0.7);
    expect(lrTorque).toBeLessThanOrEqual(2.75);
    const breakdown = k.breakdown.torqueNm / fullLoadTorque;
    expect(breakdown).toBeGreaterThanOrEqual(1.75);
    expect(breakdown).toBeLessThanOrEqual(3.0);
    expect(k.breakdown.beyondStandstill).toBe(false);
    // The curve dips no lower than the rated torque between standstill and breakdown (the motor can accelerate
    // its rated load).
    expect(k.pullUp.torqueNm / fullLoadTorque).toBeGreaterThan(1);
    const lrCurrentA = k.start.currentA;
    const cap = np.ratedHz === 60 ? nemaMaxLockedRotorCurrentA(np.ratedKw, np.ratedVoltage) : null;
    if (cap !== null) expect(lrCurrentA).toBeLessThanOrEqual(cap * (1 + 1e-6));
    if (cap !== null && cap < 6 * np.ratedCurrent) within(lrCurrentA, cap, 1e-3);
    else {
      expect(lrCurrentA / np.ratedCurrent).toBeGreaterThanOrEqual(6);
      expect(lrCurrentA / np.ratedCurrent).toBeLessThanOrEqual(7);
    }
  });

  // The table lists 230 V amperes (10 hp 162 A, 100 hp 1450 A) and scales them inversely with voltage; the values
  // are from memory of the handbook's copy of the table, not in the domain sheet.
  it("NEMA MG 1 ¶12.35.1 maxima: 81 A for 10 hp and 725 A for 100 hp at 460 V, 580 A for 100 hp at 575 V (handbook table, from memory); none outside ½–500 hp", () => {
    within(nemaMaxLockedRotorCurrentA(10 * 0.7457, 460) as number, 81, 1e-9);
    within(nemaMaxLockedRotorCurrentA(100 * 0.7457, 460) as number, 725, 1e-9);
    within(nemaMaxLockedRotorCurrentA(100 * 0.7457, 575) as number, 580, 1e-9);
    // Between ratings: linear in hp (our choice), e.g. 45 hp halfway between 40 hp (290 A) and 50 hp (362.5 A) at 460 V.
    within(nemaMaxLockedRotorCurrentA(45 * 0.7457, 460) as number, 326.25, 1e-9);
    expect(nemaMaxLockedRotorCurrentA(0.2, 460)).toBeNull();
    expect(nemaMaxLockedRotorCurrentA(600 * 0.7457, 460)).toBeNull();
  });

  it("the assumed breakdown torque of A and B rises towards small motors (the table: higher values for lower ratings)", () => {
    expect(typicalBreakdownTorqueRatio("B", 0.5)).toBe(3);
    expect(typicalBreakdownTorqueRatio("B", 15)).toBe(2.25);
    expect(typicalBreakdownTorqueRatio("B", 200)).toBe(2.25);
    expect(typicalBreakdownTorqueRatio("A", 100)).toBe(2.5);
    expect(typicalBreakdownTorqueRatio("C", 1)).toBe(2.1);
    expect(typicalBreakdownTorqueRatio("D", 1)).toBe(2.75);
    for (let kw = 1; kw < 15; kw *= 1.3) expect(typicalBreakdownTorqueRatio("B", kw * 1.3)).toBeLessThan(typicalBreakdownTorqueRatio("B", kw));
  });
});

describe("fromTests (no-load and locked-rotor tests, standard test method)", () => {
  // A known circuit with the design B split (X1 = 0.4·X_LR), on the Chapman Ex. 7-5 ratings (460 V, 60 Hz, 4-pole, Y).
  const known: MotorModelInput = {
    lineVoltage: 460,
    frequencyHz: 60,
    poles: 4,
    connection: "star",
    params: { r1: 0.641, x1: 0.628, r2: 0.332, x2: 0.942, xm: 26.3 },
    rotationalLossW: 1100,
  };

  /** No-load test: uncoupled, so the rotor slips just enough to cover the rotational loss (P_out = 0). */
  function noLoadReading(): TestReading {
    let lo = 1e-7;
    let hi = 0.05;
    for (let i = 0; i < 200; i++) {
      const m = (lo + hi) / 2;
      if (evaluateAtSlip(known, m).outputPowerW < 0) lo = m;
      else hi = m;
    }
    const p = evaluateAtSlip(known, lo);
    return { V: 460, I: p.statorCurrentA, P: p.inputPowerW, f: 60 };
  }

  /** Locked-rotor test at 15 Hz (25 % of rated) and reduced voltage: reactances scale with frequency. */
  function lockedRotorReading(): TestReading {
    const k = 15 / 60;
    const { x1, x2, xm } = known.params;
    const at15: MotorModelInput = { ...known, lineVoltage: 60, frequencyHz: 15, params: { ...known.params, x1: x1 * k, x2: x2 * k, xm: xm * k } };
    const p = evaluateAtSlip(at15, 1);
    return { V: 60, I: p.statorCurrentA, P: p.inputPowerW, f: 15 };
  }

  const data = { noLoad: noLoadReading(), lockedRotor: lockedRotorReading(), statorResistanceDc: 0.641, designLetter: "B" as const };

  it("standard method recovers the circuit within its known approximations", () => {
    const r = fromTests(data);
    expect(r.params.r1).toBe(0.641);
    within(r.params.r2, 0.332, 0.1); // standstill magnetising current is neglected: R2 reads low
    within(r.params.x1, 0.628, 0.03);
    within(r.params.x2, 0.942, 0.03);
    within(r.params.xm, 26.3, 0.02);
    expect(r.params.rc).toBeNull();
    within(r.rotationalLossW, 1100, 0.01); // no-load rotor copper loss (~2 W) is counted in
    expect(r.sources).toMatchObject({ r1: "entered", r2: "no-load/locked-rotor test", xm: "no-load/locked-rotor test" });
    expect(r.notes.join("\n")).toMatch(/scaled from 15 Hz to 60 Hz/);
  });

  it("refined method recovers the circuit within 0.5 % and reproduces the torque at s = 0.022", () => {
    const r = fromTests({ ...data, refine: true });
    for (const k of ["r2", "x1", "x2", "xm"] as const) within(r.params[k] as number, known.params[k] as number, 0.005);
    const rebuilt: MotorModelInput = { ...known, params: r.params, rotationalLossW: r.rotationalLossW };
    within(evaluateAtSlip(rebuilt, 0.022).inducedTorqueNm, evaluateAtSlip(known, 0.022).inducedTorqueNm, 0.005);
    within(evaluateAtSlip(rebuilt, 0.022).statorCurrentA, evaluateAtSlip(known, 0.022).statorCurrentA, 0.005);
  });

  it("without a DC resistance assumes R1 = R2 and says so", () => {
    const r = fromTests({ ...data, statorResistanceDc: undefined });
    expect(r.params.r1).toBeCloseTo(r.params.r2, 12);
    within(r.params.r1 + r.params.r2, 0.641 + 0.332, 0.05);
    expect(r.notes.join("\n")).toMatch(/R1 = R2 assumed/);
    expect(r.sources.r1).toBe("no-load/locked-rotor test");
  });

  it("rejects readings whose power exceeds √3·V·I", () => {
    expect(() => fromTests({ ...data, lockedRotor: { ...data.lockedRotor, P: 1e6 } })).toThrow(MotorModelError);
  });
});
