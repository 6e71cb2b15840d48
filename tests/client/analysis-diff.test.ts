import { describe, expect, it } from "vitest";
import { bearingsText, compareAnalyses, pickComparison } from "../../src/features/spectrum/lib/analysis-diff.ts";
import type { AnalysisVersion } from "../../src/lib/contracts.ts";

// "What changed" between two analyses of one capture: readings compared at the precision the screen shows,
// grades and zones with their direction, and what each analysis was computed from. Values are invented.
const nameplate = { poles: 4, ratedRpm: 1455, ratedHz: 50, ratedKw: 11, ratedVoltage: 400, ratedCurrent: 20, rotorBars: 28, machineGroup: 2, support: "rigid", driveFed: false };

function version(over: Partial<AnalysisVersion> = {}): AnalysisVersion {
  return {
    id: 1,
    version: 1,
    isCurrent: false,
    engineVersion: "1.1.0",
    nameplateVersion: 1,
    params: { nameplate, nameplateVersion: 1, engineVersion: "1.1.0" },
    createdAt: "2026-11-01T08:05:00.000Z",
    supplyHz: 50.001,
    slip: 0.03,
    rpm: 1455.0,
    loadPct: 100,
    sidebandDb: 55.2,
    rotorGrade: "R1",
    rotorAssessable: true,
    rotorReason: null,
    vibrationRms: null,
    vibrationZone: null,
    ...over,
  };
}

