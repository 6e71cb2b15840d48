// What the cursor reads on a peak (src/features/spectrum/lib/cursor-resolve.ts) and how many decimals it shows:
// the engine's marker frequency when the peak is one of its lines, else the peak's bin, else only its bucket; the
// decimals follow how precisely the frequency is known. Numbers from sample-data/broken-bars-2.wav (invented
// data): 5 kHz × 30 s, so 1/T = 0.0333 Hz and bins 5000/2^18 = 0.0191 Hz apart; supply 49.9805 Hz, slip 0.7234 %.
import { describe, expect, it } from "vitest";
import { hzDecimals, lineBin, markerPrecisionHz, resolveCursor, type BinPoints } from "../../src/features/spectrum/lib/cursor-resolve.ts";
import { cursorReadout } from "../../src/features/spectrum/lib/viewer-math.ts";

const binHz = 5000 / 262144;
const resolutionHz = 1 / 30;
const supplyHz = 49.9805;
const slip = 0.007234;
const markers = [
  { name: "f − 2sf", hz: 49.2591 },
  { name: "f", hz: 49.9805 },
  { name: "f + 2sf", hz: 50.6991 },
];
const bin = (k: number) => k * binHz;

// The full range, decimated to 2000 buckets of 1.25 Hz: each point at its bucket's max bin. The bucket 48.75–50 Hz
// holds both f − 2sf (bin 2583, −32.8 dB) and the supply (bin 2620, −0.2 dB): it shows the supply.
const fullRange: BinPoints = { x: [bin(2557), bin(2620), bin(2658), bin(2724)], max: [-98, -0.2, -35.5, -97], decimated: true };
const ctx = { binHz, resolutionHz, bucketHz: 1.2500095, markers };
// The window of ±32 bins the viewer fetches around a cursor: every bin.
const windowAround = (centre: number, levels: Record<number, number>): BinPoints => {
  const ks = Array.from({ length: 65 }, (_, i) => centre - 32 + i);
  return { x: ks.map(bin), max: ks.map((k) => levels[k] ?? -100), decimated: false };
};

describe("readout decimals follow what is known", () => {
  it("the last digit is no finer than the precision and at most ten times coarser", () => {
    expect(hzDecimals(1.25)).toBe(0); // a bucket
    expect(hzDecimals(binHz)).toBe(2); // a bin
    expect(hzDecimals(resolutionHz)).toBe(2);
    expect(hzDecimals(markerPrecisionHz(resolutionHz))).toBe(3); // a marker: 1/T / 10
    expect(hzDecimals(0.1)).toBe(1);
    expect(hzDecimals(1)).toBe(0);
    expect(hzDecimals(1e-7)).toBe(4); // at most the engine's 4
    expect(hzDecimals(0)).toBe(4);
  });

  it("every number derived from the frequency keeps to its precision", () => {
    const bucket = cursorReadout(50.583, -0.03, supplyHz, slip, 20, 1.25);
    expect([bucket.hzDigits, bucket.orderDigits, bucket.label]).toEqual([0, 2, "f + 2sf"]);
    const atBin = cursorReadout(bin(2658), -35.5, supplyHz, slip, 20, binHz);
    expect([atBin.hzDigits, atBin.orderDigits, atBin.label]).toEqual([2, 3, "f + 1.98sf"]);
    // without a precision, as before
    expect(cursorReadout(50.583, 0, supplyHz, slip).hzDigits).toBe(3);
    expect(cursorReadout(50.583, 0, supplyHz, slip).label).toBe("f + 1.67sf");
    // a far line in plain hertz, as many decimals as its bin allows
    expect(cursorReadout(1091.2555, -51.3, supplyHz, slip, 20, binHz).label).toBe("f + 1041.28 Hz");
  });
});

describe("the cursor on a peak at full range (decimated)", () => {
  it("on the supply line: the engine's f, to 3 decimals, with its bin's level (not a bucket's centre, ±0.6 Hz off)", () => {
    // a click snaps to the drawn max: the supply's bin 49.9672 Hz, the marker f is 0.013 Hz from it
    const r = resolveCursor({ at: "peak", hz: bin(2620) }, [], fullRange, ctx);
    expect(r).toMatchObject({ hz: 49.9805, level: -0.2, source: "marker", marker: { name: "f" } });
    const read = cursorReadout(r.hz, r.level, supplyHz, slip, 20, r.precisionHz);
    expect(read.hz.toFixed(read.hzDigits)).toBe("49.980");
    expect(read.label).toBe("f");
  });

  it("on a peak that is no marker: its bin, to 2 decimals", () => {
    const r = resolveCursor({ at: "peak", hz: bin(2724) }, [], fullRange, ctx);
    expect(r).toMatchObject({ hz: bin(2724), level: -97, source: "bin", marker: null, precisionHz: binHz });
    expect(hzDecimals(r.precisionHz)).toBe(2);
  });

  it("stepped to a marker hidden in a stronger line's bucket: its frequency now, its level once the window is in", () => {
    const before = resolveCursor({ at: "marker", hz: 49.2591, marker: markers[0] }, [], fullRange, ctx);
    expect(before).toMatchObject({ hz: 49.2591, level: null, source: "marker" }); // not the supply's −0.2 dB
    const win = windowAround(2583, { 2582: -36, 2583: -32.8, 2584: -34.1, 2586: -20 });
    const after = resolveCursor({ at: "marker", hz: 49.2591, marker: markers[0] }, [win], fullRange, ctx);
    expect(after).toMatchObject({ hz: 49.2591, level: -32.8, source: "marker" }); // −20 dB at 2586 is 0.057 Hz off: not it
  });

  it("only the bucket known: its width sets the decimals", () => {
    const far: BinPoints = { x: [bin(100), bin(2620)], max: [-90, -0.2], decimated: true };
    const r = lineBin(49.3, [], far, ctx);
    expect(r).toMatchObject({ source: "bucket", level: null, precisionHz: 1.2500095 });
    expect(hzDecimals(r.precisionHz)).toBe(0);
  });
});

describe("the cursor at full resolution", () => {
  it("snaps to the line's bin within one resolution cell and reads the marker there", () => {
    const win = windowAround(2658, { 2657: -40, 2658: -35.5, 2659: -37, 2680: -60 });
    const view: BinPoints = { ...win };
    // a click one bin off on the skirt
    const r = resolveCursor({ at: "peak", hz: bin(2659) }, [view], view, ctx);
    expect(r).toMatchObject({ hz: 50.6991, level: -35.5, source: "marker", marker: { name: "f + 2sf" } });
    // away from every marker: the bin
    const plain = resolveCursor({ at: "peak", hz: bin(2680) }, [view], view, ctx);
    expect(plain).toMatchObject({ hz: bin(2680), source: "bin", precisionHz: binHz });
  });

  it("a window that does not cover the cursor is not used", () => {
    const win = windowAround(1000, {});
    const r = resolveCursor({ at: "peak", hz: bin(2724) }, [win], fullRange, ctx);
    expect(r).toMatchObject({ hz: bin(2724), level: -97, source: "bin" });
  });
});
