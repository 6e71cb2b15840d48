// Display spectrum in velocity (mm/s r.m.s. per line) for vibration channels, and the window comparison behind
// the choice of the Hann-corrected supply amplitude as the 0 dB reference for the rotor sidebands.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { spectrumForDisplay, lineVelocityMmS, realSpectrum, findPeak, unitScale } from "../../src/engine/spectrum.ts";
import { synthCapture } from "../../src/engine/synth.ts";
import { analyzeCapture } from "../../src/engine/analyze.ts";
import { coarseSupplyHz, estimateSupply, lowBand, lowBandPassHz } from "../../src/engine/supply.ts";
import { STANDARD_GRAVITY } from "../../src/engine/formulas.ts";

const fs = 10000;
/** r.m.s. tone (so a "1 g" tone has r.m.s. 1 g, as in domain.md check value 16), Float32 like a parsed capture. */
function tone(rms: number, hz: number, seconds = 10, phase = 0.3): Float32Array {
  const n = Math.round(fs * seconds);
  return Float32Array.from({ length: n }, (_, i) => rms * Math.SQRT2 * Math.cos(2 * Math.PI * hz * (i / fs) + phase));
}
/** Level of the tallest displayed point within ±tol Hz. */
function levelNear(d: { hz: Float64Array; level: Float32Array }, hz: number, tol = 1): number {
  let best = 0;
  for (let i = 0; i < d.hz.length; i++) if (Math.abs(d.hz[i] - hz) <= tol) best = Math.max(best, d.level[i]);
  return best;
}

