// Rolling-bearing defect frequencies (src/engine/bearings.ts) and their search on the vibration spectrum. The
// formulas are Harris & Kotzalas, Rolling Bearing Analysis (5th ed. 2006) and Randall & Antoni, MSSP 25(2) 2011, as
// collected in domain.md §7; the spectrum checks use synthetic captures with known truth (src/engine/synth.ts).
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  BEARING_TOLERANCE,
  bearingGeometryProblem,
  bearingSearchBand,
  defectFrequencies,
  defectOrders,
  sharedPeaks,
} from "../../src/engine/bearings.ts";
import { analyzeCapture } from "../../src/engine/analyze.ts";
import { synthCapture, type SynthVibration } from "../../src/engine/synth.ts";
import type { AnalysisResult, BearingGeometry, BearingLine } from "../../src/engine/types.ts";
import type { Peak } from "../../src/engine/spectrum.ts";

const close = (got: number, want: number, tol: number) => expect(Math.abs(got - want)).toBeLessThanOrEqual(tol);

describe("defect frequencies: domain.md check value 17", () => {
  it("Nb = 8, d = 10 mm, D = 50 mm, φ = 0°, 1800 rpm → FTF 12, BPFO 96, BPFI 144, BSF 72 Hz (±1e−9) — Harris/Randall formulas", () => {
    const f = defectFrequencies({ position: "DE", rollingElements: 8, elementDiameterMm: 10, pitchDiameterMm: 50, contactAngleDeg: 0 }, 1800 / 60);
    close(f.FTF, 12, 1e-9);
    close(f.BPFO, 96, 1e-9);
    close(f.BPFI, 144, 1e-9);
    close(f.BSF, 72, 1e-9);
  });

  it("Nb = 9, d = 7.94 mm, D = 38.5 mm, 1500 rpm → FTF 9.922, BPFO 89.30, BPFI 135.70, BSF 58.03 Hz (±0.01) — Harris/Randall formulas", () => {
    // contact angle left out: 0° is the default (deep-groove ball bearing under radial load, common practice)
    const f = defectFrequencies({ position: "NDE", rollingElements: 9, elementDiameterMm: 7.94, pitchDiameterMm: 38.5 }, 1500 / 60);
    close(f.FTF, 9.922, 0.01);
    close(f.BPFO, 89.3, 0.01);
    close(f.BPFI, 135.7, 0.01);
    close(f.BSF, 58.03, 0.01);
  });

  it("a contact angle lowers BPFI and raises BPFO and FTF by cos φ (Harris & Kotzalas 2006, the same formulas at φ = 40°)", () => {
    const g: BearingGeometry = { position: "DE", rollingElements: 12, elementDiameterMm: 12, pitchDiameterMm: 60, contactAngleDeg: 40 };
    const o = defectOrders(g);
    const r = (12 / 60) * Math.cos((40 * Math.PI) / 180); // 0.153209
    close(o.FTF, 0.5 * (1 - r), 1e-12);
    close(o.BPFO, 6 * (1 - r), 1e-12);
    close(o.BPFI, 6 * (1 + r), 1e-12);
    close(o.BSF, (60 / 24) * (1 - r * r), 1e-12);
    expect(o.BPFO).toBeGreaterThan(defectOrders({ ...g, contactAngleDeg: 0 }).BPFO);
  });
});

