import { describe, expect, it } from "vitest";
import {
  clampRange,
  cursorReadout,
  envelopeColumns,
  findPeaks,
  minMaxDecimate,
  nearestIndex,
  offsetLabel,
  panRange,
  periodEnvelope,
  placeMarkers,
  resampleOnto,
  supplyWindow,
  valueToX,
  xToValue,
  zoomRange,
} from "../../src/features/spectrum/lib/viewer-math.ts";
import { nextTarget } from "../../src/features/spectrum/lib/peak-steps.ts";

const box = { left: 40, width: 800 };

describe("marker placement on the frequency axis", () => {
  it("maps a frequency linearly onto the plot area", () => {
    const scale = { min: 45, max: 55 };
    expect(valueToX(45, scale, box)).toBe(40);
    expect(valueToX(55, scale, box)).toBe(840);
    expect(valueToX(50, scale, box)).toBe(440);
    expect(valueToX(47.5, scale, box)).toBe(240);
  });

  it("hides markers outside the view and round-trips through xToValue", () => {
    const scale = { min: 45, max: 55 };
    expect(valueToX(44.99, scale, box)).toBeNull();
    expect(valueToX(55.01, scale, box)).toBeNull();
    expect(valueToX(50, { min: 50, max: 50 }, box)).toBeNull();
    for (const hz of [45.3, 48.62, 51.38, 54.9]) expect(xToValue(valueToX(hz, scale, box)!, scale, box)).toBeCloseTo(hz, 10);
  });

  it("places markers exactly at the engine's frequencies, filtered by family and channel, labels stacked when close", () => {
    // 50 Hz supply, slip 2 %: sf = 1 Hz, broken-bar pair at 48 and 52 Hz
    const markers = [
      { name: "f", family: "supply", hz: 50, level: 0, channel: "Ia" },
      { name: "f − 2sf", family: "broken-bar", hz: 48, level: -55, channel: "Ia" },
      { name: "f + 2sf", family: "broken-bar", hz: 52, level: -58, channel: "Ia" },
      { name: "f − fr", family: "eccentricity", hz: 25.5, level: -60, channel: "Ia" },
      { name: "f", family: "supply", hz: 50.0, level: 0, channel: "Ib" },
      { name: "near", family: "broken-bar", hz: 48.05, level: -70, channel: "Ia" },
    ];
    const scale = { min: 45, max: 55 };
    const placed = placeMarkers(markers, scale, box, { families: new Set(["supply", "broken-bar"]), channel: "Ia" });
    expect(placed.map((p) => p.marker.name)).toEqual(["f − 2sf", "near", "f", "f + 2sf"]);
    [280, 284, 440, 600].forEach((x, i) => expect(placed[i].x).toBeCloseTo(x, 9));
    // the two labels 4 px apart cannot share a row; far ones go back to row 0
    expect(placed.map((p) => p.row)).toEqual([0, 1, 0, 0]);
    expect(placed.every((p) => p.labelled)).toBe(true);
  });

  it("keeps only the strongest label of lines that sit on top of each other, and all of them once zoomed apart", () => {
    // 1× at 29.8 Hz with its pole-pass sidebands ± 0.88 Hz, and 2×LF; 0–2500 Hz over 800 px is ~3 Hz per px
    const markers = [
      { name: "1× − Fp", family: "vibration", hz: 28.92, level: 0.05, channel: "x" },
      { name: "1×", family: "vibration", hz: 29.8, level: 0.9, channel: "x" },
      { name: "1× + Fp", family: "vibration", hz: 30.68, level: 0.04, channel: "x" },
      { name: "2×LF", family: "vibration", hz: 240, level: 0.3, channel: "x" },
    ];
    const full = placeMarkers(markers, { min: 0, max: 2500 }, box, { mergePx: 8 });
    expect(full.map((p) => [p.marker.name, p.labelled])).toEqual([
      ["1× − Fp", false],
      ["1×", true],
      ["1× + Fp", false],
      ["2×LF", true],
    ]);
    expect(full.filter((p) => p.labelled).map((p) => p.row)).toEqual([0, 0]);
    const zoomed = placeMarkers(markers, { min: 25, max: 35 }, box, { mergePx: 8 });
    expect(zoomed.every((p) => p.labelled)).toBe(true);
  });

  it("leaves a label off rather than over another when every row is taken", () => {
    // lines 5 px apart (80 px per Hz), labels 22 px wide: three rows hold the first three
    const markers = Array.from({ length: 5 }, (_, i) => ({ name: `m${i}`, family: "slot", hz: 50 + i * 0.0625, level: -i, channel: "Ia" }));
    const placed = placeMarkers(markers, { min: 45, max: 55 }, box, { maxRows: 3, mergePx: 3 });
    expect(placed.map((p) => p.labelled)).toEqual([true, true, true, false, false]);
    expect(placed.filter((p) => p.labelled).map((p) => p.row)).toEqual([0, 1, 2]);
  });
});

