// The display decimation of spectra (server/spectra.ts): each bucket says where its max and its min are, at the
// exact frequency of that bin, so a line keeps its own frequency in every view (invented data).
import { describe, expect, it } from "vitest";
import { decimateMinMax } from "../../server/spectra.ts";

/** A deterministic noise floor (a small LCG) with a few narrow lines on top. */
function spectrum(n: number, lines: { bin: number; db: number }[], seed = 1) {
  const values = new Float32Array(n);
  let r = seed;
  for (let i = 0; i < n; i++) {
    r = (r * 1103515245 + 12345) % 2147483648;
    values[i] = -100 + (r / 2147483648) * 12;
  }
  for (const l of lines) values[l.bin] = l.db;
  return values;
}

describe("min/max decimation keeps where each extreme is", () => {
  const x0 = 0;
  const dx = 5000 / 262144; // the bin spacing of a zero-padded 5 kHz capture (0.019 Hz)
  const n = 131_073;
  const values = spectrum(n, [
    { bin: 2620, db: 0 }, // ~49.97 Hz
    { bin: 2583, db: -33 }, // a sideband in the same 1.25 Hz bucket at full range
    { bin: 57_212, db: -51 }, // a slot harmonic, ~1091 Hz
  ]);
  const s = { x0, dx, values };

  it("each bucket's max frequency is the frequency of its max bin, and its min frequency that of its min bin", () => {
    for (const buckets of [2000, 777, 16]) {
      const d = decimateMinMax(s, { buckets });
      expect(d.decimated).toBe(true);
      expect(d.maxX).toHaveLength(buckets);
      for (let b = 0; b < buckets; b++) {
        // the bucket's bins, as the decimation splits them
        const i0 = Math.floor((b * n) / buckets);
        const i1 = Math.floor(((b + 1) * n) / buckets);
        let iMax = i0;
        let iMin = i0;
        for (let i = i0; i < i1; i++) {
          if (values[i] > values[iMax]) iMax = i;
          if (values[i] < values[iMin]) iMin = i;
        }
        expect(d.max[b]).toBe(values[iMax]);
        expect(d.maxX[b]).toBe(x0 + iMax * dx);
        expect(d.min[b]).toBe(values[iMin]);
        expect(d.minX[b]).toBe(x0 + iMin * dx);
      }
      for (let b = 1; b < buckets; b++) expect(d.maxX[b]).toBeGreaterThan(d.maxX[b - 1]);
      expect(d.bucketDx).toBeCloseTo((n / buckets) * dx, 12);
    }
  });

  it("a known line's frequency survives decimation exactly: the same number as at full resolution", () => {
    const full = decimateMinMax(s, { buckets: 2000 });
    const b = full.max.indexOf(0);
    expect(full.maxX[b]).toBe(2620 * dx);
    // the bucket centre, what was sent before, is up to half a bucket (0.6 Hz here) off
    expect(Math.abs(full.x[b] - 2620 * dx)).toBeGreaterThan(0.1);
    // a narrow window holds every bin: the line's bin is the same number there
    const w = decimateMinMax(s, { xMin: 49, xMax: 51, buckets: 2000 });
    expect(w.decimated).toBe(false);
    expect(w.maxX[w.max.indexOf(0)]).toBe(full.maxX[b]);
    expect(w.maxX).toEqual(w.x);
    // the slot harmonic too, in every view that holds it
    for (const view of [{}, { xMin: 1000, xMax: 1200 }, { xMin: 1090, xMax: 1092 }]) {
      const d = decimateMinMax(s, { ...view, buckets: 2000 });
      expect(d.maxX[d.max.indexOf(-51)]).toBe(57_212 * dx);
    }
  });

  it("the weaker line in the bucket of a stronger one is not lost from the window around it", () => {
    const full = decimateMinMax(s, { buckets: 2000 });
    expect(full.max).not.toContain(-33); // hidden by the supply line in its bucket
    const w = decimateMinMax(s, { xMin: 49, xMax: 51, buckets: 2000 });
    expect(w.maxX[w.max.indexOf(-33)]).toBe(2583 * dx);
  });

  it("a range holding ≤ buckets bins comes back as it is, min and max at each bin", () => {
    const d = decimateMinMax(s, { xMin: 49.5, xMax: 50.5, buckets: 2000 });
    expect(d.decimated).toBe(false);
    expect(d.minX).toEqual(d.x);
    expect(d.maxX).toEqual(d.x);
    expect(d.bucketDx).toBe(dx);
  });
});