describe("defect frequencies: properties over plausible geometries (fast-check)", () => {
  const geometry = fc.record({
    rollingElements: fc.integer({ min: 3, max: 60 }),
    elementDiameterMm: fc.double({ min: 1, max: 120, noNaN: true }),
    // D/d from just above 1 to 20
    ratio: fc.double({ min: 1.05, max: 20, noNaN: true }),
    contactAngleDeg: fc.double({ min: 0, max: 89, noNaN: true }),
    shaftHz: fc.double({ min: 1, max: 250, noNaN: true }),
  });

  it("BPFI > BPFO, BPFO + BPFI = Nb·fr, FTF < fr/2, BPFO = Nb·FTF — follow from the formulas (domain.md §7)", () => {
    fc.assert(
      fc.property(geometry, ({ rollingElements, elementDiameterMm, ratio, contactAngleDeg, shaftHz }) => {
        const f = defectFrequencies({ position: "DE", rollingElements, elementDiameterMm, pitchDiameterMm: elementDiameterMm * ratio, contactAngleDeg }, shaftHz);
        const tol = 1e-9 * rollingElements * shaftHz;
        expect(f.BPFI).toBeGreaterThan(f.BPFO);
        expect(Math.abs(f.BPFO + f.BPFI - rollingElements * shaftHz)).toBeLessThanOrEqual(tol);
        expect(f.FTF).toBeLessThan(shaftHz / 2);
        expect(f.FTF).toBeGreaterThan(0);
        expect(Math.abs(f.BPFO - rollingElements * f.FTF)).toBeLessThanOrEqual(tol);
      }),
      { numRuns: 500, seed: 17 },
    );
  });
});

describe("geometry checks", () => {
  const ok: BearingGeometry = { position: "DE", rollingElements: 8, elementDiameterMm: 10, pitchDiameterMm: 50 };
  it("names what is wrong; the frequencies refuse an impossible bearing", () => {
    expect(bearingGeometryProblem(ok)).toBeNull();
    expect(bearingGeometryProblem({ ...ok, rollingElements: 2 })).toMatch(/3 to 60/);
    expect(bearingGeometryProblem({ ...ok, rollingElements: 8.5 })).toMatch(/whole number/);
    expect(bearingGeometryProblem({ ...ok, elementDiameterMm: 0 })).toMatch(/above 0/);
    expect(bearingGeometryProblem({ ...ok, pitchDiameterMm: 10 })).toMatch(/larger than/);
    expect(bearingGeometryProblem({ ...ok, contactAngleDeg: 90 })).toMatch(/90/);
    expect(bearingGeometryProblem({ ...ok, contactAngleDeg: -1 })).toMatch(/0°/);
    expect(() => defectOrders({ ...ok, pitchDiameterMm: 5 })).toThrow(/Bearing DE: the pitch diameter D must be larger/);
  });

  it("search band: 3 % below to 1 % above, plus two resolution cells (common practice: real lines sit 1–2 % low)", () => {
    expect(BEARING_TOLERANCE).toEqual({ lowPct: 3, highPct: 1 });
    const [lo, hi] = bearingSearchBand(100, 0.05);
    close(lo, 96.9, 1e-9);
    close(hi, 101.1, 1e-9);
  });
});

// The check-value bearing (Nb = 8, d = 10, D = 50: BPFO = 3.2·fr, BPFI = 4.8·fr, BSF = 2.4·fr) on a 4-pole 50 Hz motor.
const DE: BearingGeometry = { position: "DE", designation: "check 17", rollingElements: 8, elementDiameterMm: 10, pitchDiameterMm: 50, contactAngleDeg: 0 };
// A 9-ball bearing at the non-drive end (BPFO = 3.572·fr, BPFI = 5.428·fr).
const NDE: BearingGeometry = { position: "NDE", rollingElements: 9, elementDiameterMm: 7.94, pitchDiameterMm: 38.5 };

function analyse(vibration: SynthVibration, opts: { bearings?: BearingGeometry[]; phases?: 0 | 3; seed?: number } = {}) {
  const { capture, truth, nameplate } = synthCapture({ poles: 4, supplyHz: 50, slip: 0.02, sampleRate: 5000, durationS: 20, phases: opts.phases ?? 3, seed: opts.seed ?? 5, vibration });
  const result = analyzeCapture(capture, { ...nameplate, bearings: opts.bearings ?? [DE, NDE] });
  return { result, truth, nameplate, capture };
}
const line = (r: AnalysisResult, position: string, defect: string, harmonic = 1): BearingLine => {
  const b = r.bearings!.bearings.find((x) => x.position === position)!;
  return b.defects.find((d) => d.defect === defect)!.lines.find((l) => l.harmonic === harmonic)!;
};
const allLines = (r: AnalysisResult) => r.bearings!.bearings.flatMap((b) => b.defects.flatMap((d) => d.lines));

