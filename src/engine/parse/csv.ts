// CSV capture parser. Layout: optional "#"/"%" comment lines (which may state the sample rate), one header row
// naming the columns, an optional units row ("s,A,A,A"), then numeric rows.
//
// Decisions worth knowing:
// - Samples are returned as Float64Array, so numbers read back exactly as written.
// - Separator: comma, semicolon or tab, taken from the header line.
// - Decimal comma is accepted only with semicolon or tab separators, and only when the first 64 KiB of data
//   rows contain commas and no dots; the whole file then uses the comma. Otherwise the decimal mark is ".".
// - Sample rate: opts.sampleRate, else a comment line ("# sample_rate=10000", "# fs=10 kHz", "# dt=1e-4"), else a
//   first column named like a time column (t, time, time_s, seconds, "Time [s]", t_ms ...). A given rate wins over
//   the time column, which is then dropped unchecked (so a coarsely rounded time column can be overridden).
// - A rate derived from the time column is snapped to a whole number of Hz when the time values cannot tell
//   it apart from one (their printed resolution over the capture's span).
// - Blank lines and "#" comment lines between data rows are skipped; one trailing separator on a row is allowed.
// - A header row that is all numbers means there is no header: columns are named col1..colN, kind "other".
// - Cells may be wrapped in double quotes; spaces around cells are ignored.

import type { Capture, Channel } from "../types.ts";
import { classifyColumns, timeColumnInfo, normaliseUnit } from "./channel-names.ts";
import { sampleRateFromComment } from "./csv-metadata.ts";
import { CaptureParseError, DEFAULT_MIN_SAMPLES, checkMinSamples, formatHz } from "./errors.ts";
import { SCAN_NON_FINITE_TEXT, newScanResult, parseDecimal, scanNumber } from "./number-scan.ts";
import { cellTextForMessage, decodeUtf8, detectSeparator, isBlank, lineEnd, skipEol, splitCells } from "./text-lines.ts";

// Byte values, declared here rather than imported from text-lines.ts: when the module is loaded as CommonJS (tsx,
// the worker threads) an imported binding is a getter call on the exporting module, several per byte in the row
// loop (measured: a third of the parse time of a 2 MB CSV). Same values as text-lines.ts.
const LF = 10;
const CR = 13;
const TAB = 9;
const SPACE = 32;
const QUOTE = 34;
const COMMA = 44;
const SEMICOLON = 59;
const HASH = 35;
const PERCENT = 37;
/** number-scan.ts SCAN_OK, local for the same reason. */
const SCAN_OK = 0;

export interface CsvParseOptions {
  /** Sample rate in Hz; overrides any rate in the file. */
  sampleRate?: number;
  /** Fewer samples per channel than this is an error (default 256). */
  minSamples?: number;
}

interface Header {
  names: string[];
  separator: number | null;
  /** Line number of the header row (0 when the file has no header). */
  headerLine: number;
  /** Byte offset where the data rows start, and their first line number. */
  dataStart: number;
  dataLine: number;
  commentRate?: number;
  hasHeader: boolean;
}

export function parseCsv(bytes: Uint8Array, opts: CsvParseOptions = {}): Capture {
  const minSamples = opts.minSamples ?? DEFAULT_MIN_SAMPLES;
  if (opts.sampleRate !== undefined && !(Number.isFinite(opts.sampleRate) && opts.sampleRate > 0)) {
    throw new CaptureParseError("no-sample-rate", `The sample rate given (${opts.sampleRate}) is not a positive number of Hz.`);
  }
  const header = readHeader(bytes);
  const timeInfo = header.hasHeader ? timeColumnInfo(header.names[0]) : null;
  const hasTime = timeInfo !== null && header.names.length > 1;
  const decimalMark = chooseDecimalMark(bytes, header.dataStart, header.separator);
  const table = readRows(bytes, header, decimalMark, hasTime);

  const rows = table.rows;
  if (rows === 0) {
    throw new CaptureParseError(
      "no-numeric-data",
      header.hasHeader
        ? `The file has a header (line ${header.headerLine}) but no rows of numbers after it.`
        : "The file has no rows of numbers.",
      { line: header.headerLine || undefined },
    );
  }

  let sampleRate = opts.sampleRate ?? header.commentRate;
  if (sampleRate === undefined) {
    if (!hasTime) {
      throw new CaptureParseError(
        "no-sample-rate",
        "The file does not say its sample rate. Add a first column of time in seconds named \"time_s\", " +
          "or a line \"# sample_rate=10000\" (your rate in Hz) above the header, or enter the sample rate when uploading.",
      );
    }
    sampleRate = sampleRateFromTime(table.columns[0], rows, timeInfo!.toSeconds, table, header.names[0]);
  }

  checkMinSamples(rows, minSamples, sampleRate);

  const firstData = hasTime ? 1 : 0;
  const dataNames = header.names.slice(firstData);
  const meanings = classifyColumns(dataNames);
  const channels: Channel[] = meanings.map((meaning, i) => {
    const column = table.columns[i + firstData];
    const channel: Channel = {
      name: meaning.name,
      kind: meaning.kind,
      unit: meaning.unit,
      data: column.length === rows ? column : column.slice(0, rows),
    };
    if (meaning.position !== undefined) channel.position = meaning.position;
    return channel;
  });
  return { sampleRate, channels, format: "csv" };
}

