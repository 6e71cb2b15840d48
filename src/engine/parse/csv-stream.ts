// A CSV capture checked as it streams in: the rules of csv-header.ts, csv-rows.ts and csv-rate.ts (the full
// parser's, csv.ts) applied to a file that arrives in pieces. It holds the current partial line (at most
// MAX_LINE_BYTES), and the first 64 KiB of data while the decimal mark is chosen; rows are read window by window
// (runs of complete lines) into two small reused arrays.
//
// A time column that gives the sample rate may need a second reading of the file (see csv-time-stream.ts): finish()
// then returns null and the same bytes are pushed again from the first.

import type { ColumnMeaning } from "./channel-names.ts";
import { checkMinSamples } from "./errors.ts";
import {
  DECIMAL_SAMPLE_BYTES,
  MAX_UNITS_ROW_BYTES,
  bomLength,
  chooseDecimalMark,
  completeHeader,
  headerMissingError,
  newHeaderScan,
  readHeaderLine,
  tableLayout,
  type CsvHeader,
  type HeaderRow,
  type HeaderScan,
  type TableLayout,
} from "./csv-header.ts";
import { checkRateOption, noRowsError, noSampleRateError, rateFromTimeColumn, timeColumnRule, type TimeColumnRule } from "./csv-rate.ts";
import { MAX_LINE_BYTES, lineOfRow, lineTooLongError, readRows, type RowContext, type RowSink } from "./csv-rows.ts";
import { TimeColumnCheck, TimeColumnSketch } from "./csv-time-stream.ts";
import { lineEnd, skipEol } from "./text-lines.ts";

const LF = 10;
const CR = 13;
const INITIAL_ROWS = 4096;

export interface CsvStreamOptions {
  sampleRate?: number;
  minSamples: number;
}

export interface CsvStreamSummary {
  sampleRate: number;
  /** Rows, that is samples per channel. */
  samples: number;
  channels: ColumnMeaning[];
}

type Phase = "start" | "header" | "units" | "decimal" | "rows";

export class CsvStreamReader {
  private buf = new Uint8Array(1 << 16);
  private len = 0;
  /** Next unread byte in buf; everything before it may be dropped. */
  private pos = 0;
  /** File offset of buf[0]. */
  private base = 0;
  private phase: Phase = "start";
  private scan: HeaderScan = newHeaderScan();
  private headerRow: HeaderRow | null = null;
  private header: CsvHeader | null = null;
  private layout: TableLayout | null = null;
  private context: RowContext | null = null;
  private sink: RowSink | null = null;
  private line = 0;
  private rows = 0;
  private digitExp = Infinity;
  private time: TimeColumnSketch | TimeColumnCheck | null = null;
  /** Set for the second reading: the time column's rule, and the first reading's length. */
  private rule: TimeColumnRule | null = null;
  private firstReadingBytes = -1;

  constructor(private readonly opts: CsvStreamOptions) {}

  push(chunk: Uint8Array): void {
    this.append(chunk);
    this.process(false);
  }

  /** The end of the file: the summary, or null when the file must be pushed once more (the time column's second reading). */
  finish(): CsvStreamSummary | null {
    const size = this.base + this.len;
    if (this.rule && size !== this.firstReadingBytes) throw new Error(`The file changed between its two readings (${this.firstReadingBytes} bytes, then ${size}).`);
    this.process(true);
    const header = this.header!;
    const layout = this.layout!;
    const rows = this.rows;
    if (rows === 0) throw noRowsError(header);
    let sampleRate = this.opts.sampleRate ?? header.commentRate;
    if (sampleRate === undefined) {
      if (!layout.hasTime) throw noSampleRateError();
      let rule = this.rule;
      if (!rule) {
        const sketch = this.time as TimeColumnSketch;
        rule = timeColumnRule(header.names[0], layout.toSeconds, rows, sketch.t0, sketch.last, this.digitExp);
        if (!sketch.settles(rule)) {
          this.readAgain(rule, size);
          return null;
        }
      }
      sampleRate = rateFromTimeColumn(rule);
    }
    checkMinSamples(rows, this.opts.minSamples, sampleRate);
    return { sampleRate, samples: rows, channels: layout.channels };
  }

  private readAgain(rule: TimeColumnRule, size: number): void {
    this.rule = rule;
    this.firstReadingBytes = size;
    this.len = 0;
    this.pos = 0;
    this.base = 0;
    this.phase = "start";
    this.scan = newHeaderScan();
    this.headerRow = null;
    this.header = null;
    this.layout = null;
    this.context = null;
    this.line = 0;
    this.rows = 0;
    this.digitExp = Infinity;
    this.time = null;
  }

  /** Appends a chunk, first dropping the bytes before pos. */
  private append(chunk: Uint8Array): void {
    const keep = this.len - this.pos;
    if (this.pos > 0) {
      this.buf.copyWithin(0, this.pos, this.len);
      this.base += this.pos;
      if (this.headerRow) {
        this.headerRow.pos -= this.pos;
        this.headerRow.eol -= this.pos;
      }
      this.pos = 0;
      this.len = keep;
    }
    if (keep + chunk.length > this.buf.length) {
      const grown = new Uint8Array(Math.max(2 * this.buf.length, keep + chunk.length));
      grown.set(this.buf.subarray(0, keep));
      this.buf = grown;
    }
    this.buf.set(chunk, keep);
    this.len = keep + chunk.length;
  }

