// Eccentricity (f ± fr, Dorrell et al. 1997) and slot-harmonic (Hurst & Habetler 1996) slip estimators run on
// every current phase and are combined per method, so a noisy or missing first phase still yields the speed.
// Targets as in analysis.test.ts: |slip error| ≤ 0.0005.
import { describe, expect, it } from "vitest";
import { analyzeCapture } from "../../src/engine/analyze.ts";
import { synthCapture, mulberry32, gaussian, type SynthOptions } from "../../src/engine/synth.ts";
import { combinePhaseEstimates, phaseAgreementTolerance } from "../../src/engine/slip.ts";
import type { Capture, SlipEstimate } from "../../src/engine/types.ts";

const base: SynthOptions = { poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, phases: 3 };

/** White noise on one channel: σ = rms·10^(−snr/20) with rms the fundamental's 20 A r.m.s. */
function addNoise(capture: Capture, index: number, snrDb: number, seed: number) {
  const g = gaussian(mulberry32(seed));
  const x = capture.channels[index].data;
  const sigma = 20 * 10 ** (-snrDb / 20);
  for (let i = 0; i < x.length; i++) x[i] += sigma * g();
}
const method = (r: ReturnType<typeof analyzeCapture>, m: string) => r.slipEstimates.find((e) => e.method === m);

describe("slip from every current phase", () => {
  it("phase A with heavy noise (0 dB SNR): eccentricity and slot-harmonic slip still come from B and C", () => {
    for (const seed of [31, 32, 33]) {
      const { capture, nameplate, truth } = synthCapture({ ...base, seed });
      addNoise(capture, 0, 0, seed + 100);
      const r = analyzeCapture(capture, nameplate);
      expect(Math.abs(r.slip! - truth.slip)).toBeLessThanOrEqual(0.0005);
      expect(Math.abs(r.rpm! - truth.rpm)).toBeLessThan(1);
      const ecc = method(r, "eccentricity")!;
      const rsh = method(r, "slot-harmonic")!;
      expect(Math.abs(ecc.slip - truth.slip)).toBeLessThanOrEqual(0.0005);
      expect(Math.abs(rsh.slip - truth.slip)).toBeLessThanOrEqual(0.0005);
      expect(ecc.confidence).toBeGreaterThan(0.3);
      expect(rsh.confidence).toBeGreaterThan(0.3);
      expect(ecc.detail).toMatch(/^2 of 3 phases agree \(Ib, Ic\)/); // the buried phase is not among them
      expect(rsh.detail).toMatch(/^2 of 3 phases agree \(Ib, Ic\)/);
      // per-phase record: phase A found neither line
      const byPhase = r.slipByPhase as Array<{ channel: string; method: string; slip: number | null }>;
      expect(byPhase.filter((q) => q.channel === "Ia").every((q) => q.slip === null)).toBe(true);
      expect(byPhase.filter((q) => q.channel !== "Ia" && q.slip !== null).length).toBe(4);
      // slot markers are taken from a phase that saw them
      const slot = r.markers.filter((m) => m.family === "slot");
      expect(slot.length).toBeGreaterThan(0);
      expect(slot.every((m) => m.channel !== "Ia")).toBe(true);
    }
  });

  it("the same noisy phase on its own finds neither line (so the test above relies on the other phases)", () => {
    const { capture, nameplate } = synthCapture({ ...base, seed: 31 });
    addNoise(capture, 0, 0, 131);
    const onlyA: Capture = { ...capture, channels: [capture.channels[0]] };
    const r = analyzeCapture(onlyA, nameplate);
    expect(method(r, "eccentricity")).toBeUndefined();
    expect(method(r, "slot-harmonic")).toBeUndefined();
  });

  it("phase A missing or dead: slip from the phases present", () => {
    const { capture, nameplate, truth } = synthCapture({ ...base, seed: 34 });
    const missing: Capture = { ...capture, channels: capture.channels.slice(1) };
    const dead: Capture = { ...capture, channels: [{ ...capture.channels[0], data: new Float32Array(capture.channels[0].data.length) }, ...capture.channels.slice(1)] };
    for (const c of [missing, dead]) {
      const r = analyzeCapture(c, nameplate);
      expect(Math.abs(r.slip! - truth.slip)).toBeLessThanOrEqual(0.0005);
      expect(method(r, "eccentricity")!.confidence).toBeGreaterThan(0.3);
      expect(method(r, "slot-harmonic")!.confidence).toBeGreaterThan(0.3);
    }
  });

  it("three clean phases agree: same slip as one phase, detail says so", () => {
    const { capture, nameplate, truth } = synthCapture({ ...base, seed: 35 });
    const r3 = analyzeCapture(capture, nameplate);
    const r1 = analyzeCapture({ ...capture, channels: [capture.channels[0]] }, nameplate);
    expect(Math.abs(r3.slip! - truth.slip)).toBeLessThanOrEqual(0.0005);
    expect(Math.abs(r3.slip! - r1.slip!)).toBeLessThanOrEqual(0.0002);
    expect(method(r3, "eccentricity")!.detail).toMatch(/^3 of 3 phases agree/);
    expect(method(r3, "slot-harmonic")!.detail).toMatch(/^3 of 3 phases agree/);
  });
});

describe("combinePhaseEstimates (confidence-weighted median, then weighted mean of the agreeing phases)", () => {
  const f = 50;
  const poles = 4;
  const e = (slip: number, confidence: number): SlipEstimate => ({ method: "eccentricity", slip, rpm: 1500 * (1 - slip), confidence, detail: "x" });
  const tol = phaseAgreementTolerance("eccentricity", 0.1, f, poles);

  it("tolerance: 3 resolution bins in slip, with floors", () => {
    expect(tol).toBeCloseTo(Math.max(5e-4, (3 * 0.1 * 2) / 50), 12);
    expect(phaseAgreementTolerance("slot-harmonic", 0.1, f, poles, 28)).toBeCloseTo(Math.max(3e-4, (3 * 0.1 * 2) / (50 * 28)), 12);
  });
  it("an outlier phase is outvoted and lowers the confidence a little", () => {
    const c = combinePhaseEstimates([{ channel: "Ia", estimate: e(0.035, 0.5) }, { channel: "Ib", estimate: e(0.0200, 0.6) }, { channel: "Ic", estimate: e(0.0204, 0.8) }], f, poles, tol)!;
    expect(c.slip).toBeCloseTo((0.02 * 0.6 + 0.0204 * 0.8) / 1.4, 12);
    expect(c.confidence).toBeCloseTo(0.8 * 0.9, 12);
    expect(c.rpm).toBeCloseTo(1500 * (1 - c.slip), 9);
    expect(c.detail).toMatch(/^2 of 3 phases agree \(Ib, Ic\); best Ic/);
  });
  it("missing phases are skipped; nothing found gives null; one phase passes through", () => {
    expect(combinePhaseEstimates([{ channel: "Ia", estimate: null }, { channel: "Ib", estimate: null }], f, poles, tol)).toBeNull();
    const one = e(0.021, 0.7);
    expect(combinePhaseEstimates([{ channel: "Ia", estimate: one }], f, poles, tol)).toBe(one);
    const c = combinePhaseEstimates([{ channel: "Ia", estimate: null }, { channel: "Ib", estimate: e(0.021, 0.7) }, { channel: "Ic", estimate: null }], f, poles, tol)!;
    expect(c.slip).toBeCloseTo(0.021, 12);
    expect(c.confidence).toBeCloseTo(0.7, 12);
  });
});
