// Capture parsers of the analysis engine: CSV and WAV in, Capture out; and the streaming validator that gives the
// same verdict in bounded memory (capture-validator.ts). Pure: bytes in, no I/O.

import type { Capture } from "../types.ts";
import { parseCsv } from "./csv.ts";
import { DEFAULT_MIN_SAMPLES } from "./errors.ts";
import { emptyFileError, firstNonBlank, foreignFileError, sniffFormat } from "./sniff.ts";
import { parseWav, type WavChannelOption } from "./wav.ts";

export { CaptureParseError, DEFAULT_MIN_SAMPLES, isCaptureParseError } from "./errors.ts";
export type { CaptureParseErrorCode, CaptureParseErrorWhere } from "./errors.ts";
export { parseCsv, type CsvParseOptions } from "./csv.ts";
export { writeCsv, type CsvWriteOptions } from "./csv-write.ts";
export { parseWav, writeWav, type WavChannelOption, type WavParseOptions, type WavWriteOptions } from "./wav.ts";
export { sniffFormat, type CaptureFormat } from "./sniff.ts";
export { parseDecimal, scanNumber, newScanResult, type ScanResult } from "./number-scan.ts";
export { classifyColumn, classifyColumns, timeColumnInfo, type ColumnMeaning } from "./channel-names.ts";
export {
  captureSummary,
  createCaptureValidator,
  validateCapture,
  type CaptureSummary,
  type CaptureValidator,
  type ChannelSummary,
} from "./capture-validator.ts";

export interface CaptureParseOptions {
  /** Only used in messages; the format is told from the content. */
  fileName?: string;
  /** CSV: sample rate in Hz, overriding the file. */
  sampleRate?: number;
  minSamples?: number;
  /** WAV: channel names, kinds, units and scales, overriding the file's own description. */
  channels?: WavChannelOption[];
}

export function parseCapture(bytes: Uint8Array, opts: CaptureParseOptions = {}): Capture {
  const minSamples = opts.minSamples ?? DEFAULT_MIN_SAMPLES;
  if (firstNonBlank(bytes, true) === bytes.length) throw emptyFileError(opts.fileName);
  const format = sniffFormat(bytes);
  if (format === "wav") return parseWav(bytes, { channels: opts.channels, minSamples });
  if (format === "csv") return parseCsv(bytes, { sampleRate: opts.sampleRate, minSamples });
  throw foreignFileError(bytes, opts.fileName);
}
