// Display decimation for spectra and waveforms: a plot is ~2000 pixels wide, a spectrum may have a million
// bins. Each pixel bucket keeps the min and the max of its bins, so a single narrow line (a sideband, a spike)
// survives at any zoom instead of being averaged away, and where in the bucket each of them sits (the x of the
// max bin and of the min bin), so a line is drawn and read at its own bin, never at the bucket's middle.

/** Values on a uniform grid: point i is at x0 + i·dx. */
export interface UniformSeries {
  x0: number;
  dx: number;
  values: ArrayLike<number>;
}

export interface Decimated {
  /** The bucket's centre (the point itself when not decimated). */
  x: number[];
  min: number[];
  max: number[];
  /** x of the point where each bucket's max occurs (the first, on a tie): a point of the grid, exactly. */
  maxX: number[];
  /** x of the point where each bucket's min occurs (the first, on a tie). */
  minX: number[];
  /** Nominal bucket width in x (points per bucket × dx); dx when not decimated. */
  bucketDx: number;
  /** False when the range held ≤ buckets points and every point is returned as is (min = max). */
  decimated: boolean;
  /** Index range [from, to) of the points covered. */
  from: number;
  to: number;
}

/** Indices of the points with x in [xMin, xMax]. */
export function indexRange(s: UniformSeries, xMin?: number, xMax?: number): [number, number] {
  const n = s.values.length;
  const lo = xMin === undefined || !Number.isFinite(xMin) ? 0 : Math.max(0, Math.ceil((xMin - s.x0) / s.dx - 1e-9));
  const hi = xMax === undefined || !Number.isFinite(xMax) ? n : Math.min(n, Math.floor((xMax - s.x0) / s.dx + 1e-9) + 1);
  return [Math.min(lo, n), Math.max(Math.min(lo, n), hi)];
}

/** Min/max per bucket over [xMin, xMax]; full resolution when the range holds ≤ buckets points. */
export function decimateMinMax(s: UniformSeries, opts: { xMin?: number; xMax?: number; buckets: number }): Decimated {
  const [from, to] = indexRange(s, opts.xMin, opts.xMax);
  const count = to - from;
  const buckets = Math.max(1, Math.floor(opts.buckets));
  const v = s.values;
  if (count <= buckets) {
    const x = new Array<number>(count);
    const vals = new Array<number>(count);
    for (let i = 0; i < count; i++) {
      x[i] = s.x0 + (from + i) * s.dx;
      vals[i] = v[from + i];
    }
    return { x, min: vals, max: vals.slice(), maxX: x.slice(), minX: x.slice(), bucketDx: s.dx, decimated: false, from, to };
  }
  const x = new Array<number>(buckets);
  const min = new Array<number>(buckets);
  const max = new Array<number>(buckets);
  const maxX = new Array<number>(buckets);
  const minX = new Array<number>(buckets);
  for (let b = 0; b < buckets; b++) {
    const i0 = from + Math.floor((b * count) / buckets);
    const i1 = from + Math.floor(((b + 1) * count) / buckets);
    let lo = Infinity;
    let hi = -Infinity;
    let iLo = i0;
    let iHi = i0;
    for (let i = i0; i < i1; i++) {
      const y = v[i];
      if (y < lo) {
        lo = y;
        iLo = i;
      }
      if (y > hi) {
        hi = y;
        iHi = i;
      }
    }
    x[b] = s.x0 + (i0 + (i1 - 1 - i0) / 2) * s.dx; // bucket centre
    min[b] = lo;
    max[b] = hi;
    // computed as x0 + i·dx, like the full-resolution points, so a bin's x is the same number in every view
    maxX[b] = s.x0 + iHi * s.dx;
    minX[b] = s.x0 + iLo * s.dx;
  }
  return { x, min, max, maxX, minX, bucketDx: (count / buckets) * s.dx, decimated: true, from, to };
}

/** A small least-recently-used cache with a size budget (bytes, as the caller counts them). */
export class LruCache<V> {
  private map = new Map<string, { value: V; size: number }>();
  private total = 0;
  constructor(private budget: number) {}
  get(key: string): V | undefined {
    const e = this.map.get(key);
    if (!e) return undefined;
    this.map.delete(key);
    this.map.set(key, e);
    return e.value;
  }
  set(key: string, value: V, size: number): void {
    const old = this.map.get(key);
    if (old) {
      this.total -= old.size;
      this.map.delete(key);
    }
    this.map.set(key, { value, size });
    this.total += size;
    while (this.total > this.budget && this.map.size > 1) {
      const [k, e] = this.map.entries().next().value as [string, { value: V; size: number }];
      this.map.delete(k);
      this.total -= e.size;
    }
  }
  /** Compute once per key even when several requests ask at the same time. */
  async getOrCompute(key: string, compute: () => Promise<{ value: V; size: number }>): Promise<V> {
    const hit = this.get(key);
    if (hit !== undefined) return hit;
    let p = this.pending.get(key);
    if (!p) {
      p = compute().then(({ value, size }) => {
        this.set(key, value, size);
        return value;
      });
      this.pending.set(key, p);
      p.finally(() => this.pending.delete(key)).catch(() => {});
    }
    return p;
  }
  private pending = new Map<string, Promise<V>>();
  clear() {
    this.map.clear();
    this.total = 0;
  }
}