describe("cursor readout", () => {
  it("gives offset from supply in Hz and in multiples of the slip frequency", () => {
    const r = cursorReadout(48, -52.3, 50, 0.02);
    expect(r.offsetHz).toBeCloseTo(-2, 12);
    expect(r.slipHz).toBeCloseTo(1, 12);
    expect(r.slipMultiple).toBeCloseTo(-2, 12);
    expect(r.supplyOrder).toBeCloseTo(0.96, 12);
    expect(r.level).toBe(-52.3);
    expect(r.label).toBe("f − 2.00sf");
  });

  it("upper sideband and odd offsets", () => {
    expect(cursorReadout(51.5, null, 50, 0.015).label).toBe("f + 2.00sf");
    expect(cursorReadout(50.62, null, 50, 0.02).slipMultiple).toBeCloseTo(0.62, 10);
    expect(cursorReadout(50, 0, 50, 0.02).label).toBe("f");
  });

  it("far from the supply line the label switches to hertz but the multiple is still given", () => {
    const r = cursorReadout(150, -30, 50, 0.02); // 3f: 100 Hz = 100 sf away
    expect(r.slipMultiple).toBeCloseTo(100, 10);
    expect(r.supplyOrder).toBeCloseTo(3, 12);
    expect(r.label).toBe("f + 100.000 Hz");
  });

  it("falls back to Hz without slip, and to a dash without supply", () => {
    const r = cursorReadout(47.125, -40, 50, null);
    expect(r.slipMultiple).toBeNull();
    expect(r.label).toBe("f − 2.875 Hz");
    expect(cursorReadout(100, -40, null, 0.02).label).toBe("—");
    expect(offsetLabel(0.5, null)).toBe("f + 0.500 Hz");
    expect(offsetLabel(0.5, null, { hz: 1 })).toBe("f + 0.5 Hz");
    expect(offsetLabel(0.04, null, { hz: 1 })).toBe("f");
    expect(offsetLabel(1.4, 1.73, { multiple: 0 })).toBe("f + 2sf");
  });

  it("finds the nearest sample by binary search", () => {
    const xs = [1, 2, 3, 4, 10];
    expect(nearestIndex(xs, 0)).toBe(0);
    expect(nearestIndex(xs, 2.4)).toBe(1);
    expect(nearestIndex(xs, 2.6)).toBe(2);
    expect(nearestIndex(xs, 6.9)).toBe(3);
    expect(nearestIndex(xs, 7.1)).toBe(4);
    expect(nearestIndex(xs, 99)).toBe(4);
    expect(nearestIndex([], 1)).toBe(-1);
  });
});

