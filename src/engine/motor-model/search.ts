// Small numeric helpers: golden-section search for an extremum and bisection for a root.
// The functions here are smooth and (for torque vs slip) unimodal, so these simple methods are enough.

const GOLDEN = (Math.sqrt(5) - 1) / 2;

/** x in [lo, hi] that maximises f, assuming f is unimodal there. */
export function goldenMax(f: (x: number) => number, lo: number, hi: number, tol = 1e-10, maxIter = 200): number {
  let a = lo;
  let b = hi;
  let c = b - GOLDEN * (b - a);
  let d = a + GOLDEN * (b - a);
  let fc = f(c);
  let fd = f(d);
  for (let i = 0; i < maxIter && b - a > tol * (1 + Math.abs(a) + Math.abs(b)); i++) {
    if (fc > fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - GOLDEN * (b - a);
      fc = f(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + GOLDEN * (b - a);
      fd = f(d);
    }
  }
  const mid = (a + b) / 2;
  // The ends can win when the extremum sits on the boundary of the interval.
  return [lo, mid, hi].reduce((best, x) => (f(x) > f(best) ? x : best), mid);
}

/**
 * Maximiser of f over [lo, hi]: a coarse grid first (so a wrong bracket cannot trap the search),
 * then golden-section between the grid neighbours of the best sample. When the grid shows more than one
 * local maximum (a deep-bar rotor's torque can peak both near running speed and at standstill), the few
 * best are each refined and the highest wins; for a unimodal f this is the single refinement.
 */
export function gridThenGoldenMax(f: (x: number) => number, grid: number[]): number {
  const values = grid.map(f);
  let best = 0;
  for (let i = 1; i < grid.length; i++) if (values[i] > values[best]) best = i;
  const peaks = [best];
  for (let i = 0; i < grid.length; i++) {
    if (i === best) continue;
    const left = i === 0 ? -Infinity : values[i - 1];
    const right = i === grid.length - 1 ? -Infinity : values[i + 1];
    if (values[i] > left && values[i] > right) peaks.push(i);
  }
  const refine = (i: number) => {
    const lo = grid[Math.max(0, i - 1)];
    const hi = grid[Math.min(grid.length - 1, i + 1)];
    return goldenMax(f, Math.min(lo, hi), Math.max(lo, hi));
  };
  const candidates = peaks
    .slice(1)
    .sort((a, b) => values[b] - values[a])
    .slice(0, 3)
    .map(refine);
  return candidates.reduce((x, c) => (f(c) > f(x) ? c : x), refine(best));
}

/** Root of a continuous f with f(lo) and f(hi) of opposite signs. */
export function bisect(f: (x: number) => number, lo: number, hi: number, tol = 1e-12, maxIter = 200): number {
  let a = lo;
  let b = hi;
  let fa = f(a);
  for (let i = 0; i < maxIter && Math.abs(b - a) > tol * (1 + Math.abs(a)); i++) {
    const m = (a + b) / 2;
    const fm = f(m);
    if (fm === 0) return m;
    if (fa < 0 === fm < 0) {
      a = m;
      fa = fm;
    } else b = m;
  }
  return (a + b) / 2;
}

/** n points spaced evenly in log10 between lo and hi (both > 0), ascending. */
export function logGrid(lo: number, hi: number, n: number): number[] {
  const a = Math.log10(lo);
  const b = Math.log10(hi);
  return Array.from({ length: n }, (_, i) => 10 ** (a + ((b - a) * i) / (n - 1)));
}

/**
 * Root of a continuous f with f(lo) and f(hi) of opposite signs, by Brent's method: inverse quadratic or secant
 * steps while they land well inside the bracket, bisection otherwise, so it never does worse than `bisect` and
 * usually needs a handful of evaluations instead of about forty. An infinite value of f counts by its sign (the
 * step falls back to bisection). Stops when the bracket is below tol·(1 + |x|).
 */
export function brentRoot(f: (x: number) => number, lo: number, hi: number, tol = 1e-12, maxIter = 200): number {
  let a = lo;
  let b = hi;
  let fa = f(a);
  let fb = f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  if (fa < 0 === fb < 0) return Math.abs(fa) < Math.abs(fb) ? a : b; // no sign change: the better end
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let i = 0; i < maxIter; i++) {
    if (fb < 0 === fc < 0) {
      // Keep the root between b and c.
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      [a, b, c] = [b, c, b];
      [fa, fb, fc] = [fb, fc, fb];
    }
    const tol1 = 0.5 * tol * (1 + Math.abs(b));
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol1 || fb === 0) return b;
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb) && Number.isFinite(fa) && Number.isFinite(fb) && Number.isFinite(fc)) {
      // Interpolate: secant when a = c, inverse quadratic otherwise.
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * m * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol1 * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = m;
        e = m;
      }
    } else {
      d = m;
      e = m;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol1 ? d : m > 0 ? tol1 : -tol1;
    fb = f(b);
  }
  return b;
}
