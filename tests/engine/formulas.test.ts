// Standard formulas against the check values of shared/domain.md (numbers in brackets are its item numbers).
import { describe, expect, it } from "vitest";
import {
  syncRpm,
  slipFromRpm,
  rotorHz,
  brokenBarSidebands,
  polePassHz,
  eccentricityHz,
  slotHarmonicHz,
  slipFromSlotHarmonic,
  slipFromSidebandSpacing,
  rpmFromSlip,
  slipMethodLoadPctRpm,
  slipMethodLoadPct,
  thomsonBrokenBars,
  belliniDepthDb,
  belliniBrokenBars,
  velocityFromAcceleration,
  STANDARD_GRAVITY,
  minCaptureSeconds,
  inferRatedHz,
  currentMethodLoadPct,
} from "../../src/engine/formulas.ts";
import { gradeFromDepth, thomsonCondition } from "../../src/engine/rotor.ts";
import { isoZone, isoBand } from "../../src/engine/vibration.ts";
import { hann, worstLeakageDb } from "../../src/engine/windows.ts";

describe("synchronous speed and slip", () => {
  it("ns = 120f/P (check value 1 — NEMA MG 1 / Chapman)", () => {
    expect(syncRpm(60, 4)).toBe(1800);
    expect(syncRpm(50, 4)).toBe(1500);
    expect(syncRpm(60, 2)).toBe(3600);
    expect(syncRpm(60, 6)).toBe(1200);
    // the rest of the NEMA MG 1 table (domain.md §1)
    expect([8, 10, 12].map((p) => syncRpm(60, p))).toEqual([900, 720, 600]);
    expect([2, 6, 8, 10, 12].map((p) => syncRpm(50, p))).toEqual([3000, 1000, 750, 600, 500]);
  });
  it("slip and rotor frequency (check value 2 — Chapman Ex. 7-5)", () => {
    const s = slipFromRpm(1800, 1760.4);
    expect(s).toBeCloseTo(0.022, 9);
    expect(s * 60).toBeCloseTo(1.32, 9);
  });
  it("slip from the sideband spacing (check value 4 — Thomson case history 2, 2003)", () => {
    const s = slipFromSidebandSpacing(0.719, 50.156);
    expect(Math.abs(s - 0.00717)).toBeLessThan(1e-5);
    expect(Math.abs(rpmFromSlip(50.156, 4, s) - 1494)).toBeLessThan(1);
  });
  it("pole-pass frequency (check value 5 — practitioner arithmetic)", () => {
    const s = slipFromRpm(1800, 1775);
    expect(Math.abs(polePassHz(60, s) - 1.667)).toBeLessThan(0.001);
    expect((4 * (1800 - 1775)) / 60).toBeCloseTo(polePassHz(60, s), 9);
  });
  it("infers 50/60 Hz from the nameplate speed (common practice)", () => {
    expect(inferRatedHz(1450, 4)).toBe(50);
    expect(inferRatedHz(1750, 4)).toBe(60);
    expect(inferRatedHz(2950, 2)).toBe(50);
    expect(inferRatedHz(1750, 4, 50)).toBe(50);
  });
});

describe("fault frequencies", () => {
  it("broken-bar sidebands (check value 3 — Kliman 1988)", () => {
    const k1 = brokenBarSidebands(60, 0.02, 1);
    expect(k1.lower).toBeCloseTo(57.6, 9);
    expect(k1.upper).toBeCloseTo(62.4, 9);
    const k2 = brokenBarSidebands(60, 0.02, 2);
    expect(k2.lower).toBeCloseTo(55.2, 9);
    expect(k2.upper).toBeCloseTo(64.8, 9);
  });
  it("rotor slot harmonics and their inversion (check value 6 — Hurst & Habetler / Nandi, from memory)", () => {
    expect(slotHarmonicHz(60, 4, 0.02, 28, 1, 1)).toBeCloseTo(883.2, 9);
    expect(slotHarmonicHz(60, 4, 0.02, 28, 1, -1)).toBeCloseTo(763.2, 9);
    expect(Math.abs(slipFromSlotHarmonic(883.2, 60, 4, 28, 1, 1) - 0.02)).toBeLessThan(1e-6);
  });
  it("eccentricity sidebands f ± fr (check value 7 — Dorrell et al., from memory)", () => {
    expect(rotorHz(60, 4, 0.02)).toBeCloseTo(29.4, 9);
    const e = eccentricityHz(60, 4, 0.02);
    expect(e.lower).toBeCloseTo(30.6, 9);
    expect(e.upper).toBeCloseTo(89.4, 9);
  });
});

