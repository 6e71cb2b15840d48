// Whole-engine checks on synthetic captures with known truth (synth.ts). Targets from the "Analysis engine"
// issue: supply ±0.01 Hz, |slip error| ≤ 0.0005, sideband level within 1 dB, correct grade.
import { describe, expect, it } from "vitest";
import { analyzeCapture } from "../../src/engine/analyze.ts";
import { synthCapture, type SynthOptions } from "../../src/engine/synth.ts";
import { gradeFromDepth } from "../../src/engine/rotor.ts";
import { thomsonDepthDb } from "../../src/engine/formulas.ts";
import type { AnalysisResult } from "../../src/engine/types.ts";

function run(o: SynthOptions, options = {}) {
  const { capture, truth, nameplate } = synthCapture(o);
  const result = analyzeCapture(capture, nameplate, options);
  return { result, truth, nameplate, capture };
}
const codes = (r: AnalysisResult) => r.quality.map((q) => q.code);

describe("accuracy on adequate captures", () => {
  const cases: Array<[string, SynthOptions]> = [
    ["4-pole 50 Hz healthy", { poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, seed: 1 }],
    ["2-pole 60 Hz, 1 bar of 28", { poles: 2, supplyHz: 60, slip: 0.012, durationS: 12, brokenBars: 1, seed: 2 }],
    ["4-pole 60 Hz, 2 bars of 40", { poles: 4, supplyHz: 60, slip: 0.02, durationS: 10, brokenBars: 2, rotorBars: 40, seed: 3 }],
    ["6-pole 50 Hz, 1 bar of 58", { poles: 6, supplyHz: 50, slip: 0.025, durationS: 10, brokenBars: 1, rotorBars: 58, seed: 4 }],
    ["8-pole 50 Hz, 3 bars of 48", { poles: 8, supplyHz: 50, slip: 0.03, durationS: 10, brokenBars: 3, rotorBars: 48, seed: 5 }],
    ["4-pole drive 43.7 Hz, watch", { poles: 4, supplyHz: 43.7, ratedHz: 50, slip: 0.023, ratedSlip: 0.02, durationS: 15, sidebandDb: 51, seed: 6 }],
    ["4-pole 50 Hz, developing, 40 dB SNR", { poles: 4, supplyHz: 50, slip: 0.018, durationS: 10, sidebandDb: 45, snrDb: 40, seed: 7 }],
    ["2-pole 50 Hz, serious, no slot harmonics", { poles: 2, supplyHz: 50, slip: 0.015, durationS: 12, sidebandDb: 39, slotHarmonicDb: null, seed: 8 }],
    ["6-pole 60 Hz, sound, wandering supply", { poles: 6, supplyHz: 60, slip: 0.022, durationS: 10, wanderHz: 0.03, seed: 9 }],
  ];
  for (const [name, o] of cases) {
    it(name, () => {
      const { result, truth } = run(o);
      expect(Math.abs(result.supplyHz! - truth.supplyHz)).toBeLessThanOrEqual(0.01);
      expect(Math.abs(result.slip! - truth.slip)).toBeLessThanOrEqual(0.0005);
      expect(Math.abs(result.rpm! - truth.rpm)).toBeLessThan(1);
      const bb = result.brokenBar;
      expect(bb.assessable).toBe(true);
      expect(Math.abs(bb.lowerDb! - truth.lowerDb)).toBeLessThanOrEqual(1);
      expect(bb.grade).toBe(gradeFromDepth(truth.lowerDb));
      expect(bb.loadOscillationSuspected).toBe(false);
      expect(Math.abs(bb.lowerHz! - truth.lowerHz)).toBeLessThan(0.05);
      if (truth.brokenBars > 0) expect(Math.abs(bb.estimatedBrokenBars! - truth.brokenBars)).toBeLessThanOrEqual(0.3);
      expect(result.slipEstimates.filter((e) => e.method !== "nameplate" && e.confidence > 0.3).length).toBeGreaterThanOrEqual(2);
    });
  }

  it("supply within 0.01 Hz on a 10 s, 40 dB SNR capture with a wandering supply", () => {
    for (const seed of [11, 12, 13]) {
      const { result, truth } = run({ poles: 4, supplyHz: 49.93, slip: 0.02, durationS: 10, snrDb: 40, wanderHz: 0.04, wanderRateHz: 0.07, seed });
      expect(Math.abs(result.supplyHz! - truth.supplyHz)).toBeLessThanOrEqual(0.01);
      expect(Math.abs(result.slip! - truth.slip)).toBeLessThanOrEqual(0.0005);
    }
  });

  it("finds a drive frequency anywhere in 5–120 Hz", () => {
    for (const [f, seed] of [[8.5, 21], [97.3, 22]] as const) {
      const { result, truth } = run({ poles: 4, supplyHz: f, ratedHz: 50, slip: (0.02 * 50) / f, ratedSlip: 0.02, durationS: 20, seed });
      expect(Math.abs(result.supplyHz! - truth.supplyHz)).toBeLessThanOrEqual(0.01);
      expect(Math.abs(result.slip! - truth.slip)).toBeLessThanOrEqual(0.0005);
      expect(Math.abs(result.loadPct! - 100)).toBeLessThan(3);
    }
  });
});