// ---------------------------------------------------------------------------------------------------------------
// Header, comments, units row

/** More columns than this is not a capture (and would cost a typed array each). */
const MAX_COLUMNS = 4096;

function readHeader(bytes: Uint8Array): Header {
  const end = bytes.length;
  let pos = bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  let line = 1;
  let commentRate: number | undefined;
  let sawContent = false;
  for (;;) {
    if (pos >= end) {
      throw new CaptureParseError(
        "empty",
        sawContent ? "The file has only comment lines: there is no header and no data." : "The file is empty.",
      );
    }
    const eol = lineEnd(bytes, pos, end);
    const first = bytes[pos];
    if (first === HASH || first === PERCENT) {
      sawContent = true;
      const rate = sampleRateFromComment(decodeUtf8(bytes, pos + 1, eol), line);
      if (rate !== undefined && commentRate === undefined) commentRate = rate;
    } else if (!isBlank(bytes, pos, eol)) {
      const text = decodeUtf8(bytes, pos, eol);
      const separator = detectSeparator(text);
      let names = splitCells(text, separator);
      if (names.length > 1 && names[names.length - 1] === "") names = names.slice(0, -1);
      const headerLine = line;
      if (names.length > MAX_COLUMNS) {
        throw new CaptureParseError(
          "unknown-format",
          `Line ${line} has ${names.length} columns; a capture table can have at most ${MAX_COLUMNS}. This does not look like a waveform capture.`,
          { line, byte: pos },
        );
      }
      const numeric = names.every((n) => n !== "" && Number.isFinite(parseDecimal(n)));
      if (numeric) {
        // No header: the first line is already data.
        return {
          names: names.map((_, i) => `col${i + 1}`),
          separator, headerLine: 0, dataStart: pos, dataLine: line, commentRate, hasHeader: false,
        };
      }
      names = names.map((n, i) => (n === "" ? `col${i + 1}` : n));
      let dataStart = skipEol(bytes, eol, end);
      let dataLine = line + 1;
      const units = readUnitsRow(bytes, dataStart, separator, names.length);
      if (units) {
        names = names.map((n, i) => (units.units[i] && !/[[(].*[\])]\s*$/.test(n) ? `${n} [${units.units[i]}]` : n));
        dataStart = units.next;
        dataLine++;
      }
      return { names, separator, headerLine, dataStart, dataLine, commentRate, hasHeader: true };
    }
    pos = skipEol(bytes, eol, end);
    line++;
  }
}

const UNIT_CELL = /^[[(]?\s*(s|sec|ms|us|µs|μs|a|ma|v|kv|g|m\/s2|m\/s²|m\/s\^2|mm\/s|in\/s|hz|-|)\s*[\])]?$/i;