describe("load", () => {
  it("DOE slip method and voltage correction (check value 11 — DOE fact sheet, from memory)", () => {
    const load = slipMethodLoadPctRpm(1800, 1750, 1770);
    expect(load).toBeCloseTo(60.0, 9);
    expect((load / 100) * 25).toBeCloseTo(15.0, 9);
    expect(Math.abs(slipMethodLoadPctRpm(1800, 1750, 1770, 0.95) - 54.2)).toBeLessThan(0.1);
    // the per-unit slip-speed form used by the engine gives the same numbers
    const s = slipFromRpm(1800, 1770);
    const sN = slipFromRpm(1800, 1750);
    expect(slipMethodLoadPct({ slip: s, supplyHz: 60, ratedSlip: sN, ratedHz: 60 })).toBeCloseTo(60, 9);
    expect(Math.abs(slipMethodLoadPct({ slip: s, supplyHz: 60, ratedSlip: sN, ratedHz: 60, measuredVoltage: 0.95, ratedVoltage: 1 }) - 54.2)).toBeLessThan(0.1);
  });
  it("drive-fed: the same slip speed s·f is the same load (constant V/f, from memory)", () => {
    expect(slipMethodLoadPct({ slip: 0.04, supplyHz: 25, ratedSlip: 0.02, ratedHz: 50 })).toBeCloseTo(100, 9);
  });
  it("current method (I/I_r)(V/V_r) (DOE fact sheet, from memory)", () => {
    expect(currentMethodLoadPct(30, 40)).toBeCloseTo(75, 9);
    expect(currentMethodLoadPct(30, 40, 440, 460)).toBeCloseTo(75 * (440 / 460), 9);
  });
});

describe("rotor severity", () => {
  it("published bands, lower bound inclusive (check value 8 — Thomson & Fenger 2001)", () => {
    expect(thomsonCondition(61)).toBe("Excellent");
    expect(thomsonCondition(57)).toBe("Good");
    expect(thomsonCondition(50)).toBe("Moderate");
    expect(thomsonCondition(45)).toMatch(/crack/);
    expect(thomsonCondition(39)).toMatch(/Two bars/);
    expect(thomsonCondition(33)).toMatch(/Multiple cracked/);
    expect(thomsonCondition(25)).toMatch(/very severe/);
    expect(thomsonCondition(60)).toBe("Excellent");
  });
  it("Barhound grades R1–R5 with boundaries in the better grade (product vocabulary; convention documented in rotor.ts)", () => {
    expect([61, 54, 53.99, 48, 47.9, 42, 41.9, 36, 35.9, 20].map(gradeFromDepth)).toEqual(["R1", "R1", "R2", "R2", "R3", "R3", "R4", "R4", "R5", "R5"]);
  });
  it("broken-bar count, Thomson form (check value 9 — Thomson & Fenger 2001, from memory)", () => {
    expect(Math.abs(thomsonBrokenBars(40, 2, 37.62) - 1.0)).toBeLessThan(0.01);
    expect(Math.abs(thomsonBrokenBars(40, 2, 40) - 0.769)).toBeLessThan(0.001);
    expect(Math.abs(thomsonBrokenBars(40, 2, 30) - 2.25)).toBeLessThan(0.01);
  });
  it("Bellini form as a cross-check (check value 10 — Bellini et al. 2001, from memory)", () => {
    expect(Math.abs(belliniDepthDb(40, 2, 1) - 37.76)).toBeLessThan(0.01);
    expect(Math.abs(belliniDepthDb(40, 2, 2) - 31.71)).toBeLessThan(0.01);
    expect(Math.abs(belliniBrokenBars(40, 2, 37.76) - 1)).toBeLessThan(1e-3);
    // both forms agree within ~0.1 bar for one bar
    expect(Math.abs(belliniBrokenBars(40, 2, 37.62) - thomsonBrokenBars(40, 2, 37.62))).toBeLessThan(0.1);
  });
});

describe("vibration", () => {
  it("ISO 20816-3 zones (check value 15 — ISO 10816-3:2009 / 20816-3:2022 boundaries, from memory)", () => {
    expect([1.0, 2.0, 3.5, 5.0].map((v) => isoZone(v, 2, "rigid"))).toEqual(["A", "B", "C", "D"]);
    expect([3.0, 6.0, 9.0, 12.0].map((v) => isoZone(v, 1, "flexible"))).toEqual(["A", "B", "C", "D"]);
  });
  it("ISO band 10–1000 Hz, 2–1000 Hz at ≤ 600 rpm (ISO 20816-3, from memory)", () => {
    expect(isoBand(1480)).toEqual([10, 1000]);
    expect(isoBand(590)).toEqual([2, 1000]);
  });
  it("integration v = a/(2πf) (check value 16)", () => {
    expect(Math.abs(velocityFromAcceleration(1, 159.155) * 1000 - 1.0)).toBeLessThan(1e-4);
    expect(Math.abs(velocityFromAcceleration(STANDARD_GRAVITY, 100) * 1000 - 15.608)).toBeLessThan(0.001);
  });
});

describe("resolution rule", () => {
  it("2sf ≥ 8Δf → T ≥ 13.3 s at 60 Hz, s = 0.5 %; Hann leakage at 8 bins −62.3 dB (check value 20)", () => {
    expect(minCaptureSeconds(60, 0.005)).toBeCloseTo(13.333, 3);
    expect(Math.abs(worstLeakageDb(hann(4096), 8) - -62.3)).toBeLessThan(0.3);
    expect(Math.abs(worstLeakageDb(hann(4096), 5) - -48.7)).toBeLessThan(0.3);
  });
});