describe("compareAnalyses", () => {
  it("identical analyses: nothing changed, every reading listed as unchanged", () => {
    const d = compareAnalyses(version(), version({ id: 2, version: 2, isCurrent: true }));
    expect(d.readings).toEqual([]);
    expect(d.basis).toEqual([]);
    expect(d.unchanged).toEqual(["Rotor grade", "Sideband depth", "Load", "Slip", "Speed", "Supply", "Vibration", "Vibration zone"]);
    expect(d.from).toEqual({ id: 1, version: 1, createdAt: "2026-11-01T08:05:00.000Z" });
    expect(d.to.version).toBe(2);
  });

  it("a nameplate fix: load changes, old → new with the change; the nameplate field and version are named", () => {
    const older = version();
    const newer = version({
      id: 2,
      version: 2,
      isCurrent: true,
      nameplateVersion: 2,
      params: { nameplate: { ...nameplate, ratedRpm: 1440 }, nameplateVersion: 2, engineVersion: "1.1.0" },
      loadPct: 75,
    });
    const d = compareAnalyses(older, newer);
    expect(d.readings).toEqual([{ kind: "number", key: "loadPct", label: "Load", unit: "%", digits: 0, estimate: true, from: 100, to: 75, delta: -25 }]);
    expect(d.basis).toEqual([
      { key: "nameplateVersion", label: "Nameplate version", from: "v1", to: "v2" },
      { key: "nameplate.ratedRpm", label: "Full-load speed", from: "1455 rpm", to: "1440 rpm" },
    ]);
    expect(d.unchanged).not.toContain("Load");
  });

  it("compares at the precision shown: a difference hidden by rounding is no change; slip is compared and shown in %", () => {
    // supply shown to 3 decimals, speed to 1, sideband to 1, slip in % to 2
    const d = compareAnalyses(version(), version({ supplyHz: 50.0012, rpm: 1455.04, sidebandDb: 55.24, slip: 0.03004 }));
    expect(d.readings).toEqual([]);
    const e = compareAnalyses(version(), version({ slip: 0.0312, supplyHz: 50.0016 }));
    expect(e.readings.map((c) => c.key)).toEqual(["slip", "supplyHz"]);
    const slip = e.readings.find((c) => c.key === "slip")!;
    expect(slip).toMatchObject({ unit: "%", digits: 2, from: 3, delta: 0.12 });
    expect(slip.kind === "number" && slip.to).toBeCloseTo(3.12, 10);
    // the delta is of the values as shown (50.001 → 50.002), not of the raw ones
    expect(e.readings.find((c) => c.key === "supplyHz")).toMatchObject({ delta: 0.001 });
  });

  it("a reading that appears or disappears is a change with no delta", () => {
    const d = compareAnalyses(version({ loadPct: null }), version({ loadPct: 80 }));
    expect(d.readings).toEqual([expect.objectContaining({ key: "loadPct", from: null, to: 80, delta: null })]);
  });

  it("rotor grade: worse or better by grade number; to or from Not assessable has no direction; its reason counts", () => {
    const worse = compareAnalyses(version(), version({ rotorGrade: "R3", sidebandDb: 44.0 }));
    expect(worse.readings[0]).toEqual({
      kind: "grade",
      key: "rotorGrade",
      label: "Rotor grade",
      from: { grade: 1, assessable: true, reason: null },
      to: { grade: 3, assessable: true, reason: null },
      direction: "worse",
    });
    expect(worse.readings[1]).toMatchObject({ key: "sidebandDb", from: 55.2, to: 44, delta: -11.2 });
    expect(compareAnalyses(version({ rotorGrade: "R4" }), version({ rotorGrade: "R2" })).readings[0]).toMatchObject({ direction: "better" });

    const na = compareAnalyses(version(), version({ rotorGrade: null, rotorAssessable: false, rotorReason: "light load", sidebandDb: null }));
    expect(na.readings[0]).toMatchObject({ kind: "grade", from: { grade: 1, assessable: true }, to: { grade: null, assessable: false, reason: "light load" }, direction: null });

    const bothNa = { rotorGrade: null, rotorAssessable: false, sidebandDb: null };
    expect(compareAnalyses(version({ ...bothNa, rotorReason: "light load" }), version({ ...bothNa, rotorReason: "light load" })).readings).toEqual([]);
    expect(compareAnalyses(version({ ...bothNa, rotorReason: "light load" }), version({ ...bothNa, rotorReason: "speed not found" })).readings.map((c) => c.key)).toEqual(["rotorGrade"]);
    // a grade stored on a row marked not assessable is not a grade
    expect(compareAnalyses(version({ rotorGrade: "R2", rotorAssessable: false }), version({ rotorGrade: null, rotorAssessable: false })).readings).toEqual([]);
  });

  it("vibration: RMS in mm/s and the zone letter with its direction", () => {
    const d = compareAnalyses(version({ vibrationRms: 2.1, vibrationZone: "B" }), version({ vibrationRms: 4.85, vibrationZone: "C" }));
    expect(d.readings).toEqual([
      expect.objectContaining({ kind: "number", key: "vibrationRms", unit: "mm/s RMS", from: 2.1, to: 4.85, delta: 2.75 }),
      { kind: "zone", key: "vibrationZone", label: "Vibration zone", from: "B", to: "C", direction: "worse" },
    ]);
    expect(compareAnalyses(version({ vibrationZone: null }), version({ vibrationZone: "A" })).readings).toEqual([expect.objectContaining({ key: "vibrationZone", direction: null })]);
  });

  it("what the analyses were computed from: engine, bearings, drive-fed, unknown fields; rows without a nameplate", () => {
    const bearing = { position: "DE", designation: "6309", rollingElements: 8, elementDiameterMm: 17.5, pitchDiameterMm: 72.5, contactAngleDeg: 0 };
    const d = compareAnalyses(
      version({ engineVersion: "1.0.0" }),
      version({ engineVersion: "1.1.0", params: { nameplate: { ...nameplate, driveFed: true, bearings: [bearing], extraThing: 3 } } }),
    );
    expect(d.basis).toEqual([
      { key: "engineVersion", label: "Engine", from: "1.0.0", to: "1.1.0" },
      { key: "nameplate.driveFed", label: "Drive-fed", from: "no", to: "yes" },
      { key: "nameplate.bearings", label: "Bearings", from: "—", to: "DE 6309: 8 × 17.5 mm on 72.5 mm, 0°" },
      { key: "nameplate.extraThing", label: "extraThing", from: "—", to: "3" },
    ]);
    // older rows, or params without a nameplate: only the versions are compared
    expect(compareAnalyses(version({ params: {} }), version({ nameplateVersion: 2, params: { nameplate: { ...nameplate, ratedRpm: 1440 } } })).basis).toEqual([
      { key: "nameplateVersion", label: "Nameplate version", from: "v1", to: "v2" },
    ]);
  });

  it("bearingsText: both ends, contact angle defaulting to 0", () => {
    expect(bearingsText(undefined)).toBe("—");
    expect(bearingsText([])).toBe("—");
    expect(
      bearingsText([
        { position: "DE", rollingElements: 9, elementDiameterMm: 12.7, pitchDiameterMm: 60 },
        { position: "NDE", designation: "6206", rollingElements: 9, elementDiameterMm: 9.5, pitchDiameterMm: 46, contactAngleDeg: 15 },
      ]),
    ).toBe("DE: 9 × 12.7 mm on 60 mm, 0°; NDE 6206: 9 × 9.5 mm on 46 mm, 15°");
  });
});

describe("pickComparison", () => {
  const v3 = version({ id: 30, version: 3, isCurrent: true });
  const v2 = version({ id: 20, version: 2 });
  const v1 = version({ id: 10, version: 1 });

  it("the current one against the newest earlier version unless another earlier one is chosen", () => {
    expect(pickComparison([v3, v2, v1], null)).toEqual({ current: v3, earlier: [v2, v1], chosen: v2 });
    expect(pickComparison([v3, v2, v1], 10)?.chosen).toBe(v1);
    // choosing the current one, or an id from another capture, falls back to the newest earlier version
    expect(pickComparison([v3, v2, v1], 30)?.chosen).toBe(v2);
    expect(pickComparison([v3, v2, v1], 999)?.chosen).toBe(v2);
  });

  it("nothing to compare: one version, none, or none marked current", () => {
    expect(pickComparison([v3], null)).toBeNull();
    expect(pickComparison([], null)).toBeNull();
    expect(pickComparison([v2, v1], null)).toBeNull();
  });
});
