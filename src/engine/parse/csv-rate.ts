// The sample rate of a CSV capture, and the rule its time column must follow. Shared by the full parser (csv.ts) and
// the streaming validator (csv-stream.ts). Order of the rules: a given rate wins, then a rate from a comment line,
// then the time column, which must then be strictly increasing and uniform.

import { CaptureParseError, formatHz } from "./errors.ts";
import type { CsvHeader } from "./csv-header.ts";

export function checkRateOption(sampleRate: number | undefined): void {
  if (sampleRate !== undefined && !(Number.isFinite(sampleRate) && sampleRate > 0)) {
    throw new CaptureParseError("no-sample-rate", `The sample rate given (${sampleRate}) is not a positive number of Hz.`);
  }
}

export function noRowsError(header: CsvHeader): CaptureParseError {
  return new CaptureParseError(
    "no-numeric-data",
    header.hasHeader ? `The file has a header (line ${header.headerLine}) but no rows of numbers after it.` : "The file has no rows of numbers.",
    { line: header.headerLine || undefined },
  );
}

export function noSampleRateError(): CaptureParseError {
  return new CaptureParseError(
    "no-sample-rate",
    "The file does not say its sample rate. Add a first column of time in seconds named \"time_s\", " +
      "or a line \"# sample_rate=10000\" (your rate in Hz) above the header, or enter the sample rate when uploading.",
  );
}

/**
 * The time column's rule, fixed by its first and last value and its printing resolution: every step may differ
 * from the mean step by 1e-3 of it plus the resolution; no value may wander more than half a step (plus the
 * resolution) from the straight line through first and last.
 */
export interface TimeColumnRule {
  name: string;
  toSeconds: number;
  rows: number;
  t0: number;
  tLast: number;
  /** Mean step, in the column's unit. */
  dt: number;
  /** Printing resolution of the time values (10^smallest decimal exponent), 0 when unknown. */
  resolution: number;
  stepTolerance: number;
  driftTolerance: number;
}

/** The rule for a time column of `rows` values from t0 to tLast (at least two rows, else no-sample-rate). */
export function timeColumnRule(name: string, toSeconds: number, rows: number, t0: number, tLast: number, firstColumnDigitExp: number): TimeColumnRule {
  if (rows < 2) {
    throw new CaptureParseError("no-sample-rate", `The time column "${name}" needs at least two rows to give the sample rate.`);
  }
  const dt = (tLast - t0) / (rows - 1);
  const resolution = Number.isFinite(firstColumnDigitExp) ? 10 ** firstColumnDigitExp : 0;
  const roundoff = 4 * Number.EPSILON * Math.max(Math.abs(t0), Math.abs(tLast));
  const stepTolerance = 1e-3 * Math.abs(dt) + resolution + 2 * roundoff;
  const driftTolerance = 0.5 * Math.abs(dt) + resolution + roundoff;
  return { name, toSeconds, rows, t0, tLast, dt, resolution, stepTolerance, driftTolerance };
}

/**
 * Checks the steps into rows firstRow … firstRow + count - 1, whose times are time[0 … count); `before` is the time
 * of row firstRow - 1 (unused when firstRow is 0). Throws at the first row that breaks the rule; lineOf gives a
 * row's line number (only called then).
 */
export function checkTimeSteps(rule: TimeColumnRule, time: ArrayLike<number>, firstRow: number, count: number, before: number, lineOf: (row: number) => number): void {
  const { t0, dt, stepTolerance, driftTolerance } = rule;
  let prev = before;
  let k = 0;
  if (firstRow === 0 && count > 0) {
    prev = time[0];
    k = 1;
  }
  for (; k < count; k++) {
    const i = firstRow + k;
    const value = time[k];
    const step = value - prev;
    if (step < 0) throw timeBackwardsError(rule, value, prev, lineOf(i), lineOf(i - 1));
    if (step === 0) throw timeRepeatsError(rule, value, lineOf(i));
    if (Math.abs(step - dt) > stepTolerance) {
      const line = lineOf(i);
      throw new CaptureParseError(
        "time-not-uniform",
        `Line ${line}: the time step is ${formatTime(rule, step)} but the file's average step is ${formatTime(rule, dt)}. ` +
          `Samples must be evenly spaced with no gaps.${COARSE}`,
        { line, column: 1 },
      );
    }
    if (Math.abs(value - (t0 + i * dt)) > driftTolerance) {
      const line = lineOf(i);
      throw new CaptureParseError(
        "time-not-uniform",
        `Line ${line}: time ${formatTime(rule, value)} has drifted from the even spacing (expected ${formatTime(rule, t0 + i * dt)}); the sample rate changes within the file.`,
        { line, column: 1 },
      );
    }
    prev = value;
  }
}

const COARSE = ` If the time column is rounded too coarsely, give the sample rate instead (a line "# sample_rate=10000" above the header).`;

function formatTime(rule: TimeColumnRule, v: number): string {
  const t = rule.toSeconds;
  const unitWord = t === 1 ? "s" : t === 1e-3 ? "ms" : t === 1e-6 ? "µs" : "ns";
  return `${Number(v.toPrecision(6))} ${unitWord}`;
}

export function timeBackwardsError(rule: TimeColumnRule, value: number, prev: number, line: number, prevLine: number): CaptureParseError {
  return new CaptureParseError(
    "time-decreasing",
    `Line ${line}: time goes backwards (${formatTime(rule, value)} after ${formatTime(rule, prev)} on line ${prevLine}). ` +
      `The rows must be in time order; the file may be two captures joined together.`,
    { line, column: 1 },
  );
}

export function timeRepeatsError(rule: TimeColumnRule, value: number, line: number): CaptureParseError {
  return new CaptureParseError("time-not-uniform", `Line ${line}: time ${formatTime(rule, value)} repeats the previous line's time.${COARSE}`, { line, column: 1 });
}

/**
 * The sample rate a time column that passed checkTimeSteps implies, snapped to a whole number of Hz when the time
 * values cannot tell it apart from one (their printed resolution over the capture's span).
 */
export function rateFromTimeColumn(rule: TimeColumnRule): number {
  const rate = 1 / (rule.dt * rule.toSeconds);
  const whole = Math.round(rate);
  const span = rule.tLast - rule.t0;
  const uncertainty = Math.max(1e-9, (2 * rule.resolution) / span);
  const sampleRate = whole > 0 && Math.abs(rate - whole) <= uncertainty * rate ? whole : rate;
  if (!Number.isFinite(sampleRate) || sampleRate <= 0) {
    throw new CaptureParseError("no-sample-rate", `The time column "${rule.name}" does not give a usable sample rate (${formatHz(sampleRate)}).`);
  }
  return sampleRate;
}