/** A second header row of units, e.g. "s;A;A;A" or "[s],[A],[A]". */
function readUnitsRow(bytes: Uint8Array, pos: number, separator: number | null, columns: number): { units: string[]; next: number } | null {
  if (pos >= bytes.length) return null;
  const eol = lineEnd(bytes, pos, bytes.length);
  if (eol - pos > 4096) return null;
  const cells = splitCells(decodeUtf8(bytes, pos, eol), separator);
  if (cells.length < columns || cells.length > columns + 1) return null;
  if (!cells.every((c) => UNIT_CELL.test(c)) || cells.every((c) => c.replace(/[[\]()\s-]/g, "") === "")) return null;
  const units = cells.slice(0, columns).map((c) => {
    const bare = c.replace(/[[\]()]/g, "").trim();
    return bare === "-" ? "" : normaliseUnit(bare);
  });
  return { units, next: skipEol(bytes, eol, bytes.length) };
}

function chooseDecimalMark(bytes: Uint8Array, start: number, separator: number | null): number {
  if (separator === COMMA) return 46;
  const end = Math.min(bytes.length, start + 65536);
  let commas = 0;
  let dots = 0;
  for (let p = start; p < end; p++) {
    const b = bytes[p];
    if (b === COMMA) commas++;
    else if (b === 46) dots++;
  }
  return commas > 0 && dots === 0 ? COMMA : 46;
}

// ---------------------------------------------------------------------------------------------------------------
// Data rows (hot path)

const MINUS = 45;
const POW10 = [1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15];

interface Table {
  columns: Float64Array[];
  rows: number;
  /** Row indices before which a blank or comment line was skipped (sorted), to map rows back to line numbers. */
  skippedBefore: number[];
  dataLine: number;
  /** Smallest decimal exponent of the last printed digit in the first column (its printing resolution). */
  firstColumnDigitExp: number;
  context: RowContext;
}

interface RowContext {
  bytes: Uint8Array;
  names: string[];
  separator: number | null;
  decimalMark: number;
  headerLine: number;
}

function readRows(bytes: Uint8Array, header: Header, decimalMark: number, trackFirstColumn: boolean): Table {
  const end = bytes.length;
  const nCols = header.names.length;
  const sep = header.separator ?? -1;
  const context: RowContext = { bytes, names: header.names, separator: header.separator, decimalMark, headerLine: header.headerLine };
  let capacity = estimateRows(bytes, header.dataStart, nCols);
  let columns: Float64Array[] = [];
  for (let c = 0; c < nCols; c++) columns.push(new Float64Array(capacity));
  const skippedBefore: number[] = [];
  const scan = newScanResult();
  let firstColumnDigitExp = Infinity;
  let pos = header.dataStart;
  let line = header.dataLine;
  let row = 0;
  const last = nCols - 1;

  while (pos < end) {
    let b = bytes[pos];
    // Blank, whitespace-only and comment lines are skipped.
    if (b === LF || b === CR || b === HASH || b === SPACE || b === TAB) {
      const eol = lineEnd(bytes, pos, end);
      if (b === LF || b === CR || b === HASH || isBlank(bytes, pos, eol)) {
        skippedBefore.push(row);
        pos = skipEol(bytes, eol, end);
        line++;
        continue;
      }
    }
    if (row === capacity) {
      capacity *= 2;
      columns = columns.map((col) => {
        const grown = new Float64Array(capacity);
        grown.set(col);
        return grown;
      });
    }
    const lineStart = pos;
    for (let c = 0; c < nCols; c++) {
      const cellStart = pos;
      b = pos < end ? bytes[pos] : LF;
      while (b === SPACE || (b === TAB && sep !== TAB)) b = ++pos < end ? bytes[pos] : LF;
      const quoted = b === QUOTE;
      if (quoted) pos++;
      // Inline fast path for the usual cell: [-]digits[.digits], at most 15 digits, no exponent. The value is
      // then exact: an integer below 10^15 divided by an exact power of ten (see number-scan.ts). Everything
      // else goes through the full scanner.
      let value: number;
      let lastDigitExp: number;
      {
        let p = pos;
        let negative = false;
        if (b === MINUS) {
          negative = true;
          b = ++p < end ? bytes[p] : 0;
        }
        let mantissa = 0;
        let digits = 0;
        let fraction = 0;
        let d = b - 48;
        while (d >= 0 && d <= 9) {
          mantissa = mantissa * 10 + d;
          digits++;
          b = ++p < end ? bytes[p] : 0;
          d = b - 48;
        }
        if (b === decimalMark) {
          b = ++p < end ? bytes[p] : 0;
          d = b - 48;
          while (d >= 0 && d <= 9) {
            mantissa = mantissa * 10 + d;
            digits++;
            fraction++;
            b = ++p < end ? bytes[p] : 0;
            d = b - 48;
          }
        }
        if (digits !== 0 && digits <= 15 && b !== 101 && b !== 69) {
          value = fraction === 0 ? mantissa : mantissa / POW10[fraction];
          if (negative) value = -value;
          lastDigitExp = -fraction;
          pos = p;
        } else {
          const status = scanNumber(bytes, pos, end, decimalMark, scan);
          if (status !== SCAN_OK) throw cellError(context, status, line, c, cellStart, lineStart);
          value = scan.value;
          lastDigitExp = scan.lastDigitExp;
          pos = scan.end;
        }
      }
      if (quoted) {
        if (pos < end && bytes[pos] === QUOTE) pos++;
        else throw cellError(context, SCAN_OK, line, c, cellStart, lineStart);
      }
      b = pos < end ? bytes[pos] : LF;
      while (b === SPACE || (b === TAB && sep !== TAB)) b = ++pos < end ? bytes[pos] : LF;
      if (c < last) {
        if (b !== sep) throw separatorError(context, line, c, cellStart, lineStart, pos);
        pos++;
      } else if (b === LF) pos++;
      else if (b === CR) pos = pos + 1 < end && bytes[pos + 1] === LF ? pos + 2 : pos + 1;
      else if (b === sep && trailingSeparatorOnly(bytes, pos + 1, end)) pos = skipEol(bytes, lineEnd(bytes, pos, end), end);
      else throw separatorError(context, line, c, cellStart, lineStart, pos);
      if (value - value !== 0) throw overflowError(context, line, c, cellStart);
      columns[c][row] = value;
      if (c === 0 && trackFirstColumn && lastDigitExp < firstColumnDigitExp) firstColumnDigitExp = lastDigitExp;
    }
    row++;
    line++;
  }
  return { columns, rows: row, skippedBefore, dataLine: header.dataLine, firstColumnDigitExp, context };
}