describe("search on the vibration spectrum (synthetic captures with known truth)", () => {
  const bpfoOrder = defectOrders(DE).BPFO; // 3.2
  const tone = { order: bpfoOrder * 0.985, vRms: 0.12 }; // 1.5 % low, 0.12 mm/s r.m.s.

  it("a BPFO tone 1.5 % below its geometric frequency is found in the band, at its frequency and level", () => {
    const { result, truth } = analyse({ shaftOrderLines: [tone] });
    const fr = truth.rotorHz; // 24.5 Hz
    expect(result.bearings!.shaftHz).toBeCloseTo(fr, 2);
    const l = line(result, "DE", "BPFO");
    close(l.expectedHz, bpfoOrder * fr, 0.02); // 78.4 Hz at the measured speed
    expect(l.status).toBe("found");
    expect(l.foundHz!).toBeGreaterThanOrEqual(l.searchHz[0]);
    expect(l.foundHz!).toBeLessThanOrEqual(l.searchHz[1]);
    close(l.foundHz!, tone.order * fr, 0.01); // 77.22 Hz, within a fifth of a resolution cell (0.05 Hz)
    close(l.velocityMmS!, 0.12, 0.12 * 0.02); // synthesised level ±2 %
    // level in the channel's unit (m/s² r.m.s.): a = v·2πf
    close(l.level!, (0.12e-3 * 2 * Math.PI * tone.order * fr), 0.02 * (0.12e-3 * 2 * Math.PI * tone.order * fr));
    expect(l.unit).toBe("m/s2");
    expect(l.channel).toBe("accel_h");
    expect(l.dbOverFloor!).toBeGreaterThan(20);
    // its marker sits at the found peak, labelled with the defect and the bearing end
    expect(result.markers).toContainEqual({ name: "BPFO DE", family: "bearing", hz: l.foundHz, level: l.velocityMmS, channel: "accel_h" });
    // nothing else is found: the other lines are noise only
    expect(allLines(result).filter((x) => x.status === "found").map((x) => x.label)).toEqual(["BPFO DE"]);
  });

  it("without the tone the same line is reported not found, and its marker marks the expected frequency", () => {
    const { result } = analyse({});
    const l = line(result, "DE", "BPFO");
    expect(l).toMatchObject({ status: "not found", foundHz: null, level: null, velocityMmS: null, dbOverFloor: null });
    expect(allLines(result).filter((x) => x.status === "found")).toEqual([]);
    expect(result.markers).toContainEqual({ name: "BPFO DE", family: "bearing", hz: l.expectedHz, level: 0, channel: "accel_h" });
  });

  it("harmonics and 2×BSF: a rolling-element defect at 2×BSF (domain.md §7) and 2×BPFI are found and labelled", () => {
    const o = defectOrders(NDE);
    const { result, truth } = analyse({ shaftOrderLines: [{ order: 2 * o.BSF * 0.988, vRms: 0.05 }, { order: 2 * o.BPFI * 0.99, vRms: 0.04 }] });
    const bsf2 = line(result, "NDE", "BSF", 2);
    expect(bsf2).toMatchObject({ status: "found", label: "2×BSF NDE" });
    close(bsf2.foundHz!, 2 * o.BSF * 0.988 * truth.rotorHz, 0.01);
    close(bsf2.velocityMmS!, 0.05, 0.002);
    const bpfi2 = line(result, "NDE", "BPFI", 2);
    expect(bpfi2.status).toBe("found");
    expect(line(result, "NDE", "BPFI", 1).status).toBe("not found");
    const names = result.markers.filter((m) => m.family === "bearing").map((m) => m.name);
    expect(names).toEqual(expect.arrayContaining(["2×BSF NDE", "2×BPFI NDE", "BPFI NDE", "FTF NDE", "BSF DE", "2×BSF DE"]));
    // 3× lines are marked only where found
    expect(names).not.toContain("3×BPFO DE");
  });

  it("a running-speed harmonic inside a band is not taken for a bearing line (3·fr in the BPFO band of a 3.04·fr bearing)", () => {
    const near: BearingGeometry = { position: "DE", rollingElements: 8, elementDiameterMm: 17.462, pitchDiameterMm: 72.5 }; // BPFO = 3.0366·fr
    const harmonics = [3, 4, 5, 6].map((k) => ({ order: k, vRms: 0.6 / k }));
    const { result } = analyse({ shaftOrderLines: harmonics }, { bearings: [near] });
    const l = line(result, "DE", "BPFO");
    expect(l.searchHz[0]).toBeLessThan(3 * result.bearings!.shaftHz!);
    expect(l.status).toBe("not found");
    expect(allLines(result).filter((x) => x.status === "found")).toEqual([]);
    // with a real outer-race line 1.5 % low beside it, the line is found and the 3× line is still left alone
    const withTone = analyse({ shaftOrderLines: [...harmonics, { order: 3.0366 * 0.985, vRms: 0.1 }] }, { bearings: [near] }).result;
    const t = line(withTone, "DE", "BPFO");
    expect(t.status).toBe("found");
    close(t.foundHz!, 3.0366 * 0.985 * withTone.bearings!.shaftHz!, 0.02);
  });

  it("one peak in two overlapping bands counts for the line that explains it best; the other says so", () => {
    const planned = [
      { harmonic: 2, expectedHz: 148.79 },
      { harmonic: 3, expectedHz: 150.67 },
      { harmonic: 1, expectedHz: 95.8 },
    ];
    const pk = (bin: number, hz: number) => ({ bin, hz }) as Peak;
    expect(sharedPeaks(planned, [pk(5000, 146.56), pk(5000, 146.56), pk(3000, 94.4)])).toEqual([[1, 0]]);
    // same harmonic: the one nearer its expected frequency 1.5 % low keeps it
    expect(sharedPeaks([{ harmonic: 1, expectedHz: 100 }, { harmonic: 1, expectedHz: 98.6 }], [pk(10, 97.1), pk(10, 97.1)])).toEqual([[0, 1]]);
  });

  it("the bearing result changes neither the rotor grade nor the vibration zone", () => {
    const { capture, nameplate } = synthCapture({ poles: 4, supplyHz: 50, slip: 0.02, sampleRate: 5000, durationS: 20, phases: 3, seed: 5, brokenBars: 1, vibration: { shaftOrderLines: [tone] } });
    const plain = analyzeCapture(capture, nameplate);
    const withBearings = analyzeCapture(capture, { ...nameplate, bearings: [DE, NDE] });
    expect(plain.bearings).toBeUndefined();
    expect(withBearings.brokenBar).toEqual(plain.brokenBar);
    expect(withBearings.vibration).toEqual(plain.vibration);
    expect(withBearings.markers.filter((m) => m.family !== "bearing")).toEqual(plain.markers);
  });

  it("several vibration channels: each keeps its own markers; the result names the channel where the line stands out most", () => {
    const h = synthCapture({ poles: 4, supplyHz: 50, slip: 0.02, sampleRate: 5000, durationS: 20, phases: 3, seed: 8, vibration: { axis: "H", shaftOrderLines: [{ ...tone, vRms: 0.03 }] } });
    const v = synthCapture({ poles: 4, supplyHz: 50, slip: 0.02, sampleRate: 5000, durationS: 20, phases: 0, seed: 9, vibration: { axis: "V", shaftOrderLines: [{ ...tone, vRms: 0.2 }] } });
    h.capture.channels.push(...v.capture.channels);
    const r = analyzeCapture(h.capture, { ...h.nameplate, bearings: [DE] });
    expect(r.bearings!.channels).toEqual(["accel_h", "accel_v"]);
    const l = line(r, "DE", "BPFO");
    expect(l).toMatchObject({ status: "found", channel: "accel_v" });
    close(l.velocityMmS!, 0.2, 0.004);
    const marks = r.markers.filter((m) => m.name === "BPFO DE");
    expect(marks.map((m) => m.channel).sort()).toEqual(["accel_h", "accel_v"]);
    close(marks.find((m) => m.channel === "accel_h")!.level, 0.03, 0.002);
  });
});

