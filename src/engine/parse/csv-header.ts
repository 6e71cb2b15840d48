// What comes before the data rows of a CSV capture: comment lines (which may state the sample rate), blank lines,
// the header row, an optional units row, and the decimal mark chosen from the first data bytes. Read line by line
// through readHeaderLine, so the full parser (readHeader, whole file) and the streaming validator (one line at a
// time as they arrive) apply the same rules.

import { CaptureParseError } from "./errors.ts";
import { sampleRateFromComment } from "./csv-metadata.ts";
import { MAX_LINE_BYTES, lineTooLongError } from "./csv-rows.ts";
import { classifyColumns, normaliseUnit, timeColumnInfo, type ColumnMeaning } from "./channel-names.ts";
import { parseDecimal } from "./number-scan.ts";
import { COMMA, HASH, PERCENT, decodeUtf8, detectSeparator, isBlank, lineEnd, skipEol, splitCells } from "./text-lines.ts";

/** More columns than this is not a capture (and would cost a typed array each). */
export const MAX_COLUMNS = 4096;
/** The decimal mark is chosen from this many bytes after the header. */
export const DECIMAL_SAMPLE_BYTES = 65536;
/** A units row is at most this long. */
export const MAX_UNITS_ROW_BYTES = 4096;

export interface CsvHeader {
  names: string[];
  separator: number | null;
  /** Line number of the header row (0 when the file has no header). */
  headerLine: number;
  /** Offset (in the bytes given to completeHeader) where the data rows start, and their first line number. */
  dataStart: number;
  dataLine: number;
  commentRate?: number;
  hasHeader: boolean;
}

/** The state of reading the lines before the header row. */
export interface HeaderScan {
  /** Line number of the line being read. */
  line: number;
  commentRate?: number;
  sawContent: boolean;
}

/** The header row (or the first data row, when it is all numbers), found but not yet followed by its units row. */
export interface HeaderRow {
  names: string[];
  separator: number | null;
  numeric: boolean;
  /** Where the line starts and ends (before its line break), in the bytes given to readHeaderLine. */
  pos: number;
  eol: number;
}

export function newHeaderScan(): HeaderScan {
  return { line: 1, sawContent: false };
}

/** Length of a UTF-8 byte order mark at the start of the file (0 or 3). */
export function bomLength(bytes: Uint8Array): number {
  return bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
}

/** The file ended before a header row. */
export function headerMissingError(scan: HeaderScan): CaptureParseError {
  return new CaptureParseError("empty", scan.sawContent ? "The file has only comment lines: there is no header and no data." : "The file is empty.");
}

/**
 * One line before the data, at [pos, eol) (eol: its line break or the end of the file). Returns the header row when
 * this line is it; null for a comment or blank line (the caller moves on to the next line and counts it).
 * `base` is the file offset of bytes[0].
 */
export function readHeaderLine(bytes: Uint8Array, pos: number, eol: number, scan: HeaderScan, base: number): HeaderRow | null {
  const line = scan.line;
  if (eol - pos > MAX_LINE_BYTES) throw lineTooLongError(line, base + pos);
  const first = pos < eol ? bytes[pos] : -1;
  if (first === HASH || first === PERCENT) {
    scan.sawContent = true;
    const rate = sampleRateFromComment(decodeUtf8(bytes, pos + 1, eol), line);
    if (rate !== undefined && scan.commentRate === undefined) scan.commentRate = rate;
    return null;
  }
  if (isBlank(bytes, pos, eol)) return null;
  const text = decodeUtf8(bytes, pos, eol);
  const separator = detectSeparator(text);
  let names = splitCells(text, separator);
  if (names.length > 1 && names[names.length - 1] === "") names = names.slice(0, -1);
  if (names.length > MAX_COLUMNS) {
    throw new CaptureParseError(
      "unknown-format",
      `Line ${line} has ${names.length} columns; a capture table can have at most ${MAX_COLUMNS}. This does not look like a waveform capture.`,
      { line, byte: base + pos },
    );
  }
  const numeric = names.every((n) => n !== "" && Number.isFinite(parseDecimal(n)));
  return { names, separator, numeric, pos, eol };
}

/**
 * The header once its row is found: names (with units from a units row), where the data starts. Reads the line
 * after the header row, which must be in `bytes` up to `end` whole (or be the file's end, or run past
 * MAX_UNITS_ROW_BYTES).
 */