function estimateRows(bytes: Uint8Array, start: number, nCols: number): number {
  const end = bytes.length;
  const sampleEnd = Math.min(end, start + 4096);
  let lines = 0;
  for (let p = start; p < sampleEnd; p++) if (bytes[p] === LF) lines++;
  const sampled = sampleEnd - start;
  const bytesPerLine = lines > 0 ? sampled / lines : Math.max(sampled, 1);
  const estimate = Math.ceil(((end - start) / Math.max(bytesPerLine, 2 * nCols)) * 1.02) + 16;
  return Math.min(estimate, Math.ceil((end - start) / (2 * nCols)) + 16);
}

function trailingSeparatorOnly(bytes: Uint8Array, pos: number, end: number): boolean {
  let p = pos;
  while (p < end && (bytes[p] === SPACE || bytes[p] === TAB)) p++;
  return p >= end || bytes[p] === LF || bytes[p] === CR;
}

// ---------------------------------------------------------------------------------------------------------------
// Errors (cold path)

function columnLabel(ctx: RowContext, c: number): string {
  const name = ctx.names[c];
  return ctx.headerLine > 0 ? `column ${c + 1} (${name})` : `column ${c + 1}`;
}

function cellEnd(ctx: RowContext, pos: number): number {
  const { bytes } = ctx;
  let p = pos;
  while (p < bytes.length && bytes[p] !== LF && bytes[p] !== CR && bytes[p] !== ctx.separator) p++;
  return p;
}

function countCells(ctx: RowContext, lineStart: number): number {
  const { bytes } = ctx;
  const eol = lineEnd(bytes, lineStart, bytes.length);
  let cells = 1;
  for (let p = lineStart; p < eol; p++) if (bytes[p] === ctx.separator) cells++;
  if (eol > lineStart && bytes[eol - 1] === ctx.separator) cells--; // allowed trailing separator
  return cells;
}

function atLineEnd(bytes: Uint8Array, pos: number): boolean {
  return pos >= bytes.length || bytes[pos] === LF || bytes[pos] === CR;
}