describe("when nothing can be searched", () => {
  it("no vibration channel: the frequencies at the measured speed are given with a note, no lines, no markers", () => {
    const { capture, nameplate, truth } = synthCapture({ poles: 4, supplyHz: 50, slip: 0.02, sampleRate: 5000, durationS: 20, phases: 3, seed: 2 });
    const r = analyzeCapture(capture, { ...nameplate, bearings: [DE] });
    expect(r.bearings!.note).toMatch(/No vibration channel/);
    const bpfo = r.bearings!.bearings[0].defects.find((d) => d.defect === "BPFO")!;
    close(bpfo.expectedHz!, 3.2 * truth.rotorHz, 0.02); // check value 17 geometry: BPFO = 3.2·fr
    expect(bpfo.lines).toEqual([]);
    expect(r.markers.some((m) => m.family === "bearing")).toBe(false);
  });

  it("speed not found: the note says the measured speed is needed; the orders (× fr) are still given", () => {
    // vibration channel with no 1× or pole-pass lines and no current: no speed line at all
    const { capture, nameplate } = synthCapture({ poles: 4, supplyHz: 50, slip: 0.02, sampleRate: 5000, durationS: 20, phases: 0, seed: 3, vibration: { oneXMmS: 0, twoXMmS: 0, twoLineMmS: 0 } });
    const r = analyzeCapture(capture, { ...nameplate, bearings: [DE] });
    expect(r.rpm).toBeNull();
    expect(r.bearings).toMatchObject({ shaftHz: null, rpm: null, note: expect.stringMatching(/measured shaft speed/) });
    expect(r.bearings!.bearings[0].defects.map((d) => d.orderOfShaft)).toEqual([0.4, 3.2, 4.8, 2.4]);
  });

  it("lines above what the sample rate holds are 'above band', unsearched and unmarked; the lower ones are searched", () => {
    // 2-pole motor at 1000 Hz: the band ends at fs/2.5 = 400 Hz; BPFI of the NDE bearing is 5.43·fr ≈ 266 Hz, its 2× is above
    const { capture, nameplate, truth } = synthCapture({ poles: 2, supplyHz: 50, slip: 0.015, sampleRate: 1000, durationS: 20, phases: 0, seed: 6, vibration: {} });
    const r = analyzeCapture(capture, { ...nameplate, bearings: [NDE] });
    const bpfi = r.bearings!.bearings[0].defects.find((d) => d.defect === "BPFI")!;
    close(bpfi.expectedHz!, 5.4281 * truth.rotorHz, 0.05);
    expect(bpfi.lines.map((l) => l.status)).toEqual(["not found", "above band", "above band"]);
    const names = r.markers.filter((m) => m.family === "bearing").map((m) => m.name);
    expect(names).toContain("BPFI NDE");
    expect(names.some((n) => n.startsWith("2×BPFI") || n.startsWith("3×"))).toBe(false);
  });

  it("a bearing with impossible geometry is left out with a quality warning; the analysis still runs", () => {
    const { capture, nameplate } = synthCapture({ poles: 4, supplyHz: 50, slip: 0.02, sampleRate: 5000, durationS: 10, phases: 3, seed: 4, vibration: {} });
    const r = analyzeCapture(capture, { ...nameplate, bearings: [{ ...DE, pitchDiameterMm: 8 }, NDE] });
    expect(r.quality).toContainEqual(expect.objectContaining({ code: "bearing-geometry", severity: "warning", message: expect.stringMatching(/Bearing DE left out: the pitch diameter D/) }));
    expect(r.bearings!.bearings.map((b) => b.position)).toEqual(["NDE"]);
    expect(r.brokenBar.assessable).toBe(true);
  });
});
