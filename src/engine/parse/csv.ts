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
// - No line may be longer than 1 MiB (MAX_LINE_BYTES): that is not a capture table, and the bound lets the streaming
//   validator (csv-stream.ts) hold at most one line.
//
// The rules live in csv-header.ts (lines before the data), csv-rows.ts (data rows) and csv-rate.ts (sample rate and
// time column); this module and the streaming validator only put them together.

import type { Capture, Channel } from "../types.ts";
import { DEFAULT_MIN_SAMPLES, checkMinSamples } from "./errors.ts";
import { chooseDecimalMark, readHeader, tableLayout } from "./csv-header.ts";
import { checkRateOption, checkTimeSteps, noRowsError, noSampleRateError, rateFromTimeColumn, timeColumnRule } from "./csv-rate.ts";
import { estimateRows, lineOfRow, readRows, type RowSink } from "./csv-rows.ts";

export interface CsvParseOptions {
  /** Sample rate in Hz; overrides any rate in the file. */
  sampleRate?: number;
  /** Fewer samples per channel than this is an error (default 256). */
  minSamples?: number;
}

export function parseCsv(bytes: Uint8Array, opts: CsvParseOptions = {}): Capture {
  const minSamples = opts.minSamples ?? DEFAULT_MIN_SAMPLES;
  checkRateOption(opts.sampleRate);
  const header = readHeader(bytes);
  const layout = tableLayout(header);
  const decimalMark = chooseDecimalMark(bytes, header.dataStart, bytes.length, header.separator);
  const nCols = header.names.length;
  const sink = growingSink(nCols, estimateRows(bytes, header.dataStart, nCols));
  const context = { bytes, end: bytes.length, base: 0, names: header.names, separator: header.separator, decimalMark, headerLine: header.headerLine };
  const run = readRows(context, header.dataStart, header.dataLine, sink, layout.hasTime);
  const rows = run.rows;
  if (rows === 0) throw noRowsError(header);

  let sampleRate = opts.sampleRate ?? header.commentRate;
  if (sampleRate === undefined) {
    if (!layout.hasTime) throw noSampleRateError();
    const time = sink.columns[0];
    const rule = timeColumnRule(header.names[0], layout.toSeconds, rows, time[0], time[rows - 1], run.firstColumnDigitExp);
    checkTimeSteps(rule, time, 0, rows, NaN, (row) => lineOfRow(run, header.dataLine, row));
    sampleRate = rateFromTimeColumn(rule);
  }

  checkMinSamples(rows, minSamples, sampleRate);

  const firstData = layout.hasTime ? 1 : 0;
  const channels: Channel[] = layout.channels.map((meaning, i) => {
    const column = sink.columns[i + firstData];
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

/** One Float64Array per column, doubled when full. */
function growingSink(nCols: number, capacity: number): RowSink {
  const sink: RowSink = {
    columns: Array.from({ length: nCols }, () => new Float64Array(capacity)),
    capacity,
    grow() {
      sink.capacity *= 2;
      sink.columns = sink.columns.map((col) => {
        const grown = new Float64Array(sink.capacity);
        grown.set(col);
        return grown;
      });
    },
  };
  return sink;
}
