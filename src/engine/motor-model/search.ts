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
