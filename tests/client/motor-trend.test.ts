import { describe, expect, it } from "vitest";
import { FIT_POINTS, machineClass, sidebandProjection, truncationNote } from "../../src/features/motor/lib/trend.ts";
import type { TrendPoint } from "../../src/features/motor/api/get-motor.ts";

const point = (day: number, sidebandDb: number | null, rotorAssessable = true): TrendPoint => ({
  takenAt: new Date(Date.UTC(2026, 6, 1) + day * 86_400_000).toISOString(),
  captureId: day,
  analysisId: day,
  loadPct: 80,
  slip: 0.01,
  rpm: 1485,
  sidebandDb,
  rotorGrade: null,
  rotorAssessable,
  vibrationRms: 1,
  vibrationZone: "A",
  supplyHz: 50,
});

describe("machine class for the ISO zone lines", () => {
  it("uses the nameplate when given", () => {
    expect(machineClass({ machineGroup: 1, support: "flexible", ratedKw: 50 })).toEqual({ group: 1, support: "flexible", assumed: false });
    expect(machineClass({ machineGroup: "2", support: "rigid", ratedKw: 500 })).toEqual({ group: 2, support: "rigid", assumed: false });
  });
  it("assumes from rated power (> 300 kW: group 1) and rigid support otherwise, and says so", () => {
    expect(machineClass({ machineGroup: null, support: null, ratedKw: 400 })).toEqual({ group: 1, support: "rigid", assumed: true });
    expect(machineClass({ machineGroup: null, support: null, ratedKw: 160 })).toEqual({ group: 2, support: "rigid", assumed: true });
  });
});

describe("which captures feed the projection", () => {
  it("skips not-assessable captures and missing depths, and keeps the most recent ones", () => {
    const pts = [
      ...Array.from({ length: 20 }, (_, i) => point(i * 7, 60 - i * 0.4)),
      point(141, 30, false), // light load: not graded, must not pull the fit down
      point(142, null),
    ];
    const { used, outcome } = sidebandProjection(pts);
    expect(used).toHaveLength(FIT_POINTS);
    expect(used.every((u) => u.db > 50)).toBe(true);
    expect(outcome.kind).toBe("projection");
    if (outcome.kind === "projection") expect(outcome.projection.boundaryDb).toBe(48);
  });
});

describe("the note when the server sent only the newest readings", () => {
  const pts = Array.from({ length: 5000 }, (_, i) => point(i, 60));
  it("says how many are shown, of how many, from when, and how many older ones are left out", () => {
    // Noon UTC: the same calendar day in any time zone the tests run in.
    expect(truncationNote({ points: pts, truncated: true, total: 6120, shownFrom: "2026-07-01T12:00:00Z" })).toBe(
      "Showing the newest 5,000 of 6,120 readings, from 01 Jul 2026; the 1,120 older ones are not drawn.",
    );
    expect(truncationNote({ points: pts, truncated: true, total: 5001, shownFrom: pts[0].takenAt })).toMatch(/the 1 older one is not drawn\.$/);
  });
  it("is nothing when the answer holds the whole history, or has not come yet", () => {
    expect(truncationNote({ points: pts.slice(0, 3), truncated: false, total: 3, shownFrom: pts[0].takenAt })).toBeNull();
    expect(truncationNote(undefined)).toBeNull();
  });
});
