// Tells a capture's format from its first bytes, not from its file name, and words the refusal of a file that is
// blank or neither format.

import { CaptureParseError } from "./errors.ts";

const SAMPLE_BYTES = 4096;
/** sniffFormat looks at no more than this many bytes (a UTF-8 byte order mark, then 4 KiB). */
export const SNIFF_BYTES = 3 + SAMPLE_BYTES;

export type CaptureFormat = "csv" | "wav";

function startsWith(bytes: Uint8Array, text: string, at = 0): boolean {
  if (bytes.length < at + text.length) return false;
  for (let i = 0; i < text.length; i++) if (bytes[at + i] !== text.charCodeAt(i)) return false;
  return true;
}

/** "wav" for RIFF/WAVE (and the RIFX/RF64 variants, so the WAV reader can say why it refuses them). */
function isWav(bytes: Uint8Array): boolean {
  return (startsWith(bytes, "RIFF") || startsWith(bytes, "RIFX") || startsWith(bytes, "RF64")) && startsWith(bytes, "WAVE", 8);
}

/**
 * CSV: the first 4 KiB are text and contain digits or separators. Text means: no control bytes other than tab,
 * CR and LF, and at most 5 % bytes above 0x7F that are not well-formed UTF-8 (a "µ" or "°" from a legacy
 * Windows code page is fine; binary data is not).
 */
function looksLikeCsv(bytes: Uint8Array): boolean {
  const start = startsWith(bytes, "\xef\xbb\xbf") ? 3 : 0;
  const end = Math.min(bytes.length, start + SAMPLE_BYTES);
  let legacyHigh = 0;
  let digitsOrSeparators = 0;
  for (let p = start; p < end; p++) {
    const b = bytes[p];
    if (b >= 0x20 && b < 0x7f) {
      if ((b >= 0x30 && b <= 0x39) || b === 0x2c || b === 0x3b) digitsOrSeparators++;
    } else if (b === 0x09) digitsOrSeparators++;
    else if (b === 0x0a || b === 0x0d) continue;
    else if (b < 0x20 || b === 0x7f) return false;
    else {
      const length = utf8SequenceLength(bytes, p, end);
      if (length > 0) p += length - 1;
      else legacyHigh++;
    }
  }
  const total = end - start;
  return total > 0 && legacyHigh <= total * 0.05 && digitsOrSeparators > 0;
}

/** Length of the well-formed UTF-8 sequence at p (a sequence cut off by the sample end counts), or 0. */
function utf8SequenceLength(bytes: Uint8Array, p: number, end: number): number {
  const b = bytes[p];
  if (b < 0xc2 || b > 0xf4) return 0;
  const length = b < 0xe0 ? 2 : b < 0xf0 ? 3 : 4;
  for (let k = 1; k < length && p + k < end; k++) if ((bytes[p + k] & 0xc0) !== 0x80) return 0;
  return Math.min(length, end - p);
}

export function sniffFormat(bytes: Uint8Array): CaptureFormat | null {
  if (isWav(bytes)) return "wav";
  if (looksLikeCsv(bytes)) return "csv";
  return null;
}

/** A plain-words guess at what a non-capture file is, for the "unknown-format" message. */
export function describeForeignFile(bytes: Uint8Array): string | null {
  if (startsWith(bytes, "PK\x03\x04")) return "It looks like a ZIP archive or an Excel workbook (.xlsx); save the sheet as CSV.";
  if (startsWith(bytes, "\xd0\xcf\x11\xe0")) return "It looks like an old Excel workbook (.xls); save the sheet as CSV.";
  if (startsWith(bytes, "%PDF")) return "It is a PDF document, not a waveform capture.";
  if (startsWith(bytes, "MATLAB")) return "It is a MATLAB .mat file; export the signals as CSV or WAV.";
  if (startsWith(bytes, "\x89HDF")) return "It is an HDF5 file; export the signals as CSV or WAV.";
  if (startsWith(bytes, "fLaC") || startsWith(bytes, "OggS") || startsWith(bytes, "ID3")) return "It is a compressed audio file; export it as WAV.";
  return null;
}

/**
 * Offset of the first byte that is not blank (space, tab, CR, LF), or bytes.length. A UTF-8 byte order mark counts
 * as blank when `bytes` are the start of the file.
 */
export function firstNonBlank(bytes: Uint8Array, atFileStart: boolean): number {
  let p = 0;
  if (atFileStart && bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) p = 3;
  for (; p < bytes.length; p++) {
    const b = bytes[p];
    if (b !== 0x20 && b !== 0x09 && b !== 0x0a && b !== 0x0d) return p;
  }
  return bytes.length;
}

function whatFile(fileName: string | undefined): string {
  return fileName ? `"${fileName}"` : "The file";
}

export function emptyFileError(fileName: string | undefined): CaptureParseError {
  return new CaptureParseError("empty", `${whatFile(fileName)} is empty.`);
}

/** Neither CSV nor WAV by content; `head` is the start of the file (a few bytes are enough for the hint). */
export function foreignFileError(head: Uint8Array, fileName: string | undefined): CaptureParseError {
  const hint = describeForeignFile(head);
  return new CaptureParseError(
    "unknown-format",
    `${whatFile(fileName)} is neither a CSV table of numbers nor a WAV recording.${hint ? ` ${hint}` : " Upload a .csv or .wav capture."}`,
    { byte: 0 },
  );
}
