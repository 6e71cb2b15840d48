// The stored full-range spectrum (server/captures/spectrum-store.ts): what the worker writes is what the viewer reads.
import { describe, expect, it } from "vitest";
import { computeFullSpectrum, decodeSpectrum, encodeSpectrum } from "../../server/captures/spectrum-store.ts";
import { synthCapture } from "../../src/engine/synth.ts";

describe("stored spectra", () => {
  const { capture } = synthCapture({ poles: 4, supplyHz: 50, slip: 0.02, durationS: 4, phases: 1, seed: 7, vibration: { unit: "g", oneXMmS: 2, twoLineMmS: 0.5 } });
  const [current, accel] = [capture.channels.find((c) => c.kind === "current")!, capture.channels.find((c) => c.kind === "vibration")!];

  it("round-trip every field, the velocity low cut included", () => {
    for (const ch of [current, accel]) {
      const s = computeFullSpectrum(ch, capture.sampleRate);
      const back = decodeSpectrum(encodeSpectrum(s, ch.kind))!;
      expect(back).toMatchObject({ channel: s.channel, unit: s.unit, resolutionHz: s.resolutionHz, series: { x0: s.series.x0, dx: s.series.dx } });
      expect(back.lowCutHz).toBe(s.lowCutHz);
      expect(Array.from(back.series.values)).toEqual(Array.from(s.series.values));
    }
    expect(computeFullSpectrum(accel, capture.sampleRate).lowCutHz).toBe(2);
    expect(computeFullSpectrum(current, capture.sampleRate).lowCutHz).toBeUndefined();
  });

  it("refuses bytes that are not a whole spectrum (the caller recomputes)", () => {
    const bytes = encodeSpectrum(computeFullSpectrum(current, capture.sampleRate), "current");
    expect(decodeSpectrum(bytes.subarray(0, bytes.length - 4))).toBeNull();
    expect(decodeSpectrum(Buffer.from("not a spectrum"))).toBeNull();
  });
});
