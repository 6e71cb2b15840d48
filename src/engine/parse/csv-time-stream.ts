// The time-column rule of csv-rate.ts for a file read once, front to back, in bounded memory.
//
// The rule compares every step and every value with the file's mean step, which is known only after the last row.
// So the first reading keeps a small sketch of the column (TimeColumnSketch): the smallest and largest step, and the
// distance of each value from a reference line, as min/max per block of rows (at most MAX_BLOCKS blocks, merged
// pairwise as the file grows). At the end it either proves that no row breaks the rule (then the verdict is the
// full parser's: the rate, or the first row where time stops increasing), or it cannot, and the file is read a
// second time with the rule fixed (TimeColumnCheck), which finds the first faulty row exactly as the full parser.
//
// Why the proof is sound:
// - Steps: fl(step - dt) is monotonic in step, so |fl(step - dt)| is largest at the smallest or the largest step.
//   Checking those two is exactly checking every step.
// - Drift: with r_i = t_i - (t0 + i·m) for the reference slope m, t_i - (t0 + i·dt) = r_i - i·(dt - m). Over a
//   block of rows a…b with r in [lo, hi] that lies in [lo - max(a·δ, b·δ), hi - min(a·δ, b·δ)], δ = dt - m. The
//   rounding of every quantity involved is a few units in the last place of |t0| + max|t| + rows·(|m| + |dt|); the
//   bound adds 1e-14 of that (about 90 units), so a block that passes cannot hold a row that fails.
// Anything not finite makes the proof give up (the second reading then decides).

import { timeBackwardsError, timeRepeatsError, checkTimeSteps, type TimeColumnRule } from "./csv-rate.ts";

/** The reference slope is taken from the first this many steps. */
const EARLY_ROWS = 4096;
/** At most this many blocks of residuals are kept. */
const MAX_BLOCKS = 2048;
/** Relative allowance for rounding in the drift bound (see above). */
const ROUNDING = 1e-14;

/** Where the time column first fails to increase: the row, its value and line, and the previous row's. */
interface Fault {
  row: number;
  value: number;
  prev: number;
  line: number;
  prevLine: number;
}

export class TimeColumnSketch {
  /** Rows seen, first and last time. */
  rows = 0;
  t0 = NaN;
  last = NaN;
  private lastLine = 0;
  private fault: Fault | null = null;
  private minStep = Infinity;
  private maxStep = -Infinity;
  private maxAbs = 0;
  private unprovable = false;
  private slope = NaN;
  private early: number[] = [];
  /** Closed blocks: first row, last row, smallest and largest residual, four numbers each. */
  private blocks = new Float64Array(4 * MAX_BLOCKS);
  private blockCount = 0;
  private blockRows = 1;
  private openFirst = 0;
  private openLast = 0;
  private openLo = Infinity;
  private openHi = -Infinity;
  private openCount = 0;

  /** The next `count` rows' times (time[0 … count)); lineOf gives the line of one of them (by its index in `time`). */
  add(time: Float64Array, count: number, lineOf: (k: number) => number): void {
    if (count === 0) return;
    const firstRow = this.rows;
    let k = 0;
    if (firstRow === 0) {
      this.t0 = time[0];
      this.last = time[0];
      this.maxAbs = Math.abs(time[0]);
      k = 1;
    }
    for (; k < count; k++) {
      const value = time[k];
      if (this.fault === null) {
        const step = value - this.last;
        if (step <= 0) {
          this.fault = { row: firstRow + k, value, prev: this.last, line: lineOf(k), prevLine: k > 0 ? lineOf(k - 1) : this.lastLine };
        } else {
          if (step < this.minStep) this.minStep = step;
          if (step > this.maxStep) this.maxStep = step;
          const abs = Math.abs(value);
          if (abs > this.maxAbs) this.maxAbs = abs;
          this.residual(firstRow + k, value);
        }
      }
      this.last = value;
    }
    this.rows = firstRow + count;
    this.lastLine = lineOf(count - 1);
  }

  /**
   * After the last row, with the rule its first and last time give: true when no row can break the rule (or the
   * first row where time stops increasing is certainly the first fault, which is then thrown); false when the
   * column must be read again with TimeColumnCheck.
   */
  settles(rule: TimeColumnRule): boolean {
    this.flush();
    if (!this.proves(rule)) return false;
    const fault = this.fault;
    if (fault) {
      if (fault.value - fault.prev < 0) throw timeBackwardsError(rule, fault.value, fault.prev, fault.line, fault.prevLine);
      throw timeRepeatsError(rule, fault.value, fault.line);
    }
    return true;
  }

