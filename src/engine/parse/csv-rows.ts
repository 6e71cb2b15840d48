// The data rows of a CSV capture: the byte-level row reader (hot path) and its error messages (cold path).
// Shared by the full parser (csv.ts: one window, the whole file) and the streaming validator (csv-stream.ts: one
// window per run of complete lines, the last window ending at the end of the file). A window always ends at the end
// of the file or just after a line break that cannot be the CR of a CRLF cut in two, so a row never straddles two
// windows and every scan inside a row stops at its line end, exactly as in one big buffer.

import { CaptureParseError } from "./errors.ts";
import { SCAN_NON_FINITE_TEXT, newScanResult, scanNumber } from "./number-scan.ts";
import { cellTextForMessage, isBlank, lineEnd, skipEol } from "./text-lines.ts";

// Byte values, declared here rather than imported from text-lines.ts: when the module is loaded as CommonJS (tsx,
// the worker threads) an imported binding is a getter call on the exporting module, several per byte in the row
// loop (measured: a third of the parse time of a 2 MB CSV). Same values as text-lines.ts.
const LF = 10;
const CR = 13;
const TAB = 9;
const SPACE = 32;
const QUOTE = 34;
const COMMA = 44;
const HASH = 35;
const MINUS = 45;
/** number-scan.ts SCAN_OK, local for the same reason. */
const SCAN_OK = 0;
const POW10 = [1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15];

/**
 * Longest line (without its line break) a CSV capture may have, anywhere in the file. Real rows are far shorter
 * (4096 columns of 30 characters are 120 KiB); the limit is what lets the streaming validator hold at most one line.
 */
export const MAX_LINE_BYTES = 1 << 20;

export function lineTooLongError(line: number, byte: number): CaptureParseError {
  return new CaptureParseError(
    "unknown-format",
    `Line ${line} runs on for more than 1 MiB without a line break; the rows of a capture table are much shorter. ` +
      `This does not look like a waveform capture (or its line breaks were lost).`,
    { line, byte },
  );
}

/** What the row reader and its error messages need to know about the table and the bytes in front of them. */
export interface RowContext {
  /** The window's bytes; rows are read from `start` (readRows' argument) to `end`. */
  bytes: Uint8Array;
  /** End of the window: the end of the file, or just after a line break. */
  end: number;
  /** File offset of bytes[0], so error offsets are offsets into the file. */
  base: number;
  names: string[];
  separator: number | null;
  decimalMark: number;
  headerLine: number;
}

/** Where the values go: one array per column (a reader that keeps none may pass the same array for several). */
export interface RowSink {
  columns: Float64Array[];
  capacity: number;
  /** Makes room for more rows (at least one more), keeping the values written so far. */
  grow(): void;
}

/** The rows of one window. */
export interface RowRun {
  /** Rows read; their values are in sink.columns[c][0 … rows). */
  rows: number;
  /** Window-relative row indices before which a blank or comment line was skipped (sorted). */
  skippedBefore: number[];
  /** Line number of the first line after the window. */
  nextLine: number;
  /** Smallest decimal exponent of the last printed digit in the first column (when tracked), else Infinity. */
  firstColumnDigitExp: number;
}

/** 1-based line number of a row of a run that started at `firstLine`. */
export function lineOfRow(run: RowRun, firstLine: number, row: number): number {
  // Number of skipped lines before or at this row (skippedBefore is sorted).
  let lo = 0;
  let hi = run.skippedBefore.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (run.skippedBefore[mid] <= row) lo = mid + 1;
    else hi = mid;
  }
  return firstLine + row + lo;
}

/**
 * Reads the rows of ctx.bytes from `start` to ctx.end into the sink (from index 0), checking every cell: a number
 * (NaN, Infinity and overflow refused), the column count, and the line length. `line` is the line number at `start`.
 */
