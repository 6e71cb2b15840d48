// No byte sequence may make a parser fail with anything but a CaptureParseError, and whatever it accepts must
// be a well-formed capture.

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { CaptureParseError, parseCapture, parseCsv, parseWav, writeCsv, writeWav } from "../../src/engine/parse/index.ts";
import type { Capture } from "../../src/engine/types.ts";

function checkCapture(capture: Capture): void {
  expect(Number.isFinite(capture.sampleRate) && capture.sampleRate > 0).toBe(true);
  expect(capture.channels.length).toBeGreaterThan(0);
  const length = capture.channels[0].data.length;
  for (const ch of capture.channels) {
    expect(ch.data.length).toBe(length);
    for (let i = 0; i < ch.data.length; i++) if (!Number.isFinite(ch.data[i])) throw new Error(`non-finite sample in ${ch.name}`);
  }
}

/** Runs a parser: it must return a well-formed capture or throw a CaptureParseError with a message. */
function tryParse(run: () => Capture): void {
  let capture: Capture;
  try {
    capture = run();
  } catch (error) {
    if (!(error instanceof CaptureParseError)) throw error;
    expect(error.message.length).toBeGreaterThan(10);
    return;
  }
  checkCapture(capture);
}

function allParsers(bytes: Uint8Array): void {
  for (const minSamples of [1, 256]) {
    tryParse(() => parseCapture(bytes, { minSamples }));
    tryParse(() => parseCsv(bytes, { minSamples }));
    tryParse(() => parseCsv(bytes, { minSamples, sampleRate: 1000 }));
    tryParse(() => parseWav(bytes, { minSamples }));
  }
}

const sample: Capture = {
  sampleRate: 2000,
  channels: [
    { name: "Ia", kind: "current", position: "A", unit: "A", data: Float64Array.from({ length: 40 }, (_, i) => Math.sin(i) * 10) },
    { name: "acc_v", kind: "vibration", position: "V", unit: "g", data: Float64Array.from({ length: 40 }, (_, i) => i * 1e-3) },
  ],
};
const validCsv = new TextEncoder().encode(writeCsv(sample, { digits: 6 }));
const validCsvNoTime = new TextEncoder().encode(writeCsv(sample, { timeColumn: false, separator: ";" }));
const validWavs = [writeWav(sample), writeWav(sample, { bits: 16 }), writeWav(sample, { bits: 24 }), writeWav({ ...sample, channels: [sample.channels[0]] }, { bits: 16 })];

/** Random edits: overwrite, insert, delete, truncate, and writes of 32-bit values (WAV sizes and fields). */
const mutation = fc.oneof(
  fc.record({ kind: fc.constant("set" as const), at: fc.nat(), byte: fc.integer({ min: 0, max: 255 }) }),
  fc.record({ kind: fc.constant("set-text" as const), at: fc.nat(), byte: fc.constantFrom(..."0123456789.,;-+eE\n\r\t \"#NaIf".split("").map((c) => c.charCodeAt(0))) }),
  fc.record({ kind: fc.constant("insert" as const), at: fc.nat(), bytes: fc.uint8Array({ maxLength: 8 }) }),
  fc.record({ kind: fc.constant("delete" as const), at: fc.nat(), count: fc.integer({ min: 1, max: 16 }) }),
  fc.record({ kind: fc.constant("truncate" as const), at: fc.nat() }),
  fc.record({ kind: fc.constant("u32" as const), at: fc.nat(), value: fc.oneof(fc.constantFrom(0, 1, 0xffffffff, 0x7fffffff, 0xfffe, 3), fc.nat()) }),
);
type Mutation = typeof mutation extends fc.Arbitrary<infer T> ? T : never;

function mutate(original: Uint8Array, edits: Mutation[]): Uint8Array {
  let bytes = original.slice();
  for (const edit of edits) {
    const at = bytes.length === 0 ? 0 : edit.at % bytes.length;
    switch (edit.kind) {
      case "set":
      case "set-text":
        if (bytes.length > 0) bytes[at] = edit.byte;
        break;
      case "insert": {
        const next = new Uint8Array(bytes.length + edit.bytes.length);
        next.set(bytes.subarray(0, at));
        next.set(edit.bytes, at);
        next.set(bytes.subarray(at), at + edit.bytes.length);
        bytes = next;
        break;
      }
      case "delete": {
        const cut = Math.min(edit.count, bytes.length - at);
        const next = new Uint8Array(bytes.length - cut);
        next.set(bytes.subarray(0, at));
        next.set(bytes.subarray(at + cut), at);
        bytes = next;
        break;
      }
      case "truncate":
        bytes = bytes.slice(0, at);
        break;
      case "u32":
        if (bytes.length >= 4) new DataView(bytes.buffer).setUint32(Math.min(at, bytes.length - 4), edit.value >>> 0, true);
        break;
    }
  }
  return bytes;
}

describe("parsers only ever fail with CaptureParseError", () => {
  it("on arbitrary bytes", () => {
    fc.assert(fc.property(fc.uint8Array({ maxLength: 512 }), (bytes) => allParsers(bytes)), { numRuns: 3000 });
  });

  it("on arbitrary bytes behind a RIFF/WAVE header", () => {
    const header = new TextEncoder().encode("RIFF\0\0\0\0WAVEfmt ");
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 256 }), (tail) => {
        const bytes = new Uint8Array(header.length + tail.length);
        bytes.set(header);
        bytes.set(tail, header.length);
        allParsers(bytes);
      }),
      { numRuns: 2000 },
    );
  });

  it("on arbitrary text made of CSV characters", () => {
    const csvChar = fc.constantFrom(..."0123456789.,;-+eE\n\r\t \"#tIaNf%=".split(""));
    fc.assert(
      fc.property(fc.array(csvChar, { maxLength: 300 }), (chars) => allParsers(new TextEncoder().encode(`t,Ia\n${chars.join("")}`))),
      { numRuns: 3000 },
    );
  });

  it("on mutated valid CSV files", () => {
    fc.assert(
      fc.property(fc.constantFrom(validCsv, validCsvNoTime), fc.array(mutation, { minLength: 1, maxLength: 6 }), (file, edits) => allParsers(mutate(file, edits))),
      { numRuns: 3000 },
    );
  });

  it("on mutated valid WAV files", () => {
    fc.assert(
      fc.property(fc.constantFrom(...validWavs), fc.array(mutation, { minLength: 1, maxLength: 6 }), (file, edits) => allParsers(mutate(file, edits))),
      { numRuns: 3000 },
    );
  });

  it("the unmutated files parse (the mutations start from valid input)", () => {
    for (const file of [validCsv, validCsvNoTime, ...validWavs]) checkCapture(parseCapture(file, { minSamples: 1 }));
  });
});
