// Checks a capture file that arrives as a sequence of byte chunks, in memory bounded by the chunk size plus one
// partial line (CSV) or one partial frame (WAV), whatever the file's size. Its verdict is parseCapture's for the
// same bytes: the same CaptureParseError (code, message, line, column, byte), or on success what an upload needs
// to know (format, sample rate, channels, samples per channel, duration) without the samples themselves.
//
//   const v = createCaptureValidator({ fileName, sampleRate });
//   for (const chunk of file) v.push(chunk);
//   const summary = v.finish();   // null: push the file once more from its first byte, then finish() again
//
// validateCapture() runs that loop over a source that can be read twice. The second reading is needed only when
// the first cannot settle the verdict with what it kept: a CSV time column whose spacing is checked against its
// mean step (csv-time-stream.ts), or WAV float samples that come before the "fmt " chunk describing them.
// Pure: no I/O, no Node or DOM APIs, so the browser can run it on a File's stream.

import type { Capture, ChannelKind } from "../types.ts";
import type { CaptureParseOptions } from "./index.ts";
import { CaptureParseError, DEFAULT_MIN_SAMPLES } from "./errors.ts";
import { CsvStreamReader } from "./csv-stream.ts";
import { SNIFF_BYTES, emptyFileError, firstNonBlank, foreignFileError, sniffFormat, type CaptureFormat } from "./sniff.ts";
import { WavStreamReader } from "./wav-stream.ts";

export interface ChannelSummary {
  name: string;
  kind: ChannelKind;
  unit: string;
  position?: string;
}

export interface CaptureSummary {
  format: CaptureFormat;
  sampleRate: number;
  /** Samples per channel. */
  samples: number;
  durationS: number;
  channels: ChannelSummary[];
}

export interface CaptureValidator {
  push(chunk: Uint8Array): void;
  /**
   * The end of the file: the summary, or null when the file must be pushed once more from its first byte (at most
   * once). Throws the CaptureParseError parseCapture would throw for the same bytes.
   */
  finish(): CaptureSummary | null;
}

/** What validation tells of a parsed capture: the summary the validator gives for the same file. */
export function captureSummary(capture: Capture): CaptureSummary {
  const samples = capture.channels[0]?.data.length ?? 0;
  return {
    format: capture.format as CaptureFormat,
    sampleRate: capture.sampleRate,
    samples,
    durationS: samples / capture.sampleRate,
    channels: capture.channels.map(({ name, kind, unit, position }) => (position === undefined ? { name, kind, unit } : { name, kind, unit, position })),
  };
}

export function createCaptureValidator(opts: CaptureParseOptions = {}): CaptureValidator {
  return new StreamValidator(opts);
}

/** Validates a file that `read` yields as chunks (called once, or twice when the first reading cannot settle it). */
export async function validateCapture(read: () => AsyncIterable<Uint8Array> | Iterable<Uint8Array>, opts: CaptureParseOptions = {}): Promise<CaptureSummary> {
  const validator = createCaptureValidator(opts);
  for (;;) {
    for await (const chunk of read()) validator.push(chunk);
    const summary = validator.finish();
    if (summary) return summary;
  }
}

type State = "sniff" | "first" | "again" | "done";

class StreamValidator implements CaptureValidator {
  private state: State = "sniff";
  private head: Uint8Array = new Uint8Array(SNIFF_BYTES);
  private headLength = 0;
  private format: CaptureFormat | null = null;
  private reader: CsvStreamReader | WavStreamReader | null = null;
  /** Every byte so far is blank (then the verdict is "empty", whatever else was found). */
  private blank = true;
  /** A refusal found while the file was still blank: thrown at the first other byte, or replaced by "empty". */
  private deferred: CaptureParseError | null = null;

  constructor(private readonly opts: CaptureParseOptions) {}

  push(chunk: Uint8Array): void {
    if (this.state === "done") throw new Error("The capture validator has already finished.");
    if (this.state === "again") {
      try {
        this.reader!.push(chunk);
      } catch (error) {
        throw this.end(error);
      }
      return;
    }
    let rest = chunk;
    if (this.state === "sniff") {
      // The format is told from the first SNIFF_BYTES bytes, as parseCapture does.
      const take = Math.min(SNIFF_BYTES - this.headLength, rest.length);
      this.head.set(rest.subarray(0, take), this.headLength);
      this.headLength += take;
      if (this.headLength < SNIFF_BYTES) return;
      this.begin();
      rest = rest.subarray(take);
      if (rest.length === 0) return;
    }
    if (this.blank && firstNonBlank(rest, false) < rest.length) this.blank = false;
    if (this.deferred) {
      if (!this.blank) throw this.end(this.deferred);
      return;
    }
    this.forward(rest);
  }

  finish(): CaptureSummary | null {
    if (this.state === "done") throw new Error("The capture validator has already finished.");
    if (this.state === "sniff") this.begin();
    if (this.state === "first") {
      if (this.blank) throw this.end(emptyFileError(this.opts.fileName));
      if (this.deferred) throw this.end(this.deferred);
    }
    let result;
    try {
      result = this.reader!.finish();
    } catch (error) {
      throw this.end(error);
    }
    if (result === null) {
      if (this.state === "again") throw this.end(new Error("The capture validator needed a third reading."));
      this.state = "again";
      return null;
    }
    this.state = "done";
    const channels = result.channels.map(({ name, kind, unit, position }): ChannelSummary => (position === undefined ? { name, kind, unit } : { name, kind, unit, position }));
    return { format: this.format!, sampleRate: result.sampleRate, samples: result.samples, durationS: result.samples / result.sampleRate, channels };
  }

  /** The first bytes are in: tell the format, start its reader with them. */
  private begin(): void {
    const head = this.head.subarray(0, this.headLength);
    this.state = "first";
    this.blank = firstNonBlank(head, true) === head.length;
    this.format = sniffFormat(head);
    const minSamples = this.opts.minSamples ?? DEFAULT_MIN_SAMPLES;
    if (this.format === "csv") this.reader = new CsvStreamReader({ sampleRate: this.opts.sampleRate, minSamples });
    else if (this.format === "wav") this.reader = new WavStreamReader({ channels: this.opts.channels, minSamples });
    else {
      this.deferred = foreignFileError(head, this.opts.fileName);
      if (!this.blank) throw this.end(this.deferred);
      return;
    }
    this.forward(head);
    this.head = new Uint8Array(0);
  }

  private forward(bytes: Uint8Array): void {
    try {
      this.reader!.push(bytes);
    } catch (error) {
      // While everything so far is blank only a too-long run of blanks or a bad sampleRate option can be refused;
      // the verdict waits for the first other byte, since an all-blank file is "empty" whatever else.
      if (error instanceof CaptureParseError && this.blank) this.deferred = error;
      else throw this.end(error);
    }
  }

  private end(error: unknown): unknown {
    this.state = "done";
    return error;
  }
}