describe("not assessable, with the right reason", () => {
  it("light load: a clean spectrum is not assessable (never Sound)", () => {
    const { result } = run({ poles: 4, supplyHz: 50, slip: 0.006, ratedSlip: 0.02, durationS: 20, seed: 31 });
    expect(result.loadPct!).toBeLessThan(45);
    expect(codes(result)).toContain("light-load");
    expect(result.brokenBar.assessable).toBe(false);
    expect(result.brokenBar.grade).toBeNull();
    expect(result.brokenBar.reason).toMatch(/light load/);
  });
  it("light load: sidebands that stand clearly out are still graded, with the caveat and lower confidence", () => {
    const full = run({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 20, sidebandDb: 40, seed: 32 }).result;
    const { result, truth } = run({ poles: 4, supplyHz: 50, slip: 0.007, ratedSlip: 0.02, durationS: 20, sidebandDb: 40, seed: 32 });
    expect(result.brokenBar.assessable).toBe(true);
    expect(result.brokenBar.grade).toBe(gradeFromDepth(truth.lowerDb));
    expect(result.brokenBar.caveats.join(" ")).toMatch(/Light load/);
    expect(result.brokenBar.confidence).toBeLessThan(full.brokenBar.confidence);
  });
  it("a clean spectrum at 47 % load is not assessable: the usual minimum is 50 % of rated load (domain.md §2)", () => {
    const { result } = run({ poles: 4, supplyHz: 50, slip: 0.0094, ratedSlip: 0.02, durationS: 20, seed: 36 });
    expect(result.loadPct!).toBeGreaterThan(45);
    expect(result.loadPct!).toBeLessThan(50);
    expect(result.brokenBar.assessable).toBe(false);
    expect(result.brokenBar.reason).toMatch(/light load/);
  });
  it("clipped current: a clean spectrum is not assessable, and says to increase the range", () => {
    const { result } = run({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, clipAt: 0.85, seed: 37 });
    expect(codes(result)).toContain("clipping");
    expect(result.brokenBar.assessable).toBe(false);
    expect(result.brokenBar.grade).toBeNull();
    expect(result.brokenBar.reason).toMatch(/clips.*increase the range/);
  });
  it("clipped current: a sideband that stands out is still graded, with the caveat and lower confidence", () => {
    const o = { poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, sidebandDb: 34, seed: 38 };
    const clean = run(o).result;
    const { result } = run({ ...o, clipAt: 0.85 });
    expect(codes(result)).toContain("clipping");
    expect(result.brokenBar.assessable).toBe(true);
    expect(result.brokenBar.grade).not.toBeNull();
    expect(result.brokenBar.caveats.join(" ")).toMatch(/clips.*real severity may be worse/);
    expect(result.brokenBar.confidence).toBeLessThan(clean.brokenBar.confidence);
  });
  it("too short: says by how much and how long would be enough (Hann rule 2sf ≥ 8Δf)", () => {
    const { result } = run({ poles: 4, supplyHz: 60, slip: 0.005, ratedSlip: 0.005, durationS: 5, seed: 33 });
    const v = result.quality.find((q) => q.code === "too-short")!;
    expect(v).toBeDefined();
    expect(v.message).toMatch(/13\.3 s/); // 8/(2·0.005·60) = 13.3 s (domain.md check value 20)
    expect(v.message).toMatch(/8\.3 s more/);
    expect(result.brokenBar.assessable).toBe(false);
    expect(result.brokenBar.reason).toMatch(/capture too short/);
  });
  it("oscillating load: sidebands off the independent slip are flagged, not graded", () => {
    const { result, truth } = run({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, loadOscillation: { hz: 1.3, db: 38 }, seed: 34 });
    expect(Math.abs(result.slip! - truth.slip)).toBeLessThanOrEqual(0.0005);
    expect(result.brokenBar.loadOscillationSuspected).toBe(true);
    expect(result.brokenBar.assessable).toBe(false);
    expect(result.brokenBar.reason).toMatch(/load oscillation suspected/);
  });
  it("no speed line at all: speed not found", () => {
    const { result } = run({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, eccentricityDb: null, slotHarmonicDb: null, sidebandDb: 110, seed: 35 });
    expect(result.slip).toBeNull();
    expect(codes(result)).toContain("speed-not-found");
    expect(result.brokenBar.reason).toMatch(/speed not found/);
  });
});