export function completeHeader(bytes: Uint8Array, end: number, row: HeaderRow, scan: HeaderScan): CsvHeader {
  const separator = row.separator;
  const commentRate = scan.commentRate;
  if (row.numeric) {
    // No header: the first line is already data.
    return {
      names: row.names.map((_, i) => `col${i + 1}`),
      separator, headerLine: 0, dataStart: row.pos, dataLine: scan.line, commentRate, hasHeader: false,
    };
  }
  let names = row.names.map((n, i) => (n === "" ? `col${i + 1}` : n));
  let dataStart = skipEol(bytes, row.eol, end);
  let dataLine = scan.line + 1;
  const units = readUnitsRow(bytes, dataStart, end, separator, names.length);
  if (units) {
    names = names.map((n, i) => (units.units[i] && !/[[(].*[\])]\s*$/.test(n) ? `${n} [${units.units[i]}]` : n));
    dataStart = units.next;
    dataLine++;
  }
  return { names, separator, headerLine: scan.line, dataStart, dataLine, commentRate, hasHeader: true };
}

/** The whole header of a file held in memory. */
export function readHeader(bytes: Uint8Array): CsvHeader {
  const end = bytes.length;
  const scan = newHeaderScan();
  let pos = bomLength(bytes);
  for (;;) {
    if (pos >= end) throw headerMissingError(scan);
    const eol = lineEnd(bytes, pos, end);
    const row = readHeaderLine(bytes, pos, eol, scan, 0);
    if (row) return completeHeader(bytes, end, row, scan);
    pos = skipEol(bytes, eol, end);
    scan.line++;
  }
}

const UNIT_CELL = /^[[(]?\s*(s|sec|ms|us|µs|μs|a|ma|v|kv|g|m\/s2|m\/s²|m\/s\^2|mm\/s|in\/s|hz|-|)\s*[\])]?$/i;

/** A second header row of units, e.g. "s;A;A;A" or "[s],[A],[A]". */
function readUnitsRow(bytes: Uint8Array, pos: number, end: number, separator: number | null, columns: number): { units: string[]; next: number } | null {
  if (pos >= end) return null;
  const eol = lineEnd(bytes, pos, end);
  if (eol - pos > MAX_UNITS_ROW_BYTES) return null;
  const cells = splitCells(decodeUtf8(bytes, pos, eol), separator);
  if (cells.length < columns || cells.length > columns + 1) return null;
  if (!cells.every((c) => UNIT_CELL.test(c)) || cells.every((c) => c.replace(/[[\]()\s-]/g, "") === "")) return null;
  const units = cells.slice(0, columns).map((c) => {
    const bare = c.replace(/[[\]()]/g, "").trim();
    return bare === "-" ? "" : normaliseUnit(bare);
  });
  return { units, next: skipEol(bytes, eol, end) };
}

/** "." unless the separator is not a comma and the first 64 KiB of data (to `end`) hold commas and no dots. */
export function chooseDecimalMark(bytes: Uint8Array, start: number, end: number, separator: number | null): number {
  if (separator === COMMA) return 46;
  const stop = Math.min(end, start + DECIMAL_SAMPLE_BYTES);
  let commas = 0;
  let dots = 0;
  for (let p = start; p < stop; p++) {
    const b = bytes[p];
    if (b === COMMA) commas++;
    else if (b === 46) dots++;
  }
  return commas > 0 && dots === 0 ? COMMA : 46;
}

/** What the header says about the columns: a leading time column (and its unit), and the meaning of the data columns. */
export interface TableLayout {
  /** The first column is time (a time-like name and at least one data column after it). */
  hasTime: boolean;
  /** Factor from the time column's unit to seconds (1 when there is no time column). */
  toSeconds: number;
  /** The data columns (after the time column, when there is one): name, kind, unit, position. */
  channels: ColumnMeaning[];
}

export function tableLayout(header: CsvHeader): TableLayout {
  const timeInfo = header.hasHeader ? timeColumnInfo(header.names[0]) : null;
  const hasTime = timeInfo !== null && header.names.length > 1;
  return { hasTime, toSeconds: timeInfo?.toSeconds ?? 1, channels: classifyColumns(header.names.slice(hasTime ? 1 : 0)) };
}