describe("velocity display spectrum (domain.md §6 integration V = A/(2πf); check value 16 [V])", () => {
  it("line formula: 1 m/s² r.m.s. at 159.155 Hz → 1.000 mm/s; 1 g at 100 Hz → 15.608 mm/s (±1e−4 / ±0.001)", () => {
    // lineVelocityMmS takes a peak amplitude (the engine's spectra are peak-scaled): r.m.s. × √2
    expect(Math.abs(lineVelocityMmS(Math.SQRT2, 159.155, "m/s2") - 1)).toBeLessThan(1e-4);
    expect(Math.abs(lineVelocityMmS(Math.SQRT2, 100, "g") - 15.608)).toBeLessThan(0.001);
    expect(unitScale("g").scale).toBe(STANDARD_GRAVITY);
    expect(lineVelocityMmS(Math.SQRT2 * 2, 50, "mm/s")).toBeCloseTo(2, 12); // velocity passes through
    expect(lineVelocityMmS(Math.SQRT2, 50, "in/s")).toBeCloseTo(25.4, 9);
    expect(lineVelocityMmS(1, 0, "m/s2")).toBe(0); // DC has no velocity line
  });

  it("a synthetic 1 g tone at 100 Hz reads 15.608 mm/s (±0.5 %) on the full band, a decimated low band and a zoom", () => {
    const x = tone(1, 100);
    for (const band of [{}, { fMaxHz: 400 }, { fMinHz: 80, fMaxHz: 120 }]) {
      const d = spectrumForDisplay(x, fs, { quantity: "velocity-mm-s", unit: "g", ...band });
      expect(d.unit).toBe("mm/s");
      expect(d.window).toBe("flattop");
      expect(d.level).toBeInstanceOf(Float32Array);
      expect(d.level.length).toBe(d.hz.length);
      expect(d.hz.length).toBeLessThanOrEqual(4000);
      const v = levelNear(d, 100);
      expect(Math.abs(v / 15.608 - 1)).toBeLessThan(0.005);
      // db is dB re 1 mm/s r.m.s. in velocity mode
      const i = d.level.indexOf(Math.max(...d.level));
      expect(d.referenceAmplitude).toBe(1);
      expect(Math.abs(d.db[i] - 20 * Math.log10(d.level[i]))).toBeLessThan(1e-4);
    }
  });

  it("a 1 m/s² tone at 159.155 Hz reads 1.000 mm/s (±0.5 %)", () => {
    const d = spectrumForDisplay(tone(1, 159.155), fs, { quantity: "velocity-mm-s", unit: "m/s2" });
    expect(Math.abs(levelNear(d, 159.155) - 1)).toBeLessThan(0.005);
  });

  it("stays within 0.5 % at random frequencies (any fractional-bin offset: flat-top scalloping ≤ 0.01 dB)", () => {
    fc.assert(
      fc.property(fc.double({ min: 20, max: 900, noNaN: true }), fc.double({ min: 0, max: 6.28, noNaN: true }), (hz, ph) => {
        const d = spectrumForDisplay(tone(0.5, hz, 4, ph), fs, { quantity: "velocity-mm-s", unit: "m/s2", fMaxHz: 1000 });
        const want = lineVelocityMmS(0.5 * Math.SQRT2, hz, "m/s2");
        return Math.abs(levelNear(d, hz) / want - 1) < 0.005;
      }),
      { numRuns: 25 },
    );
  });

  it("a velocity channel (mm/s) passes through; in/s is rescaled", () => {
    const d = spectrumForDisplay(tone(2.5, 49.3), fs, { quantity: "velocity-mm-s", unit: "mm/s" });
    expect(Math.abs(levelNear(d, 49.3) / 2.5 - 1)).toBeLessThan(0.005);
    const e = spectrumForDisplay(tone(0.1, 49.3), fs, { quantity: "velocity-mm-s", unit: "in/s" });
    expect(Math.abs(levelNear(e, 49.3) / 2.54 - 1)).toBeLessThan(0.005);
  });

  it("an accelerometer's DC offset does not become tall false lines near 0 Hz: below the 2 Hz low cut the velocity is 0", () => {
    // 0.05 m/s² of offset (a sensor bias) plus a 1 m/s² r.m.s. tone at 25 Hz. Without the cut, the flat-top window's
    // DC leakage divided by 2πf at 0.1–0.4 Hz reads as a false line of several mm/s beside the 25 Hz line's 6.4 mm/s.
    const x = tone(1, 25);
    for (let i = 0; i < x.length; i++) x[i] += 0.05;
    const d = spectrumForDisplay(x, fs, { quantity: "velocity-mm-s", unit: "m/s2", fMaxHz: 1000 });
    expect(d.lowCutHz).toBe(2); // the lower band edge for machines ≤ 600 r/min, ISO 20816-3 (domain.md §6) [M]
    let belowCut = 0;
    for (let i = 0; i < d.hz.length; i++) if (d.hz[i] < 2) belowCut = Math.max(belowCut, d.level[i]);
    expect(belowCut).toBe(0);
    expect(Math.abs(levelNear(d, 25) / lineVelocityMmS(Math.SQRT2, 25, "m/s2") - 1)).toBeLessThan(0.005);
    // the cut can be moved; a velocity sensor needs none (nothing is integrated)
    const uncut = spectrumForDisplay(x, fs, { quantity: "velocity-mm-s", unit: "m/s2", fMaxHz: 1000, velocityLowCutHz: 0 });
    expect(Math.max(...Array.from(uncut.level).slice(0, 8))).toBeGreaterThan(1);
    expect(spectrumForDisplay(tone(2.5, 49.3), fs, { quantity: "velocity-mm-s", unit: "mm/s" }).lowCutHz).toBeUndefined();
  });

  it("max-hold merges points after integration, so the 1/f weighting picks the right bin", () => {
    // Equal acceleration at 20 Hz and 900 Hz: in velocity the 20 Hz line is 45× taller.
    const x = tone(1, 20);
    const y = tone(1, 900);
    for (let i = 0; i < x.length; i++) x[i] += y[i];
    const d = spectrumForDisplay(x, fs, { quantity: "velocity-mm-s", unit: "m/s2", maxPoints: 200 });
    expect(d.hz.length).toBeLessThanOrEqual(200);
    expect(Math.abs(levelNear(d, 20, 30) / lineVelocityMmS(Math.SQRT2, 20, "m/s2") - 1)).toBeLessThan(0.005);
    expect(Math.abs(levelNear(d, 900, 30) / lineVelocityMmS(Math.SQRT2, 900, "m/s2") - 1)).toBeLessThan(0.005);
  });

  it("agrees with the analysis' 1× and 2×LF levels on a synthetic accelerometer (±2 %)", () => {
    const { capture, nameplate, truth } = synthCapture({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, phases: 0, seed: 41, vibration: { unit: "g", oneXMmS: 2.2, twoLineMmS: 0.7 } });
    const ch = capture.channels[0];
    const d = spectrumForDisplay(ch.data, capture.sampleRate, { quantity: "velocity-mm-s", unit: ch.unit, fMaxHz: 400 });
    expect(Math.abs(levelNear(d, truth.rotorHz, 0.3) / 2.2 - 1)).toBeLessThan(0.02);
    expect(Math.abs(levelNear(d, 100, 0.3) / 0.7 - 1)).toBeLessThan(0.02);
    const r = analyzeCapture(capture, nameplate);
    expect(Math.abs(r.vibration!.oneXMmS! / levelNear(d, truth.rotorHz, 0.3) - 1)).toBeLessThan(0.02);
  });

  it("the dB form is unchanged and now says its unit", () => {
    const x = tone(10, 50.013);
    const d = spectrumForDisplay(x, fs, { maxPoints: 2000 });
    expect(d.unit).toBe("dB");
    expect(d.window).toBe("hann");
    expect(d.level).toBe(d.db);
    expect(Math.abs(Math.max(...d.db))).toBeLessThan(1.5);
    expect(() => spectrumForDisplay(x, fs, { quantity: "rms" as never })).toThrow(RangeError);
  });
});

