import { describe, expect, it } from "vitest";
import { bandCrossings, crossing, linearFit, projectSideband, tQuantile975 } from "../../src/features/motor/lib/projection.ts";

const DAY = 86_400_000;

describe("least-squares fit", () => {
  it("recovers an exact line with zero residual", () => {
    const fit = linearFit([0, 1, 2, 3], [10, 8, 6, 4])!;
    expect(fit.slope).toBeCloseTo(-2, 12);
    expect(fit.intercept).toBeCloseTo(10, 12);
    expect(fit.residualSd).toBeCloseTo(0, 12);
    expect(fit.r2).toBeCloseTo(1, 12);
  });

  it("matches hand-computed standard errors", () => {
    // x = 1..5, y = 2.1, 3.9, 6.2, 7.8, 10.1 → b = 1.99, a = 0.05, SSR = 0.107, s² = 0.107/3, Sxx = 10
    const fit = linearFit([1, 2, 3, 4, 5], [2.1, 3.9, 6.2, 7.8, 10.1])!;
    expect(fit.slope).toBeCloseTo(1.99, 10);
    expect(fit.intercept).toBeCloseTo(0.05, 10);
    const s2 = 0.107 / 3;
    expect(fit.residualSd ** 2).toBeCloseTo(s2, 10);
    expect(fit.seSlope).toBeCloseTo(Math.sqrt(s2 / 10), 10);
    expect(fit.seIntercept).toBeCloseTo(Math.sqrt(s2 * (1 / 5 + 9 / 10)), 10);
  });

  it("needs three points with spread in x", () => {
    expect(linearFit([1, 2], [1, 2])).toBeNull();
    expect(linearFit([1, 1, 1], [1, 2, 3])).toBeNull();
  });

  it("t quantiles from the table and the series agree with published values", () => {
    expect(tQuantile975(1)).toBeCloseTo(12.706, 3);
    expect(tQuantile975(10)).toBeCloseTo(2.228, 3);
    expect(tQuantile975(40)).toBeCloseTo(2.021, 2);
    expect(tQuantile975(120)).toBeCloseTo(1.98, 2);
  });
});

describe("crossing time and its uncertainty", () => {
  const xs = [0, 10, 20, 30, 40, 50];
  const ys = [56.2, 55.1, 54.3, 53.0, 52.2, 50.9]; // about −0.1 dB/day, a little noise
  const fit = linearFit(xs, ys)!;

  it("inverts the fitted line and gives the delta-method standard error", () => {
    const c = crossing(fit, 48)!;
    const expected = (48 - fit.intercept) / fit.slope;
    expect(c.x).toBeCloseTo(expected, 10);
    const se = (fit.residualSd / Math.abs(fit.slope)) * Math.sqrt(1 / fit.n + (expected - fit.meanX) ** 2 / fit.sxx);
    expect(c.se).toBeCloseTo(se, 10);
    expect(c.lo!).toBeLessThan(c.x);
    expect(c.hi!).toBeGreaterThan(c.x);
  });

  it("the interval ends are where the confidence band meets the level", () => {
    const [lo, hi] = bandCrossings(fit, 48);
    const t = tQuantile975(fit.n - 2);
    for (const x of [lo!, hi!]) {
      const half = t * fit.residualSd * Math.sqrt(1 / fit.n + (x - fit.meanX) ** 2 / fit.sxx);
      const line = fit.intercept + fit.slope * x;
      expect(Math.min(Math.abs(line + half - 48), Math.abs(line - half - 48))).toBeLessThan(1e-8);
    }
  });

  it("an insignificant slope leaves the interval open on one side", () => {
    const noisy = linearFit([0, 1, 2, 3, 4], [50, 52, 49, 51, 49.6])!;
    expect(noisy.slope).toBeLessThan(0);
    const [lo, hi] = bandCrossings(noisy, 40);
    expect(hi).toBeNull();
    expect(lo).not.toBeNull();
  });

  it("no crossing ahead when the line moves away", () => {
    const up = linearFit([0, 1, 2, 3], [50, 51, 52, 53])!;
    expect(crossing(up, 48, 3)).toBeNull();
  });
});

describe("sideband projection to the next grade boundary", () => {
  const t0 = Date.UTC(2026, 0, 1);
  const series = (dbs: number[], stepDays = 7) => dbs.map((db, i) => ({ t: t0 + i * stepDays * DAY, db }));

  it("projects a falling trend to the next boundary below the current depth", () => {
    const out = projectSideband(series([55.9, 55.2, 54.4, 53.8, 53.1, 52.3]));
    expect(out.kind).toBe("projection");
    if (out.kind !== "projection") return;
    const p = out.projection;
    expect(p.boundaryDb).toBe(48);
    expect(p.nextGrade).toBe("R3");
    expect(p.crossingMs).toBeGreaterThan(t0 + 35 * DAY);
    // about −0.1 dB/day from ~52.3 dB → ~4.3 dB / 0.1 ≈ 6 weeks after the last point
    const daysAfterLast = (p.crossingMs - (t0 + 35 * DAY)) / DAY;
    expect(daysAfterLast).toBeGreaterThan(30);
    expect(daysAfterLast).toBeLessThan(60);
    expect(p.seDays).toBeGreaterThan(0);
    expect(p.loMs).toBeLessThanOrEqual(p.crossingMs);
    expect(p.hiMs!).toBeGreaterThan(p.crossingMs);
  });

  it("picks the boundary below the latest measurement even when the fit is still above the one before", () => {
    // fit at the last point ≈ 43 dB (R3) but the last capture measured 40.9 dB (R4): next is 36 dB (R5)
    const out = projectSideband(series([46.5, 46.2, 45.6, 45.1, 44.8, 40.9]));
    expect(out.kind).toBe("projection");
    if (out.kind === "projection") {
      expect(out.projection.currentDb).toBeGreaterThan(42);
      expect(out.projection.boundaryDb).toBe(36);
      expect(out.projection.nextGrade).toBe("R5");
    }
  });

  it("says so when the trend is not worsening or there are too few points", () => {
    expect(projectSideband(series([50, 50.5, 51, 51.2])).kind).toBe("not-worsening");
    expect(projectSideband(series([50, 49]))).toEqual({ kind: "too-few", needed: 4, have: 2 });
    expect(projectSideband(series([34, 33, 32, 31])).kind).toBe("past-last-boundary");
  });
});