function raggedError(ctx: RowContext, line: number, lineStart: number): CaptureParseError {
  const found = countCells(ctx, lineStart);
  const expected = ctx.names.length;
  const against = ctx.headerLine > 0 ? `the header (line ${ctx.headerLine}) names ${expected}` : `the first row has ${expected}`;
  const fix = found < expected ? "Fill in the missing values or remove the row." : `Check the separator (this file uses "${sepChar(ctx)}") or remove the extra values.`;
  return new CaptureParseError(
    "ragged-row",
    `Line ${line} has ${found} value${found === 1 ? "" : "s"} but ${against} column${expected === 1 ? "" : "s"}. ${fix}`,
    { line, byte: lineStart },
  );
}

function sepChar(ctx: RowContext): string {
  return ctx.separator === TAB ? "tab" : String.fromCharCode(ctx.separator ?? 44);
}

/** A cell that does not start with a number (or is empty, or is NaN/Infinity text). */
function cellError(ctx: RowContext, status: number, line: number, c: number, cellStart: number, lineStart: number): CaptureParseError {
  const { bytes } = ctx;
  let p = cellStart;
  while (p < bytes.length && (bytes[p] === SPACE || bytes[p] === TAB) && bytes[p] !== ctx.separator) p++;
  if (c > 0 && atLineEnd(bytes, p) && bytes[cellStart - 1] !== ctx.separator) return raggedError(ctx, line, lineStart);
  const where = { line, column: c + 1, byte: cellStart };
  const endOfCell = cellEnd(ctx, p);
  const text = cellTextForMessage(bytes, p, endOfCell);
  if (text === "" || text === '""') {
    return new CaptureParseError("non-numeric-cell", `Line ${line}, ${columnLabel(ctx, c)} is empty. Every row needs a number in every column.`, where);
  }
  if (status === SCAN_NON_FINITE_TEXT) {
    return new CaptureParseError(
      "non-finite",
      `Line ${line}, ${columnLabel(ctx, c)}: "${text}" is not a finite number. The capture must be complete; re-export it without gaps.`,
      where,
    );
  }
  return new CaptureParseError("non-numeric-cell", `Line ${line}, ${columnLabel(ctx, c)}: "${text}" is not a number.${numberHint(ctx, text)}`, where);
}

/** After a number: something other than the separator / line end follows. */
function separatorError(ctx: RowContext, line: number, c: number, cellStart: number, lineStart: number, pos: number): CaptureParseError {
  const { bytes } = ctx;
  const b = pos < bytes.length ? bytes[pos] : LF;
  if ((b === LF || b === CR) && c < ctx.names.length - 1) return raggedError(ctx, line, lineStart);
  if (b === ctx.separator && c === ctx.names.length - 1) return raggedError(ctx, line, lineStart);
  let p = cellStart;
  while (p < bytes.length && (bytes[p] === SPACE || bytes[p] === TAB) && bytes[p] !== ctx.separator) p++;
  const text = cellTextForMessage(bytes, p, cellEnd(ctx, p));
  return new CaptureParseError(
    "non-numeric-cell",
    `Line ${line}, ${columnLabel(ctx, c)}: "${text}" is not a number.${numberHint(ctx, text)}`,
    { line, column: c + 1, byte: cellStart },
  );
}

function numberHint(ctx: RowContext, text: string): string {
  if (ctx.decimalMark === 46 && /^[+-]?\d*,\d+$/.test(text)) {
    return ` This file uses a decimal point: write ${text.replace(",", ".")}.`;
  }
  if (ctx.decimalMark === COMMA && /^[+-]?\d*\.\d+$/.test(text)) {
    return ` This file uses decimal commas: write ${text.replace(".", ",")}.`;
  }
  if (/^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?\s*(a|ma|v|kv|g|m\/s2?|m\/s²|mm\/s|in\/s|hz|s|ms|rpm|°c|%)$/i.test(text)) {
    return ` Put units in the header (e.g. "Ia [A]"), not in the cells.`;
  }
  if (/\d[-/:]\d/.test(text)) return " Time must be given in seconds as a number, not as a date or clock time.";
  return "";
}