describe("min/max decimation for display", () => {
  it("keeps the extremes of each bucket and the peak's own frequency", () => {
    const n = 1_000_000;
    const x = new Float64Array(n);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      x[i] = i * 0.001;
      y[i] = -80 + Math.sin(i / 50);
    }
    y[123_457] = 0; // one narrow line
    y[900_001] = -95; // one narrow notch
    const d = minMaxDecimate(x, y, y, 2000);
    expect(d.x.length).toBeLessThanOrEqual(2000);
    expect(d.x.length).toBeGreaterThan(1990);
    expect(Math.max(...d.max)).toBe(0);
    expect(Math.min(...d.min)).toBe(-95);
    const k = d.max.indexOf(0);
    expect(d.x[k]).toBeCloseTo(123.457, 9);
    for (let i = 1; i < d.x.length; i++) expect(d.x[i]).toBeGreaterThan(d.x[i - 1]);
  });

  it("returns full resolution when the window holds no more samples than buckets", () => {
    const x = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9];
    const y = [5, 4, 3, 2, 1, 0, 1, 2, 3, 4];
    const d = minMaxDecimate(x, y, y, 100, 2, 6);
    expect(Array.from(d.x)).toEqual([2, 3, 4, 5, 6]);
    expect(Array.from(d.max)).toEqual([3, 2, 1, 0, 1]);
  });

  it("preserves min and max when re-bucketing server min/max pairs", () => {
    const x = [0, 1, 2, 3];
    const min = [-10, -20, -5, -30];
    const max = [1, 2, 3, 4];
    const d = minMaxDecimate(x, min, max, 2);
    expect(Array.from(d.min)).toEqual([-20, -30]);
    expect(Array.from(d.max)).toEqual([2, 4]);
    expect(minMaxDecimate(x, min, max, 2, 10, 20).x.length).toBe(0);
  });

  it("draws each bucket's max and min at their own bins: one x array, the other's points null", () => {
    // buckets [0,1,2], [3,4,5]: max at 1 and 5, min at 2 and 3; a third bucket of one bin (min and max there)
    const c = envelopeColumns([1, 5, 6], [10, 20, 7], [-1, -2, 7], [2, 3, 6], [9, 19, 8]);
    expect(c.x).toEqual([1, 2, 3, 5, 6]);
    expect(c.max).toEqual([10, null, null, 20, 7]);
    expect(c.min).toEqual([null, -1, -2, null, 7]);
    expect(c.overlay).toEqual([9, null, null, 19, 8]);
    // full resolution: no minHz, the columns as they are
    expect(envelopeColumns([1, 2], [3, 4], [3, 4], null)).toEqual({ x: [1, 2], max: [3, 4], min: [3, 4], overlay: null });
  });

  it("puts an overlay on the main x grid, keeping its peaks", () => {
    const target = [0, 1, 2, 3, 4];
    const srcX = [0, 0.4, 0.9, 1.1, 2.05, 2.6, 3.2];
    const srcY = [1, 2, 9, 3, 4, 5, 6];
    expect(resampleOnto(target, srcX, srcY)).toEqual([2, 9, 4, 6, null]);
    // sparse source: interpolated
    expect(resampleOnto([0, 0.25, 0.5], [0, 1], [0, 4])).toEqual([0, 1, 2]);
  });
});

describe("peak stepping", () => {
  const x = Array.from({ length: 21 }, (_, i) => 45 + i * 0.5);
  //           45  45.5 46  46.5 47  47.5 48  48.5 49  49.5 50  50.5 51  51.5 52  52.5 53 53.5 54 54.5 55
  const y = [-80, -79, -80, -78, -80, -70, -50, -70, -80, -60, 0, -60, -80, -69, -54, -70, -80, -79, -80, -79, -60];

  it("finds prominent local maxima only", () => {
    const peaks = findPeaks(y, { prominence: 6, halfWidth: 3 });
    expect(peaks.map((i) => x[i])).toEqual([48, 50, 52]); // small wiggles skipped, edge maximum at 55 Hz not a peak
  });

  it("steps right and left from the cursor, and stops at the ends", () => {
    const targets = findPeaks(y, { prominence: 6, halfWidth: 3 }).map((i) => ({ hz: x[i] }));
    expect(nextTarget(targets, 50, 1)?.hz).toBe(52);
    expect(nextTarget(targets, 50, -1)?.hz).toBe(48);
    expect(nextTarget(targets, 49.1, 1)?.hz).toBe(50);
    expect(nextTarget(targets, 49.9, 1, 0.25)?.hz).toBe(52); // within the tolerance of a line: on it, move on
    expect(nextTarget(targets, 52, 1)).toBeNull();
    expect(nextTarget(targets, 48, -1)).toBeNull();
  });

  it("skips a side lobe on the supply line's skirt (topographic prominence, not height)", () => {
    //         0     1    2    3   4   5    6    7    8     9    10   11   12    13
    const yy = [-100, -90, -60, -40, 0, -40, -55, -50, -70, -100, -98, -60, -99, -100];
    // index 7 stands 55 dB above the floor but only 5 dB above the dip (−55) to the higher skirt: not a peak
    expect(findPeaks(yy, { prominence: 10 })).toEqual([4, 11]);
    expect(findPeaks(yy, { prominence: 4 })).toEqual([4, 7, 11]);
  });

  it("counts a plateau once", () => {
    expect(findPeaks([0, 0, 5, 5, 5, 0, 0], { prominence: 3, halfWidth: 2 })).toEqual([2]);
  });
});

