import { describe, expect, it } from "vitest";
import { FIT_POINTS, machineClass, sidebandProjection } from "../../src/features/motor/lib/trend.ts";
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