describe("data-quality verdicts", () => {
  it("clipping", () => {
    const { result } = run({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 5, clipAt: 0.85, seed: 41 });
    expect(codes(result)).toContain("clipping");
  });
  it("no false clipping on a clean, finely quantised capture", () => {
    const { result } = run({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 5, adcBits: 16, seed: 42 });
    expect(codes(result)).not.toContain("clipping");
  });
  it("DC offset", () => {
    const { result, truth } = run({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, dcOffset: 0.2, seed: 43 });
    expect(codes(result)).toContain("dc-offset");
    expect(Math.abs(result.slip! - truth.slip)).toBeLessThanOrEqual(0.0005);
  });
  it("unstable supply (sub-block estimates)", () => {
    const { result } = run({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, driftHz: 0.6, seed: 44 });
    expect(codes(result)).toContain("unstable-supply");
  });
  it("sample rate too low for the vibration band and the slot harmonics", () => {
    const { result } = run({ poles: 2, supplyHz: 50, slip: 0.02, durationS: 10, sampleRate: 2000, rotorBars: 40, vibration: {}, seed: 45 });
    expect(result.quality.filter((q) => q.code === "low-sample-rate").length).toBe(2);
  });
});

describe("three phases and Park's vector", () => {
  it("analyses each phase and sees 2sf in the Park modulus", () => {
    const { result, truth } = run({ poles: 4, supplyHz: 50, slip: 0.025, durationS: 10, phases: 3, sidebandDb: 42.5, upperOffsetDb: 30, seed: 51 });
    const phases = result.phases as Array<{ channel: string; lowerDb: number }>;
    expect(phases.map((p) => p.channel)).toEqual(["Ia", "Ib", "Ic"]);
    for (const p of phases) expect(Math.abs(p.lowerDb - truth.lowerDb)).toBeLessThanOrEqual(1);
    const park = result.park as { twoSfHz: number; depthDb: number; detected: boolean };
    expect(park.detected).toBe(true);
    expect(Math.abs(park.twoSfHz - truth.polePassHz)).toBeLessThan(0.02);
    // with the upper sideband negligible, the modulus modulation equals the lower sideband ratio
    expect(Math.abs(park.depthDb - truth.lowerDb)).toBeLessThan(1);
  });
});

describe("load", () => {
  it("slip method by default, current method listed too, voltage correction applied", () => {
    const o: SynthOptions = { poles: 4, supplyHz: 50, slip: 0.015, ratedSlip: 0.02, durationS: 10, seed: 61 };
    const { result } = run(o);
    expect(result.loadMethod).toBe("slip");
    expect(Math.abs(result.loadPct! - 75)).toBeLessThan(2);
    const est = result.loadEstimates as Array<{ method: string; loadPct: number }>;
    expect(est.map((e) => e.method).sort()).toEqual(["current", "slip"]);
    const { capture, nameplate } = synthCapture(o);
    const corrected = analyzeCapture(capture, { ...nameplate, ratedVoltage: 400 }, { measuredVoltage: 380 });
    expect(Math.abs(corrected.loadPct! - 75 * 0.95 ** 2)).toBeLessThan(2);
  });
  it("current method when no speed line is found", () => {
    const { result } = run({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, eccentricityDb: null, slotHarmonicDb: null, sidebandDb: 110, seed: 62 });
    expect(result.loadMethod).toBe("current");
    expect(result.loadPct).not.toBeNull();
  });
});