  private process(eof: boolean): void {
    for (;;) {
      const { buf, len } = this;
      switch (this.phase) {
        case "start":
          if (len < 3 && !eof) return;
          checkRateOption(this.opts.sampleRate);
          if (this.base === 0) this.pos = bomLength(buf.subarray(0, len));
          this.phase = "header";
          break;

        case "header": {
          const pos = this.pos;
          if (pos >= len) {
            if (eof) throw headerMissingError(this.scan);
            return;
          }
          const eol = lineEnd(buf, pos, len);
          if (!eof && !lineComplete(buf, eol, len)) {
            if (eol - pos > MAX_LINE_BYTES) throw lineTooLongError(this.scan.line, this.base + pos);
            return;
          }
          const row = readHeaderLine(buf, pos, eol, this.scan, this.base);
          if (row) {
            this.headerRow = row;
            this.pos = row.pos;
            this.phase = "units";
          } else {
            this.pos = skipEol(buf, eol, len);
            this.scan.line++;
          }
          break;
        }

        case "units": {
          const row = this.headerRow!;
          if (!row.numeric && !eof) {
            // completeHeader reads the line after the header row: it must be here whole (or too long for units).
            const next = skipEol(buf, row.eol, len);
            if (next >= len) return;
            const eol = lineEnd(buf, next, len);
            if (!lineComplete(buf, eol, len) && eol - next <= MAX_UNITS_ROW_BYTES) return;
          }
          const header = completeHeader(buf, len, row, this.scan);
          this.header = header;
          this.layout = tableLayout(header);
          this.headerRow = null;
          this.pos = header.dataStart;
          this.line = header.dataLine;
          this.phase = "decimal";
          break;
        }

        case "decimal": {
          if (len - this.pos < DECIMAL_SAMPLE_BYTES && !eof) return;
          const header = this.header!;
          const layout = this.layout!;
          const decimalMark = chooseDecimalMark(buf, this.pos, len, header.separator);
          this.context = { bytes: buf, end: 0, base: 0, names: header.names, separator: header.separator, decimalMark, headerLine: header.headerLine };
          const timeKept = layout.hasTime && this.opts.sampleRate === undefined && header.commentRate === undefined;
          this.sink ??= reusedSink(header.names.length);
          this.time = !timeKept ? null : this.rule ? new TimeColumnCheck(this.rule) : new TimeColumnSketch();
          this.phase = "rows";
          break;
        }

        case "rows": {
          const cut = eof ? len : safeCut(buf, this.pos, len);
          if (cut > this.pos) this.readWindow(cut);
          if (!eof) {
            const tail = lineEnd(buf, this.pos, len) - this.pos;
            if (tail > MAX_LINE_BYTES) throw lineTooLongError(this.line, this.base + this.pos);
          }
          return;
        }
      }
    }
  }

  /** Reads the complete lines from pos to cut. */
  private readWindow(cut: number): void {
    const ctx = this.context!;
    ctx.bytes = this.buf;
    ctx.end = cut;
    ctx.base = this.base;
    const firstLine = this.line;
    const run = readRows(ctx, this.pos, firstLine, this.sink!, this.layout!.hasTime);
    this.pos = cut;
    this.line = run.nextLine;
    if (run.firstColumnDigitExp < this.digitExp) this.digitExp = run.firstColumnDigitExp;
    if (this.time && run.rows > 0) this.time.add(this.sink!.columns[0], run.rows, (k) => lineOfRow(run, firstLine, k));
    this.rows += run.rows;
  }
}

/** The line ending at eol is whole: its line break is here and is not a CR that an LF may still follow. */
function lineComplete(buf: Uint8Array, eol: number, len: number): boolean {
  return eol < len && (buf[eol] === LF || eol + 1 < len);
}

/** End of the last whole line in buf[pos, len) (see lineComplete), or pos when there is none. */
function safeCut(buf: Uint8Array, pos: number, len: number): number {
  for (let k = len - 1; k >= pos; k--) {
    const b = buf[k];
    if (b === LF) return k + 1;
    if (b === CR && k + 1 < len) return k + 1;
  }
  return pos;
}

/**
 * Two arrays for all columns: the first column (the time column, which the time checks read) and one scratch array
 * the other columns overwrite (the row reader only writes).
 */
function reusedSink(nCols: number): RowSink {
  const sink: RowSink = { columns: [], capacity: 0, grow: () => allocate(2 * sink.capacity) };
  const allocate = (capacity: number) => {
    const first = new Float64Array(capacity);
    if (sink.columns.length > 0) first.set(sink.columns[0]);
    const scratch = nCols > 1 ? new Float64Array(capacity) : first;
    sink.columns = [first];
    for (let c = 1; c < nCols; c++) sink.columns.push(scratch);
    sink.capacity = capacity;
  };
  allocate(INITIAL_ROWS);
  return sink;
}
