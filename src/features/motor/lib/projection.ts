// When will the sideband trend reach the next grade boundary? Ordinary least squares on (time, depth) and the
// inverse prediction of the time at which the fitted line meets the boundary, with its standard error by the
// delta method and an interval from the line's confidence band. Pure: the motor page and the tests use it.

/** Rotor grade boundaries, dB below supply: at or above 54 dB R1, 48–54 R2, 42–48 R3, 36–42 R4, below 36 R5. */
export const GRADE_BOUNDARIES_DB = [54, 48, 42, 36] as const;
export const GRADE_BELOW_BOUNDARY = ["R2", "R3", "R4", "R5"] as const;

export interface LinearFit {
  n: number;
  /** y = intercept + slope·x */
  intercept: number;
  slope: number;
  /** Residual standard deviation s = √(SSR / (n − 2)). */
  residualSd: number;
  seSlope: number;
  seIntercept: number;
  meanX: number;
  /** Σ(x − x̄)² */
  sxx: number;
  /** Coefficient of determination. */
  r2: number;
}

export function linearFit(xs: readonly number[], ys: readonly number[]): LinearFit | null {
  const n = Math.min(xs.length, ys.length);
  if (n < 3) return null;
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < n; i++) {
    sx += xs[i];
    sy += ys[i];
  }
  const meanX = sx / n;
  const meanY = sy / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = xs[i] - meanX;
    const dy = ys[i] - meanY;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  if (!(sxx > 0)) return null;
  const slope = sxy / sxx;
  const intercept = meanY - slope * meanX;
  let ssr = 0;
  for (let i = 0; i < n; i++) {
    const r = ys[i] - (intercept + slope * xs[i]);
    ssr += r * r;
  }
  const residualSd = Math.sqrt(ssr / (n - 2));
  return {
    n,
    intercept,
    slope,
    residualSd,
    seSlope: residualSd / Math.sqrt(sxx),
    seIntercept: residualSd * Math.sqrt(1 / n + (meanX * meanX) / sxx),
    meanX,
    sxx,
    r2: syy > 0 ? 1 - ssr / syy : 1,
  };
}

/** Two-sided 95 % quantile of Student's t with `df` degrees of freedom (table to 30, then a series in 1/df). */
export function tQuantile975(df: number): number {
  const table = [
    NaN, 12.706, 4.303, 3.182, 2.776, 2.571, 2.447, 2.365, 2.306, 2.262, 2.228, 2.201, 2.179, 2.16, 2.145, 2.131,
    2.12, 2.11, 2.101, 2.093, 2.086, 2.08, 2.074, 2.069, 2.064, 2.06, 2.056, 2.052, 2.048, 2.045, 2.042,
  ];
  if (df < 1) return NaN;
  if (df <= 30) return table[Math.floor(df)];
  // Cornish–Fisher expansion about the normal quantile z = 1.959964
  const z = 1.959964;
  const g1 = (z ** 3 + z) / 4;
  const g2 = (5 * z ** 5 + 16 * z ** 3 + 3 * z) / 96;
  return z + g1 / df + g2 / df ** 2;
}

/** Half-width of the 95 % confidence band of the fitted line at x. */
export function bandHalfWidth(fit: LinearFit, x: number): number {
  return tQuantile975(fit.n - 2) * fit.residualSd * Math.sqrt(1 / fit.n + (x - fit.meanX) ** 2 / fit.sxx);
}

export interface Crossing {
  /** x at which the fitted line meets the level. */
  x: number;
  /** Standard error of that x by the delta method: (s/|b|)·√(1/n + (x − x̄)²/Sxx). */
  se: number;
  /** 95 % interval: where the line's confidence band meets the level; null = unbounded on that side. */
  lo: number | null;
  hi: number | null;
}

/** Where the fitted line crosses `level`; null when the line is flat or moves away from it after `afterX`. */
export function crossing(fit: LinearFit, level: number, afterX = -Infinity): Crossing | null {
  if (fit.slope === 0) return null;
  const x = (level - fit.intercept) / fit.slope;
  if (!Number.isFinite(x) || x < afterX) return null;
  const se = (fit.residualSd / Math.abs(fit.slope)) * Math.sqrt(1 / fit.n + (x - fit.meanX) ** 2 / fit.sxx);
  const [lo, hi] = bandCrossings(fit, level);
  return { x, se, lo, hi };
}