export function readRows(ctx: RowContext, start: number, line: number, sink: RowSink, trackFirstColumn: boolean): RowRun {
  const bytes = ctx.bytes;
  const end = ctx.end;
  const nCols = ctx.names.length;
  const sep = ctx.separator ?? -1;
  const decimalMark = ctx.decimalMark;
  let columns = sink.columns;
  let capacity = sink.capacity;
  const skippedBefore: number[] = [];
  const scan = newScanResult();
  let firstColumnDigitExp = Infinity;
  let pos = start;
  let row = 0;
  const last = nCols - 1;

  while (pos < end) {
    let b = bytes[pos];
    // Blank, whitespace-only and comment lines are skipped.
    if (b === LF || b === CR || b === HASH || b === SPACE || b === TAB) {
      const eol = lineEnd(bytes, pos, end);
      if (b === LF || b === CR || b === HASH || isBlank(bytes, pos, eol)) {
        if (eol - pos > MAX_LINE_BYTES) throw lineTooLongError(line, ctx.base + pos);
        skippedBefore.push(row);
        pos = skipEol(bytes, eol, end);
        line++;
        continue;
      }
    }
    if (row === capacity) {
      sink.grow();
      columns = sink.columns;
      capacity = sink.capacity;
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
          if (status !== SCAN_OK) throw cellError(ctx, status, line, c, cellStart, lineStart);
          value = scan.value;
          lastDigitExp = scan.lastDigitExp;
          pos = scan.end;
        }
      }
      if (quoted) {
        if (pos < end && bytes[pos] === QUOTE) pos++;
        else throw cellError(ctx, SCAN_OK, line, c, cellStart, lineStart);
      }
      b = pos < end ? bytes[pos] : LF;
      while (b === SPACE || (b === TAB && sep !== TAB)) b = ++pos < end ? bytes[pos] : LF;
      if (c < last) {
        if (b !== sep) throw separatorError(ctx, line, c, cellStart, lineStart, pos);
        pos++;
      } else if (b === LF) pos++;
      else if (b === CR) pos = pos + 1 < end && bytes[pos + 1] === LF ? pos + 2 : pos + 1;
      else if (b === sep && trailingSeparatorOnly(bytes, pos + 1, end)) pos = skipEol(bytes, lineEnd(bytes, pos, end), end);
      else throw separatorError(ctx, line, c, cellStart, lineStart, pos);
      if (value - value !== 0) throw overflowError(ctx, line, c, cellStart, lineStart);
      columns[c][row] = value;
      if (c === 0 && trackFirstColumn && lastDigitExp < firstColumnDigitExp) firstColumnDigitExp = lastDigitExp;
    }
    // pos is past the line break here, so this is only a cheap first test.
    if (pos - lineStart > MAX_LINE_BYTES) checkLineLength(ctx, line, lineStart);
    row++;
    line++;
  }
  return { rows: row, skippedBefore, nextLine: line, firstColumnDigitExp };
}