function overflowError(ctx: RowContext, line: number, c: number, cellStart: number): CaptureParseError {
  const text = cellTextForMessage(ctx.bytes, cellStart, cellEnd(ctx, cellStart));
  return new CaptureParseError(
    "non-finite",
    `Line ${line}, ${columnLabel(ctx, c)}: "${text}" is too large to be a sample value.`,
    { line, column: c + 1, byte: cellStart },
  );
}

// ---------------------------------------------------------------------------------------------------------------
// Time column

function lineOfRow(table: Table, row: number): number {
  // Number of skipped lines before or at this row (skippedBefore is sorted).
  let lo = 0;
  let hi = table.skippedBefore.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (table.skippedBefore[mid] <= row) lo = mid + 1;
    else hi = mid;
  }
  return table.dataLine + row + lo;
}

/**
 * Checks that the time column is strictly increasing and uniform, and returns the sample rate it implies.
 * Tolerances: each step may differ from the mean step by 1e-3 of it plus the time values' printing resolution;
 * no value may wander more than half a step (plus resolution) from the straight line through first and last.
 */
function sampleRateFromTime(time: Float64Array, rows: number, toSeconds: number, table: Table, name: string): number {
  const unitWord = toSeconds === 1 ? "s" : toSeconds === 1e-3 ? "ms" : toSeconds === 1e-6 ? "µs" : "ns";
  const fmt = (v: number) => `${Number(v.toPrecision(6))} ${unitWord}`;
  if (rows < 2) {
    throw new CaptureParseError("no-sample-rate", `The time column "${name}" needs at least two rows to give the sample rate.`);
  }
  const t0 = time[0];
  const tLast = time[rows - 1];
  const dt = (tLast - t0) / (rows - 1);
  const resolution = Number.isFinite(table.firstColumnDigitExp) ? 10 ** table.firstColumnDigitExp : 0;
  const roundoff = 4 * Number.EPSILON * Math.max(Math.abs(t0), Math.abs(tLast));
  const stepTolerance = 1e-3 * Math.abs(dt) + resolution + 2 * roundoff;
  const driftTolerance = 0.5 * Math.abs(dt) + resolution + roundoff;
  const coarse = ` If the time column is rounded too coarsely, give the sample rate instead (a line "# sample_rate=10000" above the header).`;
  for (let i = 1; i < rows; i++) {
    const step = time[i] - time[i - 1];
    if (step < 0) {
      const line = lineOfRow(table, i);
      throw new CaptureParseError(
        "time-decreasing",
        `Line ${line}: time goes backwards (${fmt(time[i])} after ${fmt(time[i - 1])} on line ${lineOfRow(table, i - 1)}). ` +
          `The rows must be in time order; the file may be two captures joined together.`,
        { line, column: 1 },
      );
    }
    if (step === 0) {
      const line = lineOfRow(table, i);
      throw new CaptureParseError(
        "time-not-uniform",
        `Line ${line}: time ${fmt(time[i])} repeats the previous line's time.${coarse}`,
        { line, column: 1 },
      );
    }
    if (Math.abs(step - dt) > stepTolerance) {
      const line = lineOfRow(table, i);
      throw new CaptureParseError(
        "time-not-uniform",
        `Line ${line}: the time step is ${fmt(step)} but the file's average step is ${fmt(dt)}. ` +
          `Samples must be evenly spaced with no gaps.${coarse}`,
        { line, column: 1 },
      );
    }
    if (Math.abs(time[i] - (t0 + i * dt)) > driftTolerance) {
      const line = lineOfRow(table, i);
      throw new CaptureParseError(
        "time-not-uniform",
        `Line ${line}: time ${fmt(time[i])} has drifted from the even spacing (expected ${fmt(t0 + i * dt)}); the sample rate changes within the file.`,
        { line, column: 1 },
      );
    }
  }
  const rate = 1 / (dt * toSeconds);
  const whole = Math.round(rate);
  const span = tLast - t0;
  const uncertainty = Math.max(1e-9, (2 * resolution) / span);
  const sampleRate = whole > 0 && Math.abs(rate - whole) <= uncertainty * rate ? whole : rate;
  if (!Number.isFinite(sampleRate) || sampleRate <= 0) {
    throw new CaptureParseError("no-sample-rate", `The time column "${name}" does not give a usable sample rate (${formatHz(sampleRate)}).`);
  }
  return sampleRate;
}
