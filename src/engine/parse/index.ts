// Capture parsers of the analysis engine: CSV and WAV in, Capture out. Pure: bytes in, no I/O.

import type { Capture } from "../types.ts";
import { parseCsv } from "./csv.ts";
import { CaptureParseError, DEFAULT_MIN_SAMPLES } from "./errors.ts";
import { describeForeignFile, sniffFormat } from "./sniff.ts";
import { parseWav, type WavChannelOption } from "./wav.ts";

export { CaptureParseError, DEFAULT_MIN_SAMPLES, isCaptureParseError } from "./errors.ts";
export type { CaptureParseErrorCode, CaptureParseErrorWhere } from "./errors.ts";
export { parseCsv, type CsvParseOptions } from "./csv.ts";
export { writeCsv, type CsvWriteOptions } from "./csv-write.ts";
export { parseWav, writeWav, type WavChannelOption, type WavParseOptions, type WavWriteOptions } from "./wav.ts";
export { sniffFormat, type CaptureFormat } from "./sniff.ts";
export { parseDecimal, scanNumber, newScanResult, type ScanResult } from "./number-scan.ts";
export { classifyColumn, classifyColumns, timeColumnInfo, type ColumnMeaning } from "./channel-names.ts";

export interface CaptureParseOptions {
  /** Only used in messages; the format is told from the content. */
  fileName?: string;
  /** CSV: sample rate in Hz, overriding the file. */
  sampleRate?: number;
  minSamples?: number;
  /** WAV: channel names, kinds, units and scales, overriding the file's own description. */
  channels?: WavChannelOption[];
}

function isBlankText(bytes: Uint8Array): boolean {
  let p = bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  for (; p < bytes.length; p++) {
    const b = bytes[p];
    if (b !== 0x20 && b !== 0x09 && b !== 0x0a && b !== 0x0d) return false;
  }
  return true;
}

export function parseCapture(bytes: Uint8Array, opts: CaptureParseOptions = {}): Capture {
  const minSamples = opts.minSamples ?? DEFAULT_MIN_SAMPLES;
  const what = opts.fileName ? `"${opts.fileName}"` : "The file";
  if (isBlankText(bytes)) throw new CaptureParseError("empty", `${what} is empty.`);
  const format = sniffFormat(bytes);
  if (format === "wav") return parseWav(bytes, { channels: opts.channels, minSamples });
  if (format === "csv") return parseCsv(bytes, { sampleRate: opts.sampleRate, minSamples });
  const hint = describeForeignFile(bytes);
  throw new CaptureParseError(
    "unknown-format",
    `${what} is neither a CSV table of numbers nor a WAV recording.${hint ? ` ${hint}` : " Upload a .csv or .wav capture."}`,
    { byte: 0 },
  );
}