/** Initial number of rows to allocate for the rows from `start` to the end of `bytes` (the full parser's guess). */
export function estimateRows(bytes: Uint8Array, start: number, nCols: number): number {
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
// Errors (cold path). A line longer than MAX_LINE_BYTES is reported as such before anything wrong inside it, so the
// verdict does not depend on how much of the line a reader holds.

function tooLong(ctx: RowContext, line: number, lineStart: number): CaptureParseError | null {
  return lineEnd(ctx.bytes, lineStart, ctx.end) - lineStart > MAX_LINE_BYTES ? lineTooLongError(line, ctx.base + lineStart) : null;
}

function checkLineLength(ctx: RowContext, line: number, lineStart: number): void {
  const error = tooLong(ctx, line, lineStart);
  if (error) throw error;
}

function columnLabel(ctx: RowContext, c: number): string {
  const name = ctx.names[c];
  return ctx.headerLine > 0 ? `column ${c + 1} (${name})` : `column ${c + 1}`;
}

function cellEnd(ctx: RowContext, pos: number): number {
  const { bytes, end } = ctx;
  let p = pos;
  while (p < end && bytes[p] !== LF && bytes[p] !== CR && bytes[p] !== ctx.separator) p++;
  return p;
}

function countCells(ctx: RowContext, lineStart: number): number {
  const { bytes } = ctx;
  const eol = lineEnd(bytes, lineStart, ctx.end);
  let cells = 1;
  for (let p = lineStart; p < eol; p++) if (bytes[p] === ctx.separator) cells++;
  if (eol > lineStart && bytes[eol - 1] === ctx.separator) cells--; // allowed trailing separator
  return cells;
}

function atLineEnd(ctx: RowContext, pos: number): boolean {
  return pos >= ctx.end || ctx.bytes[pos] === LF || ctx.bytes[pos] === CR;
}

function raggedError(ctx: RowContext, line: number, lineStart: number): CaptureParseError {
  const found = countCells(ctx, lineStart);
  const expected = ctx.names.length;
  const against = ctx.headerLine > 0 ? `the header (line ${ctx.headerLine}) names ${expected}` : `the first row has ${expected}`;
  const fix = found < expected ? "Fill in the missing values or remove the row." : `Check the separator (this file uses "${sepChar(ctx)}") or remove the extra values.`;
  return new CaptureParseError(
    "ragged-row",
    `Line ${line} has ${found} value${found === 1 ? "" : "s"} but ${against} column${expected === 1 ? "" : "s"}. ${fix}`,
    { line, byte: ctx.base + lineStart },
  );
}

function sepChar(ctx: RowContext): string {
  return ctx.separator === TAB ? "tab" : String.fromCharCode(ctx.separator ?? 44);
}

/** A cell that does not start with a number (or is empty, or is NaN/Infinity text). */
function cellError(ctx: RowContext, status: number, line: number, c: number, cellStart: number, lineStart: number): CaptureParseError {
  const long = tooLong(ctx, line, lineStart);
  if (long) return long;
  const { bytes } = ctx;
  let p = cellStart;
  while (p < ctx.end && (bytes[p] === SPACE || bytes[p] === TAB) && bytes[p] !== ctx.separator) p++;
  if (c > 0 && atLineEnd(ctx, p) && bytes[cellStart - 1] !== ctx.separator) return raggedError(ctx, line, lineStart);
  const where = { line, column: c + 1, byte: ctx.base + cellStart };
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
  const long = tooLong(ctx, line, lineStart);
  if (long) return long;
  const { bytes } = ctx;
  const b = pos < ctx.end ? bytes[pos] : LF;
  if ((b === LF || b === CR) && c < ctx.names.length - 1) return raggedError(ctx, line, lineStart);
  if (b === ctx.separator && c === ctx.names.length - 1) return raggedError(ctx, line, lineStart);
  let p = cellStart;
  while (p < ctx.end && (bytes[p] === SPACE || bytes[p] === TAB) && bytes[p] !== ctx.separator) p++;
  const text = cellTextForMessage(bytes, p, cellEnd(ctx, p));
  return new CaptureParseError(
    "non-numeric-cell",
    `Line ${line}, ${columnLabel(ctx, c)}: "${text}" is not a number.${numberHint(ctx, text)}`,
    { line, column: c + 1, byte: ctx.base + cellStart },
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

function overflowError(ctx: RowContext, line: number, c: number, cellStart: number, lineStart: number): CaptureParseError {
  const long = tooLong(ctx, line, lineStart);
  if (long) return long;
  const text = cellTextForMessage(ctx.bytes, cellStart, cellEnd(ctx, cellStart));
  return new CaptureParseError(
    "non-finite",
    `Line ${line}, ${columnLabel(ctx, c)}: "${text}" is too large to be a sample value.`,
    { line, column: c + 1, byte: ctx.base + cellStart },
  );
}
