// Where ← / → step (src/features/spectrum/lib/peak-steps.ts): lines that stand clearly above the local noise floor,
// and the engine's markers, never the bumps of the floor or a stronger line's window side lobes (invented data).
import { describe, expect, it } from "vitest";
import { mulberry32 } from "../../src/engine/synth.ts";
import { spectrumForDisplay } from "../../src/engine/spectrum.ts";
import { findLinePeaks, hannSidelobeDb, nextTarget, runningMedian, stepTargets, type StepTarget } from "../../src/features/spectrum/lib/peak-steps.ts";
import { findPeaks } from "../../src/features/spectrum/lib/viewer-math.ts";

/** Every stop of → from the left edge, then of ← from the right edge. */
function walk<T extends StepTarget>(targets: T[], from: number, to: number, eps: number) {
  const right: number[] = [];
  const left: number[] = [];
  for (let t = nextTarget(targets, from, 1, eps); t; t = nextTarget(targets, t.hz, 1, eps)) right.push(t.hz);
  for (let t = nextTarget(targets, to, -1, eps); t; t = nextTarget(targets, t.hz, -1, eps)) left.push(t.hz);
  return { right, left };
}

describe("running median floor", () => {
  it("follows the floor and is not moved by a few tall points", () => {
    const y: number[] = Array.from({ length: 201 }, (_, i) => (i % 2 ? -100 : -96));
    y[100] = 0;
    y[101] = -20;
    const m = runningMedian(y, 20);
    expect(m[100]).toBe(-96);
    expect(m[0]).toBe(-96);
    expect(m[200]).toBe(-96);
    expect(Array.from(runningMedian([3, 1, 2], 5))).toEqual([2, 2, 2]); // a window wider than the data: all of it
    expect(Array.from(runningMedian([4, 1, 3, 2], 5))).toEqual([2.5, 2.5, 2.5, 2.5]);
  });

  it("is the median of the window around each point, the ends shifted inwards", () => {
    const rnd = mulberry32(3);
    const y = Array.from({ length: 300 }, () => -100 + 20 * rnd());
    const m = runningMedian(y, 7);
    for (let i = 0; i < y.length; i++) {
      const from = Math.max(0, Math.min(i - 7, y.length - 15));
      const w = y.slice(from, from + 15).sort((a, b) => a - b);
      expect(m[i]).toBe(w[7]);
    }
  });
});

describe("step targets on a synthetic spectrum: lines over a noise floor with bumps", () => {
  // 45–55 Hz at 0.02 Hz: a floor near −100 dB whose bumps rise 7 dB over deep dips (so each bump has ≥ 10 dB of
  // prominence, which alone took them for peaks), and four lines: f − 2sf, f, f + 2sf and a weak one 20 dB up.
  const x = Array.from({ length: 501 }, (_, i) => 45 + i * 0.02);
  const rnd = mulberry32(11);
  const y = x.map((_, i) => (i % 6 === 3 ? -93 + rnd() : i % 6 === 0 ? -108 + rnd() : -100 + 2 * rnd()));
  const line = (hz: number, db: number) => {
    const k = Math.round((hz - 45) / 0.02);
    y[k] = db;
    y[k - 1] = Math.max(y[k - 1], db - 6);
    y[k + 1] = Math.max(y[k + 1], db - 6);
  };
  line(48.5, -60);
  line(50, 0);
  line(51.5, -62);
  line(53.2, -80);
  const lines = [48.5, 50, 51.5, 53.2];
  const hzOf = (is: number[]) => is.map((i) => Number(x[i].toFixed(2)));

  it("prominence alone walks the bumps of the floor (the defect)", () => {
    const bumps = findPeaks(y, { prominence: 10, halfWidth: 400 }).filter((i) => !lines.includes(Number(x[i].toFixed(2))));
    expect(bumps.length).toBeGreaterThan(20);
  });

  it("the lines stand clearly above the floor: the steps visit exactly them, both ways", () => {
    expect(hzOf(findLinePeaks(x, y))).toEqual(lines);
    const targets = stepTargets(x, y, [], { tolHz: 0.02 });
    const { right, left } = walk(targets, 45, 55, 0.01);
    expect(right.map((v) => Number(v.toFixed(2)))).toEqual(lines);
    expect(left.map((v) => Number(v.toFixed(2)))).toEqual([...lines].reverse());
  });

  it("markers always count: at a line the target is the marker's frequency; a marker with no line is a stop too", () => {
    const markers = [
      { name: "f − 2sf", hz: 48.5071 },
      { name: "f", hz: 49.9962 },
      { name: "f + 2sf", hz: 51.4929 },
      { name: "RSH", hz: 54.1 }, // no line stands there
      { name: "out of view", hz: 60 },
    ];
    const targets = stepTargets(x, y, markers, { tolHz: 0.02 });
    expect(targets.map((t) => [t.hz, t.marker?.name ?? null])).toEqual([
      [48.5071, "f − 2sf"],
      [49.9962, "f"],
      [51.4929, "f + 2sf"],
      [x[410], null],
      [54.1, "RSH"],
    ]);
    expect(targets.map((t) => t.index)).toEqual([175, 250, 325, 410, null]);
    // from the supply marker → goes on to the upper sideband, not to the supply's own bin
    expect(nextTarget(targets, 49.9962, 1, 0.02)?.marker?.name).toBe("f + 2sf");
    expect(nextTarget(targets, 49.9962, -1, 0.02)?.marker?.name).toBe("f − 2sf");
    expect(nextTarget(targets, 54.1, 1, 0.02)).toBeNull();
  });
});