/**
 * The x values where the upper and lower edges of the 95 % band meet `level` (Fieller's interval). Solves
 * (a + b·x − L)² = t²·s²·(1/n + (x − x̄)²/Sxx) for x. When the slope is not significantly different from zero the
 * band holds the level without end on one side, and that end is null.
 */
export function bandCrossings(fit: LinearFit, level: number): [number | null, number | null] {
  const t = tQuantile975(fit.n - 2);
  const k = t * t * fit.residualSd * fit.residualSd;
  const d = fit.intercept - level; // line: d + b·x
  const b = fit.slope;
  // (d + b x)² − k(1/n + (x − m)²/Sxx) = 0 → A x² + B x + C = 0
  const A = b * b - k / fit.sxx;
  const B = 2 * d * b + (2 * k * fit.meanX) / fit.sxx;
  const C = d * d - k / fit.n - (k * fit.meanX * fit.meanX) / fit.sxx;
  const xHat = -d / b;
  if (A === 0) {
    const root = -C / B;
    return xHat < root ? [null, root] : [root, null];
  }
  const disc = B * B - 4 * A * C;
  if (disc < 0) return [null, null]; // cannot happen for a real fit (f(x̂) < 0); kept for safety
  const r1 = (-B - Math.sqrt(disc)) / (2 * A);
  const r2 = (-B + Math.sqrt(disc)) / (2 * A);
  const small = Math.min(r1, r2);
  const large = Math.max(r1, r2);
  if (A > 0) return [small, large];
  // Slope not significant at 95 %: the band holds the level on an unbounded stretch containing x̂.
  return xHat >= large ? [large, null] : [null, small];
}

export interface SidebandProjection {
  fit: LinearFit;
  /** Latest fitted depth, dB. */
  currentDb: number;
  /** The next worse boundary below the current depth, and the grade beyond it. */
  boundaryDb: number;
  nextGrade: (typeof GRADE_BELOW_BOUNDARY)[number];
  /** Crossing time, ms since the epoch, with its standard error in days. */
  crossingMs: number;
  seDays: number;
  /** 95 % interval, ms; hiMs null when the trend is too uncertain to bound it. */
  loMs: number;
  hiMs: number | null;
}

export type ProjectionOutcome =
  | { kind: "projection"; projection: SidebandProjection }
  | { kind: "too-few"; needed: number; have: number }
  | { kind: "not-worsening"; fit: LinearFit; slopeDbPerDay: number }
  | { kind: "past-last-boundary"; fit: LinearFit };

const DAY_MS = 86_400_000;

/**
 * Projects the sideband depth (dB below supply; falling means worsening) to the next boundary. Times are in
 * ms; the fit runs in days since the first point for conditioning.
 */
export function projectSideband(points: readonly { t: number; db: number }[], minPoints = 4): ProjectionOutcome {
  const pts = points.filter((p) => Number.isFinite(p.t) && Number.isFinite(p.db)).sort((a, b) => a.t - b.t);
  if (pts.length < minPoints) return { kind: "too-few", needed: minPoints, have: pts.length };
  const t0 = pts[0].t;
  const xs = pts.map((p) => (p.t - t0) / DAY_MS);
  const fit = linearFit(
    xs,
    pts.map((p) => p.db),
  );
  if (!fit) return { kind: "too-few", needed: minPoints, have: pts.length };
  const lastX = xs[xs.length - 1];
  const currentDb = fit.intercept + fit.slope * lastX;
  if (fit.slope >= 0) return { kind: "not-worsening", fit, slopeDbPerDay: fit.slope };
  // The next boundary below both the latest measurement and the fitted line there: a motor measured at R4 is
  // projected to R5 even while the fit still sits just above the R3/R4 line.
  const lastDb = pts[pts.length - 1].db;
  const idx = GRADE_BOUNDARIES_DB.findIndex((b) => b < Math.min(currentDb, lastDb));
  if (idx === -1) return { kind: "past-last-boundary", fit };
  const boundaryDb = GRADE_BOUNDARIES_DB[idx];
  const c = crossing(fit, boundaryDb, lastX);
  if (!c) return { kind: "not-worsening", fit, slopeDbPerDay: fit.slope };
  return {
    kind: "projection",
    projection: {
      fit,
      currentDb,
      boundaryDb,
      nextGrade: GRADE_BELOW_BOUNDARY[idx],
      crossingMs: t0 + c.x * DAY_MS,
      seDays: c.se,
      loMs: t0 + Math.max(c.lo ?? lastX, lastX) * DAY_MS,
      hiMs: c.hi === null ? null : t0 + c.hi * DAY_MS,
    },
  };
}