  private proves(rule: TimeColumnRule): boolean {
    if (this.unprovable) return false;
    const { t0, dt, stepTolerance, driftTolerance } = rule;
    if (!Number.isFinite(dt) || !Number.isFinite(stepTolerance) || !Number.isFinite(driftTolerance)) return false;
    const checkedSteps = (this.fault ? this.fault.row : this.rows) - 1;
    if (checkedSteps <= 0) return true;
    if (!(Math.abs(this.maxStep - dt) <= stepTolerance && Math.abs(this.minStep - dt) <= stepTolerance)) return false;
    const delta = dt - this.slope;
    const margin = ROUNDING * (Math.abs(t0) + this.maxAbs + this.rows * (Math.abs(this.slope) + Math.abs(dt)));
    if (!Number.isFinite(delta) || !Number.isFinite(margin)) return false;
    const b = this.blocks;
    for (let j = 0; j < this.blockCount; j++) {
      const s1 = b[4 * j] * delta;
      const s2 = b[4 * j + 1] * delta;
      const worst = Math.max(Math.abs(b[4 * j + 3] - Math.min(s1, s2)), Math.abs(b[4 * j + 2] - Math.max(s1, s2)));
      if (!(worst + margin <= driftTolerance)) return false;
    }
    return true;
  }

  private residual(row: number, value: number): void {
    if (this.slope !== this.slope) {
      this.early.push(value);
      if (this.early.length === EARLY_ROWS) this.chooseSlope();
      return;
    }
    const r = value - (this.t0 + row * this.slope);
    if (!Number.isFinite(r)) {
      this.unprovable = true;
      return;
    }
    if (this.openCount === 0) {
      this.openFirst = row;
      this.openLo = r;
      this.openHi = r;
    } else {
      if (r < this.openLo) this.openLo = r;
      if (r > this.openHi) this.openHi = r;
    }
    this.openLast = row;
    if (++this.openCount === this.blockRows) this.closeBlock();
  }

  /** The mean step of the early rows (rows 1 … n follow row 0 at t0). */
  private chooseSlope(): void {
    const early = this.early;
    const n = early.length;
    this.early = [];
    this.slope = n > 0 ? (early[n - 1] - this.t0) / n : 0;
    if (!Number.isFinite(this.slope)) {
      this.unprovable = true;
      this.slope = 0;
    }
    for (let j = 0; j < n; j++) this.residual(j + 1, early[j]);
  }

  private closeBlock(): void {
    if (this.blockCount === MAX_BLOCKS) this.mergeBlocks();
    const at = 4 * this.blockCount++;
    this.blocks[at] = this.openFirst;
    this.blocks[at + 1] = this.openLast;
    this.blocks[at + 2] = this.openLo;
    this.blocks[at + 3] = this.openHi;
    this.openCount = 0;
  }

  /** Halves the number of blocks: each pair becomes one, and later blocks hold twice as many rows. */
  private mergeBlocks(): void {
    const b = this.blocks;
    const pairs = this.blockCount >> 1;
    for (let j = 0; j < pairs; j++) {
      const x = 8 * j;
      b[4 * j] = b[x];
      b[4 * j + 1] = b[x + 5];
      b[4 * j + 2] = Math.min(b[x + 2], b[x + 6]);
      b[4 * j + 3] = Math.max(b[x + 3], b[x + 7]);
    }
    this.blockCount = pairs;
    this.blockRows *= 2;
  }

  private flush(): void {
    if (this.slope !== this.slope) this.chooseSlope();
    if (this.openCount > 0) this.closeBlock();
  }
}

/** The second reading: the rule is known, every step is checked as the rows pass (checkTimeSteps, as the full parser). */
export class TimeColumnCheck {
  private rows = 0;
  private prev = NaN;
  private prevLine = 0;

  constructor(private readonly rule: TimeColumnRule) {}

  add(time: Float64Array, count: number, lineOf: (k: number) => number): void {
    if (count === 0) return;
    const firstRow = this.rows;
    const prevLine = this.prevLine;
    checkTimeSteps(this.rule, time, firstRow, count, this.prev, (row) => (row >= firstRow ? lineOf(row - firstRow) : prevLine));
    this.prev = time[count - 1];
    this.prevLine = lineOf(count - 1);
    this.rows = firstRow + count;
  }
}
