// Typed failure of the capture parsers. Every rejection of an input file is a CaptureParseError with a
// stable `code` for programs and a plain-language `message` for the technician who uploaded the file.

export type CaptureParseErrorCode =
  | "empty"
  | "no-numeric-data"
  | "non-numeric-cell"
  | "non-finite"
  | "ragged-row"
  | "time-not-uniform"
  | "time-decreasing"
  | "wav-truncated"
  | "wav-bad-header"
  | "unsupported-encoding"
  | "too-few-samples"
  | "no-sample-rate"
  | "unknown-format";

export interface CaptureParseErrorWhere {
  /** 1-based line number, as a text editor shows it. */
  line?: number;
  /** 1-based column (field) number in a CSV row. */
  column?: number;
  /** 0-based byte offset into the file. */
  byte?: number;
}

export class CaptureParseError extends Error {
  readonly code: CaptureParseErrorCode;
  readonly line?: number;
  readonly column?: number;
  readonly byte?: number;

  constructor(code: CaptureParseErrorCode, message: string, where: CaptureParseErrorWhere = {}) {
    super(message);
    this.name = "CaptureParseError";
    this.code = code;
    if (where.line !== undefined) this.line = where.line;
    if (where.column !== undefined) this.column = where.column;
    if (where.byte !== undefined) this.byte = where.byte;
  }
}

export function isCaptureParseError(value: unknown): value is CaptureParseError {
  return value instanceof CaptureParseError;
}

/** Samples per channel below which the spectral analysis has nothing to work with. */
export const DEFAULT_MIN_SAMPLES = 256;

export function checkMinSamples(samples: number, minSamples: number, sampleRate: number): void {
  if (samples >= minSamples) return;
  const seconds = sampleRate > 0 ? ` (${formatSeconds(samples / sampleRate)} at ${formatHz(sampleRate)})` : "";
  throw new CaptureParseError(
    "too-few-samples",
    `The capture has only ${samples} sample${samples === 1 ? "" : "s"} per channel${seconds}; ` +
      `at least ${minSamples} are needed. Record a longer capture.`,
  );
}

export function formatHz(hz: number): string {
  return `${Number(hz.toPrecision(6))} Hz`;
}

function formatSeconds(s: number): string {
  return `${Number(s.toPrecision(3))} s`;
}