describe("supply amplitude reference: Hann-corrected vs flat-top (measured; kept Hann — see analyze.ts)", () => {
  const db = (v: number) => 20 * Math.log10(v);

  it("both estimate an isolated tone's amplitude within 0.1 dB at random fractional-bin offsets", () => {
    const sr = 1000;
    const n = 10000;
    let worstHann = 0;
    let worstFlat = 0;
    fc.assert(
      fc.property(fc.integer({ min: 300, max: 900 }), fc.double({ min: -0.5, max: 0.5, noNaN: true }), fc.double({ min: 0.1, max: 30, noNaN: true }), fc.double({ min: 0, max: 6.28, noNaN: true }), (bin, frac, amp, ph) => {
        const hz = ((bin + frac) * sr) / n; // fractional offset in bins of 1/T
        const x = Float64Array.from({ length: n }, (_, i) => amp * Math.cos(2 * Math.PI * hz * (i / sr) + ph));
        const h = findPeak(realSpectrum(x, sr, { window: "hann" }), hz - 1, hz + 1)!;
        const f = findPeak(realSpectrum(x, sr, { window: "flattop" }), hz - 1, hz + 1)!;
        const eh = Math.abs(db(h.amp / amp));
        const ef = Math.abs(db(f.amp / amp));
        worstHann = Math.max(worstHann, eh);
        worstFlat = Math.max(worstFlat, ef);
        return eh < 0.1 && ef < 0.1;
      }),
      { numRuns: 60 },
    );
    // measured on this code: Hann (zero-padding-aware Grandke) ~1e−8 dB, flat-top tallest bin ≤ ~0.003 dB
    expect(worstHann).toBeLessThan(1e-3);
    expect(worstFlat).toBeLessThan(0.011);
  });

  it("on a wandering supply the Hann reference matches the Hann sidebands (ratio right); flat-top would not", () => {
    // ±0.06 Hz wander over 20 s smears f and the sidebands alike. Hann reads both ~0.9 dB low, so their ratio —
    // the depth that is graded — stays right; a flat-top reference reads f fully and would deepen every sideband.
    const { capture, nameplate, truth } = synthCapture({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 20, wanderHz: 0.06, sidebandDb: 50, seed: 9 });
    const ch = capture.channels[0];
    const coarse = coarseSupplyHz(ch.data, capture.sampleRate)!;
    const band = lowBand(ch.data, capture.sampleRate, lowBandPassHz(capture.sampleRate, coarse));
    const est = estimateSupply(band, coarse)!;
    const flat = findPeak(realSpectrum(band.dec.data, band.dec.sampleRate, { window: "flattop" }), est.hz - 1, est.hz + 1)!;
    const A = 20 * Math.SQRT2;
    const hannErr = db(est.amplitude / A);
    const flatErr = db(flat.amp / A);
    expect(hannErr).toBeLessThan(-0.5); // Hann reads the smeared line low…
    expect(Math.abs(flatErr)).toBeLessThan(0.15); // …flat-top reads it right…
    const r = analyzeCapture(capture, nameplate);
    const depthErrHann = r.brokenBar.lowerDb! - truth.lowerDb;
    const depthErrFlat = depthErrHann + (flatErr - hannErr); // the same sideband against a flat-top reference
    expect(Math.abs(depthErrHann)).toBeLessThan(0.3); // …but the matched Hann ratio is what is accurate
    expect(Math.abs(depthErrFlat)).toBeGreaterThan(0.5);
  });
});