describe("step targets on an engine spectrum (Hann, zero-padded): no side lobes of the supply line", () => {
  // 50 Hz supply, sidebands at ±1.5 Hz 55 and 58 dB down, a weak line 75 dB down at 53.7 Hz, white noise; 1 kHz, 20 s.
  const fs = 1000;
  const n = 20 * fs;
  const rnd = mulberry32(5);
  const gauss = () => Math.sqrt(-2 * Math.log(1 - rnd())) * Math.cos(2 * Math.PI * rnd());
  const data = new Float64Array(n);
  const tones = [
    { hz: 50.013, a: 1 },
    { hz: 48.513, a: 10 ** (-55 / 20) },
    { hz: 51.513, a: 10 ** (-58 / 20) },
    { hz: 53.7, a: 10 ** (-75 / 20) },
  ];
  for (let i = 0; i < n; i++) {
    let v = 2e-6 * gauss();
    for (const t of tones) v += t.a * Math.cos(2 * Math.PI * t.hz * (i / fs) + t.hz);
    data[i] = v;
  }
  const d = spectrumForDisplay(data, fs, { maxPoints: Number.MAX_SAFE_INTEGER });
  const idx = Array.from(d.hz.keys()).filter((i) => d.hz[i] >= 45 && d.hz[i] <= 55);
  const x = idx.map((i) => d.hz[i]);
  const y = idx.map((i) => d.db[i]);
  const leakage = { resolutionHz: d.resolutionHz, envelopeDb: hannSidelobeDb };

  it("without the side-lobe rule the supply's own lobes are taken for lines", () => {
    expect(x[1] - x[0]).toBeLessThan(d.resolutionHz); // zero-padded: the lobes between their nulls are drawn
    const found = findLinePeaks(x, y).map((i) => x[i]);
    expect(found.length).toBeGreaterThan(tones.length);
  });

  it("the steps visit exactly the four lines, each within one bin of its frequency", () => {
    const found = findLinePeaks(x, y, { leakage }).map((i) => x[i]);
    expect(found).toHaveLength(tones.length);
    const want = tones.map((t) => t.hz).sort((a, b) => a - b);
    found.forEach((hz, k) => expect(Math.abs(hz - want[k])).toBeLessThanOrEqual(x[1] - x[0]));
  });

  it("the side-lobe envelope matches domain.md's Hann worst case within 2 dB (5–10 bins)", () => {
    const table: [number, number][] = [[5, -48.7], [6, -54], [7, -58.5], [8, -62.3], [10, -68.5]]; // domain.md §2
    for (const [cells, db] of table) expect(Math.abs(hannSidelobeDb(cells) - db)).toBeLessThanOrEqual(2);
    expect(hannSidelobeDb(1)).toBe(0); // the main lobe
    expect(hannSidelobeDb(-2.4)).toBeCloseTo(-31.5, 9);
  });
});