describe("zoom and pan", () => {
  const bounds = { min: 0, max: 5000 };
  it("zooms about a centre and stays inside the bounds", () => {
    expect(zoomRange({ min: 40, max: 60 }, 0.5, bounds)).toEqual({ min: 45, max: 55 });
    expect(zoomRange({ min: 40, max: 60 }, 0.5, bounds, 40)).toEqual({ min: 40, max: 50 });
    expect(zoomRange({ min: 0, max: 100 }, 2, bounds, 0)).toEqual({ min: 0, max: 200 });
    expect(zoomRange({ min: 0, max: 4000 }, 4, bounds)).toEqual(bounds);
    expect(zoomRange({ min: 49, max: 51 }, 0.001, bounds, 50, 0.5)).toEqual({ min: 49.75, max: 50.25 });
  });
  it("pans by a share of the view and clamps at the ends", () => {
    expect(panRange({ min: 40, max: 60 }, 0.25, bounds)).toEqual({ min: 45, max: 65 });
    expect(panRange({ min: 10, max: 30 }, -1, bounds)).toEqual({ min: 0, max: 20 });
    expect(clampRange({ min: 4990, max: 5010 }, bounds)).toEqual({ min: 4980, max: 5000 });
  });
  it("opens around the supply wide enough for the sidebands", () => {
    const w = supplyWindow(50, 0.03); // sf = 1.5 Hz → ±7.5 Hz
    expect(w.min).toBeCloseTo(42.5, 10);
    expect(w.max).toBeCloseTo(57.5, 10);
    expect(supplyWindow(60, null)).toEqual({ min: 55, max: 65 });
  });
});

describe("waveform envelope over one period", () => {
  it("holds the crest at every point when buckets are shorter than a cycle (no beat)", () => {
    // 60 Hz, 20 s, 2000 buckets of 10 ms: each bucket holds 0.6 cycle
    const f = 60;
    const n = 2000;
    const dt = 20 / n;
    const t = Array.from({ length: n }, (_, i) => i * dt);
    const max: number[] = [];
    const min: number[] = [];
    for (let i = 0; i < n; i++) {
      let a = Infinity;
      let b = -Infinity;
      for (let k = 0; k < 50; k++) {
        const v = 200 * Math.sin(2 * Math.PI * f * (i * dt + (k / 50) * dt));
        a = Math.min(a, v);
        b = Math.max(b, v);
      }
      min.push(a);
      max.push(b);
    }
    // the raw bucket maxima beat well below the crest
    expect(Math.min(...max)).toBeLessThan(150);
    const e = periodEnvelope(t, min, max, 1 / f);
    expect(e.window).toBe(2);
    expect(Math.min(...e.max)).toBeGreaterThan(199);
    expect(Math.max(...e.min)).toBeLessThan(-199);
  });
  it("leaves buckets that already span a period as they are", () => {
    const e = periodEnvelope([0, 0.1, 0.2], [-1, -2, -1], [1, 2, 1], 0.02);
    expect(e).toEqual({ min: [-1, -2, -1], max: [1, 2, 1], window: 1 });
  });
});