describe("vibration", () => {
  it("velocity r.m.s. in the ISO band, zone, 1×, 2×LF and pole-pass from an accelerometer", () => {
    const { result, truth } = run({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, brokenBars: 2, vibration: { oneXMmS: 2.0, twoLineMmS: 0.8, polePassDb: 20 }, seed: 71 });
    const v = result.vibration!;
    expect(Math.abs(v.velocityRmsMmS / truth.velocityRmsMmS! - 1)).toBeLessThan(0.03);
    expect(v.zone).toBe("B"); // ≈ 2.2 mm/s, group 2 rigid (1.4–2.8 mm/s is B; from memory)
    expect(Math.abs(v.oneXHz! - truth.rotorHz)).toBeLessThan(0.005);
    expect(Math.abs(v.oneXMmS! - 2.0)).toBeLessThan(0.05);
    expect(Math.abs(v.twoLineHz! - 100)).toBeLessThan(0.01);
    expect(Math.abs(v.twoLineMmS! - 0.8)).toBeLessThan(0.03);
    expect(Math.abs(v.polePassHz! - truth.polePassHz)).toBeLessThan(0.02);
    const names = result.markers.filter((m) => m.family === "vibration").map((m) => m.name);
    expect(names).toEqual(expect.arrayContaining(["1×", "2×", "2×LF", "1× − Fp", "1× + Fp"]));
  });
  it("says when ISO 20816-3 does not cover the machine: 15 kW and under (ISO 20816-3:2022 title, domain.md §6)", () => {
    const { capture, nameplate } = synthCapture({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, vibration: { oneXMmS: 2.0 }, seed: 73 });
    const small = analyzeCapture(capture, { ...nameplate, ratedKw: 7.5 });
    expect(small.vibration).not.toBeNull();
    expect(small.quality.find((q) => q.code === "iso-scope")).toMatchObject({ severity: "info", message: expect.stringMatching(/rated 7\.5 kW.*above 15 kW/) });
    expect(codes(analyzeCapture(capture, { ...nameplate, ratedKw: 55 }))).not.toContain("iso-scope");
    expect(codes(analyzeCapture(capture, { ...nameplate, ratedKw: undefined }))).not.toContain("iso-scope"); // unknown power: no claim
  });
  it("in g and at ≤ 600 rpm uses the 2–1000 Hz band", () => {
    const { result, truth } = run({ poles: 12, supplyHz: 50, slip: 0.03, durationS: 20, vibration: { unit: "g", oneXMmS: 3 }, seed: 72 });
    expect(result.vibration!.bandHz).toEqual([2, 1000]);
    expect(Math.abs(result.vibration!.velocityRmsMmS / truth.velocityRmsMmS! - 1)).toBeLessThan(0.03);
  });
  it("a vibration-only capture still yields speed and slip", () => {
    const { result, truth } = run({ poles: 4, supplyHz: 50, slip: 0.018, durationS: 10, phases: 0, vibration: { polePassDb: 26 }, seed: 73 });
    expect(result.slip).not.toBeNull();
    expect(Math.abs(result.slip! - truth.slip)).toBeLessThanOrEqual(0.0005);
    expect(Math.abs(result.rpm! - truth.rpm)).toBeLessThan(1);
    expect(result.brokenBar.assessable).toBe(false);
    expect(result.slipEstimates.map((e) => e.method)).toContain("vibration-1x");
  });
});

describe("markers", () => {
  it("has the supply, sideband, eccentricity, slot and harmonic markers of the current channel", () => {
    const { result } = run({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, brokenBars: 1, seed: 81 });
    const names = result.markers.map((m) => m.name);
    expect(names).toEqual(expect.arrayContaining(["f", "f − 2sf", "f + 2sf", "f − fr", "f + fr", "3f", "5f", "7f"]));
    expect(names.some((n) => n.startsWith("RSH"))).toBe(true);
    const f = result.markers.find((m) => m.name === "f")!;
    expect(f.level).toBe(0);
    expect(f.family).toBe("supply");
    const lower = result.markers.find((m) => m.name === "f − 2sf")!;
    expect(Math.abs(lower.level + thomsonDepthDb(28, 2, 1))).toBeLessThan(1);
  });
});

describe("input handling", () => {
  it("rejects an invalid nameplate with an error, but an empty capture only with verdicts", () => {
    const { capture, nameplate } = synthCapture({ poles: 4, slip: 0.02, durationS: 2 });
    expect(() => analyzeCapture(capture, { ...nameplate, poles: 3 })).toThrow(/poles/);
    const r = analyzeCapture({ sampleRate: 1000, channels: [] }, nameplate);
    expect(r.supplyHz).toBeNull();
    expect(r.brokenBar.assessable).toBe(false);
  });
});
