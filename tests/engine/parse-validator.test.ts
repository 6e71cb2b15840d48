// The streaming capture validator gives the full parser's verdict for every file, however it is cut into chunks.
//
// Oracle: parseCapture, the project's own full parser (its cell values are checked against ECMAScript Number() in
// parse-csv.test.ts, its error cases in parse-csv/parse-wav/parse-capture.test.ts). For each generated file, valid
// or corrupted, the validator fed at random chunk boundaries must return captureSummary(parseCapture(file)), or
// throw the same CaptureParseError: same code, message, line, column and byte.

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  CaptureParseError,
  captureSummary,
  createCaptureValidator,
  parseCapture,
  validateCapture,
  writeCsv,
  writeWav,
  type CaptureParseOptions,
  type WavChannelOption,
} from "../../src/engine/parse/index.ts";
import type { Capture, ChannelKind } from "../../src/engine/types.ts";

const enc = (text: string) => new TextEncoder().encode(text);

type Verdict = { summary: unknown } | { error: { name: string; code: string; message: string; line?: number; column?: number; byte?: number } };

function errorVerdict(error: unknown): Verdict {
  if (!(error instanceof CaptureParseError)) throw error;
  const { name, code, message, line, column, byte } = error;
  return { error: { name, code, message, line, column, byte } };
}

/** The oracle's verdict. */
function oracle(bytes: Uint8Array, opts: CaptureParseOptions): Verdict {
  try {
    return { summary: captureSummary(parseCapture(bytes, opts)) };
  } catch (error) {
    return errorVerdict(error);
  }
}

/** Cuts bytes into chunks of the given sizes (cycling through them). */
function* chunked(bytes: Uint8Array, sizes: number[]): Generator<Uint8Array> {
  let k = 0;
  for (let p = 0; p < bytes.length; k++) {
    const size = Math.max(1, sizes.length ? sizes[k % sizes.length] : bytes.length);
    yield bytes.subarray(p, p + size);
    p += size;
  }
}

/** The validator's verdict; a second reading, when asked for, is cut differently. Also returns how many readings it took. */
function streamed(bytes: Uint8Array, opts: CaptureParseOptions, sizes: number[]): { verdict: Verdict; readings: number } {
  const validator = createCaptureValidator(opts);
  let readings = 0;
  try {
    for (;;) {
      readings++;
      // Copies, reused between pushes: the validator must not keep a chunk it was given.
      const scratch = new Uint8Array(Math.max(1, ...sizes, 1));
      for (const chunk of chunked(bytes, readings === 1 ? sizes : [...sizes].reverse())) {
        const copy = chunk.length <= scratch.length ? scratch.subarray(0, chunk.length) : new Uint8Array(chunk.length);
        copy.set(chunk);
        validator.push(copy);
        copy.fill(0x23);
      }
      const summary = validator.finish();
      if (summary) return { verdict: { summary }, readings };
      expect(readings).toBe(1);
    }
  } catch (error) {
    return { verdict: errorVerdict(error), readings };
  }
}

function sameVerdict(bytes: Uint8Array, opts: CaptureParseOptions, sizes: number[]): Verdict {
  const expected = oracle(bytes, opts);
  expect(streamed(bytes, opts, sizes).verdict).toEqual(expected);
  return expected;
}

const chunkSizes = fc.array(fc.oneof(fc.integer({ min: 1, max: 7 }), fc.integer({ min: 1, max: 300 }), fc.integer({ min: 1, max: 70_000 })), { maxLength: 6 });

const options = fc.record(
  {
    fileName: fc.constantFrom("motor.csv", "pump 7.wav"),
    sampleRate: fc.oneof(fc.constant(undefined), fc.constantFrom(1000, 4000.5, 0, -5, NaN)),
    minSamples: fc.constantFrom(1, 5, 100, 256),
    // WAV channel overrides; an infinite scale is refused when its channel is reached.
    channels: fc.constantFrom<WavChannelOption[]>([{ name: "L1", kind: "voltage", position: "A" }], [{}, { scale: Infinity }]),
  },
  { requiredKeys: ["minSamples"] },
);

// ---------------------------------------------------------------------------------------------------------------
// Generated captures

const CHANNEL_NAMES: [string, ChannelKind, string][] = [
  ["Ia", "current", "A"],
  ["Ib", "current", "A"],
  ["Ic", "current", "A"],
  ["acc_h", "vibration", "g"],
  ["vel_v", "vibration", "mm/s"],
  ["U1", "voltage", "V"],
  ["temperature", "other", ""],
  ["current_A", "current", "A"],
];

const captureArb = fc
  .record({
    sampleRate: fc.constantFrom(1000, 2000, 3000, 5000, 8000, 10000, 25600),
    frames: fc.oneof(fc.integer({ min: 1, max: 40 }), fc.integer({ min: 200, max: 700 })),
    names: fc.uniqueArray(fc.constantFrom(...CHANNEL_NAMES), { minLength: 1, maxLength: 4, selector: (c) => c[0] }),
    seed: fc.integer({ min: 1, max: 1e6 }),
  })
  .map(({ sampleRate, frames, names, seed }): Capture => ({
    sampleRate,
    channels: names.map(([name, kind, unit], k) => ({
      name,
      kind,
      unit,
      data: Float64Array.from({ length: frames }, (_, i) => Math.sin((i * (k + 1) + seed) / 7) * 10 ** (k - 1) + (seed % 13) * 1e-3),
    })),
  }));

// ---------------------------------------------------------------------------------------------------------------
// CSV files and their corruptions (on lines of text)

const csvWriteArb = fc.record({
  timeColumn: fc.boolean(),
  digits: fc.oneof(fc.constant(undefined), fc.integer({ min: 2, max: 9 })),
  separator: fc.constantFrom(",", ";", "\t") as fc.Arbitrary<"," | ";" | "\t">,
});

const BAD_CELLS = ["abc", "", "NaN", "-inf", "1e999", "12,5", "2 A", "1.2.3", '"3', "  ", "0x10", "2026-01-01", "+", "1e", "Infinity"];

const csvEdit = fc.oneof(
  fc.record({ kind: fc.constant("cut" as const), at: fc.nat() }),
  fc.record({ kind: fc.constant("cell" as const), row: fc.nat(), col: fc.nat(), text: fc.constantFrom(...BAD_CELLS) }),
  fc.record({ kind: fc.constant("ragged" as const), row: fc.nat(), more: fc.boolean() }),
  fc.record({ kind: fc.constant("time" as const), row: fc.nat(), how: fc.constantFrom("repeat", "back", "gap", "drift", "jitter") }),
  fc.record({ kind: fc.constant("line" as const), row: fc.nat(), text: fc.constantFrom("", "# note", "   ", "\t", "# sample_rate=0", "# fs=2 kHz", "% dt = 100 us", "s,A,A,A", "1,2,3,4") }),
  fc.record({ kind: fc.constant("eol" as const), eol: fc.constantFrom("\r\n", "\r") }),
  fc.record({ kind: fc.constant("bom" as const) }),
  fc.record({ kind: fc.constant("header" as const), how: fc.constantFrom("drop", "numeric", "quoted", "trailing-separator", "units") }),
  fc.record({ kind: fc.constant("decimal-comma" as const) }),
  fc.record({ kind: fc.constant("byte" as const), at: fc.nat(), byte: fc.integer({ min: 0, max: 255 }) }),
);
type CsvEdit = typeof csvEdit extends fc.Arbitrary<infer T> ? T : never;

function editCsv(text: string, edits: CsvEdit[]): Uint8Array {
  let lines = text.split("\n");
  if (lines[lines.length - 1] === "") lines.pop();
  let eol = "\n";
  let bom = "";
  let cutAt = -1;
  let byteEdits: { at: number; byte: number }[] = [];
  const sep = /[;\t]/.exec(lines.find((l) => !l.startsWith("#")) ?? "")?.[0] ?? ",";
  const firstData = () => lines.findIndex((l, i) => i > 0 && /^-?\d/.test(l));
  for (const e of edits) {
    const start = Math.max(0, firstData());
    const dataRows = lines.length - start;
    const at = (n: number) => start + (dataRows > 0 ? n % dataRows : 0);
    switch (e.kind) {
      case "cut":
        cutAt = e.at;
        break;
      case "cell": {
        const i = at(e.row);
        const cells = (lines[i] ?? "").split(sep);
        cells[e.col % cells.length] = e.text;
        lines[i] = cells.join(sep);
        break;
      }
      case "ragged": {
        const i = at(e.row);
        const cells = (lines[i] ?? "").split(sep);
        if (e.more) cells.push("1");
        else cells.pop();
        lines[i] = cells.join(sep);
        break;
      }
      case "time": {
        const i = at(e.row);
        if (i <= start || i >= lines.length) break;
        const cells = lines[i].split(sep);
        const prev = lines[i - 1].split(sep);
        const t = Number(cells[0].replace(",", "."));
        const p = Number(prev[0].replace(",", "."));
        if (!Number.isFinite(t) || !Number.isFinite(p)) break;
        if (e.how === "gap") lines.splice(i, 1);
        else {
          const value = e.how === "repeat" ? p : e.how === "back" ? p - (t - p) : e.how === "drift" ? t + (t - p) * 0.7 : t + (t - p) * 0.01;
          cells[0] = String(value);
          lines[i] = cells.join(sep);
          if (e.how === "drift") for (let j = i + 1; j < lines.length; j++) lines[j] = lines[j].replace(/^[^,;\t]*/, (x) => String(Number(x) + (t - p) * 0.7));
        }
        break;
      }
      case "line":
        lines.splice(Math.min(lines.length, e.row % (lines.length + 1)), 0, e.text);
        break;
      case "eol":
        eol = e.eol;
        break;
      case "bom":
        bom = "\ufeff";
        break;
      case "header": {
        const h = lines.findIndex((l) => !l.startsWith("#"));
        if (h < 0) break;
        if (e.how === "drop") lines.splice(h, 1);
        else if (e.how === "numeric") lines[h] = lines[h].split(sep).map((_, i) => String(i)).join(sep);
        else if (e.how === "quoted") lines[h] = lines[h].split(sep).map((c) => `"${c}"`).join(sep);
        else if (e.how === "trailing-separator") lines = lines.map((l, i) => (i >= h ? l + sep : l));
        else lines.splice(h + 1, 0, lines[h].split(sep).map((c) => (/^t/i.test(c) ? "s" : "A")).join(sep));
        break;
      }
      case "decimal-comma":
        if (sep !== ",") lines = lines.map((l) => (l.startsWith("#") ? l : l.replace(/\./g, ",")));
        break;
      case "byte":
        byteEdits.push(e);
        break;
    }
  }
  let bytes = enc(bom + lines.join(eol) + eol);
  if (byteEdits.length) {
    bytes = bytes.slice();
    for (const b of byteEdits) if (bytes.length) bytes[b.at % bytes.length] = b.byte;
  }
  return cutAt >= 0 ? bytes.subarray(0, cutAt % (bytes.length + 1)) : bytes;
}

// ---------------------------------------------------------------------------------------------------------------
// WAV files and their corruptions (on chunks and bytes)

const wavWriteArb = fc.oneof(
  fc.constant({}),
  fc.constant({ bits: 16 as const }),
  fc.constant({ bits: 24 as const }),
  fc.constant({ bits: 32 as const, float: false }),
  fc.constant({ bits: 16 as const, describeChannels: false }),
  fc.constant({ describeChannels: false }),
);

interface Chunk {
  id: string;
  body: Uint8Array;
  /** Size written in the chunk header, when it lies. */
  size?: number;
}

function readChunks(wav: Uint8Array): Chunk[] {
  const view = new DataView(wav.buffer, wav.byteOffset, wav.byteLength);
  const chunks: Chunk[] = [];
  for (let p = 12; p + 8 <= wav.length; ) {
    const id = String.fromCharCode(...wav.subarray(p, p + 4));
    const size = view.getUint32(p + 4, true);
    chunks.push({ id, body: wav.slice(p + 8, p + 8 + size) });
    p += 8 + size + (size & 1);
  }
  return chunks;
}

function writeChunks(chunks: Chunk[], riff = "RIFF"): Uint8Array {
  const total = 12 + chunks.reduce((n, c) => n + 8 + c.body.length + (c.body.length & 1), 0);
  const out = new Uint8Array(total);
  const view = new DataView(out.buffer);
  const ascii = (at: number, s: string) => [...s].forEach((ch, i) => (out[at + i] = ch.charCodeAt(0)));
  ascii(0, riff);
  view.setUint32(4, total - 8, true);
  ascii(8, "WAVE");
  let p = 12;
  for (const c of chunks) {
    ascii(p, c.id);
    view.setUint32(p + 4, c.size ?? c.body.length, true);
    out.set(c.body, p + 8);
    p += 8 + c.body.length + (c.body.length & 1);
  }
  return out;
}

const wavEdit = fc.oneof(
  fc.record({ kind: fc.constant("cut" as const), at: fc.nat() }),
  fc.record({ kind: fc.constant("fmt-after-data" as const) }),
  fc.record({ kind: fc.constant("junk" as const), where: fc.nat(), size: fc.integer({ min: 0, max: 9 }) }),
  fc.record({ kind: fc.constant("data-size" as const), value: fc.oneof(fc.constant(0xffffffff), fc.integer({ min: -64, max: 64 })) }),
  fc.record({ kind: fc.constant("chunk-size" as const), which: fc.nat(), value: fc.oneof(fc.constant(0xffffffff), fc.nat({ max: 100_000 })) }),
  fc.record({ kind: fc.constant("non-finite" as const), sample: fc.nat(), value: fc.constantFrom(NaN, Infinity, -Infinity) }),
  fc.record({ kind: fc.constant("fmt-field" as const), at: fc.constantFrom(0, 2, 4, 12, 14, 24), value: fc.constantFrom(0, 1, 2, 3, 6, 8, 64, 0xfffe) }),
  fc.record({ kind: fc.constant("description" as const), text: fc.constantFrom("[{nope", "{}", "[]", '[{"name":"L1","scale":1e999}]', "[{},{},{},{},{}]", "\u0000") }),
  fc.record({ kind: fc.constant("second-data" as const) }),
  fc.record({ kind: fc.constant("riff" as const), id: fc.constantFrom("RIFX", "RF64") }),
  fc.record({ kind: fc.constant("byte" as const), at: fc.nat(), byte: fc.integer({ min: 0, max: 255 }) }),
);
type WavEdit = typeof wavEdit extends fc.Arbitrary<infer T> ? T : never;

function editWav(wav: Uint8Array, edits: WavEdit[]): Uint8Array {
  let chunks = readChunks(wav);
  let riff = "RIFF";
  let cutAt = -1;
  const byteEdits: { at: number; byte: number }[] = [];
  const index = (id: string) => chunks.findIndex((c) => c.id === id);
  for (const e of edits) {
    switch (e.kind) {
      case "cut":
        cutAt = e.at;
        break;
      case "fmt-after-data": {
        const f = index("fmt ");
        if (f >= 0) chunks.push(...chunks.splice(f, 1));
        break;
      }
      case "junk":
        chunks.splice(e.where % (chunks.length + 1), 0, { id: "LIST", body: new Uint8Array(e.size).fill(7) });
        break;
      case "data-size": {
        const d = index("data");
        if (d >= 0) chunks[d].size = e.value === 0xffffffff ? e.value : Math.max(0, chunks[d].body.length + e.value);
        break;
      }
      case "chunk-size":
        if (chunks.length) chunks[e.which % chunks.length].size = e.value;
        break;
      case "non-finite": {
        const d = index("data");
        const f = index("fmt ");
        if (d < 0 || f < 0 || chunks[d].body.length < 4) break;
        const fmtView = new DataView(chunks[f].body.buffer, chunks[f].body.byteOffset);
        const wide = fmtView.getUint16(14, true) === 64;
        const body = chunks[d].body;
        const at = (e.sample * 4) % (body.length - (wide ? 7 : 3));
        new DataView(body.buffer, body.byteOffset)[wide ? "setFloat64" : "setFloat32"](at - (at % 4), e.value, true);
        break;
      }
      case "fmt-field": {
        const f = index("fmt ");
        if (f >= 0 && chunks[f].body.length >= e.at + 2) new DataView(chunks[f].body.buffer, chunks[f].body.byteOffset).setUint16(e.at, e.value, true);
        break;
      }
      case "description": {
        const b = index("bhch");
        const body = enc(e.text);
        if (b >= 0) chunks[b].body = body;
        else chunks.splice(1, 0, { id: "bhch", body });
        break;
      }
      case "second-data": {
        const d = index("data");
        if (d >= 0) chunks.push({ id: "data", body: chunks[d].body.slice(0, Math.floor(chunks[d].body.length / 2)) });
        break;
      }
      case "riff":
        riff = e.id;
        break;
      case "byte":
        byteEdits.push(e);
        break;
    }
  }
  let bytes = writeChunks(chunks, riff);
  for (const b of byteEdits) bytes[b.at % bytes.length] = b.byte;
  if (cutAt >= 0) bytes = bytes.subarray(0, cutAt % (bytes.length + 1));
  return bytes;
}

// ---------------------------------------------------------------------------------------------------------------

describe("createCaptureValidator gives parseCapture's verdict", () => {
  it("for valid CSV files from writeCsv, at any chunk boundaries", () => {
    fc.assert(
      fc.property(captureArb, csvWriteArb, options, chunkSizes, (capture, write, opts, sizes) => {
        sameVerdict(enc(writeCsv(capture, write)), opts, sizes);
      }),
      { numRuns: 400 },
    );
  });

  it("for corrupted CSV files: cut, bad cells, ragged rows, broken time column, NaN, comment and header edits", () => {
    let refused = 0;
    fc.assert(
      fc.property(captureArb, csvWriteArb, fc.array(csvEdit, { minLength: 1, maxLength: 4 }), options, chunkSizes, (capture, write, edits, opts, sizes) => {
        if ("error" in sameVerdict(editCsv(writeCsv(capture, write), edits), opts, sizes)) refused++;
      }),
      { numRuns: 1500 },
    );
    expect(refused).toBeGreaterThan(300); // the corruptions do reach the error paths
  });

  it("for valid WAV files from writeWav, at any chunk boundaries", () => {
    fc.assert(
      fc.property(captureArb, wavWriteArb, options, chunkSizes, (capture, write, opts, sizes) => {
        sameVerdict(writeWav(capture, write), opts, sizes);
      }),
      { numRuns: 300 },
    );
  });

  it("for corrupted WAV files: cut, lying sizes, NaN/Infinity samples, fmt after the data, junk chunks, broken headers", () => {
    let refused = 0;
    fc.assert(
      fc.property(captureArb, wavWriteArb, fc.array(wavEdit, { minLength: 1, maxLength: 4 }), options, chunkSizes, (capture, write, edits, opts, sizes) => {
        if ("error" in sameVerdict(editWav(writeWav(capture, write), edits), opts, sizes)) refused++;
      }),
      { numRuns: 2500 },
    );
    expect(refused).toBeGreaterThan(500);
  });

  it("for arbitrary bytes and arbitrary text of CSV characters", () => {
    const csvChar = fc.constantFrom(..."0123456789.,;-+eE\n\r\t \"#tIaNf%=\ufeff".split(""));
    fc.assert(
      fc.property(fc.oneof(fc.uint8Array({ maxLength: 600 }), fc.array(csvChar, { maxLength: 400 }).map((c) => enc(`t,Ia\n${c.join("")}`))), options, chunkSizes, (bytes, opts, sizes) => {
        sameVerdict(bytes, opts, sizes);
      }),
      { numRuns: 2000 },
    );
  });
});

describe("the validator on larger files", () => {
  /** A time + currents CSV of `rows` rows at `rate` Hz, time printed with `decimals` decimals. */
  function currents(rows: number, rate: number, decimals: number, sep = ","): string[] {
    const lines = [["time_s", "Ia", "Ib"].join(sep)];
    for (let i = 0; i < rows; i++) lines.push([(i / rate).toFixed(decimals), (10 * Math.sin(i / 9)).toFixed(4), ((i % 17) - 8).toString()].join(sep));
    return lines;
  }

  it("settles a valid time column in one reading, also across merged blocks of rows", () => {
    for (const [rows, rate, decimals] of [[300, 10000, 6], [30_000, 3000, 6], [120_000, 25600, 8]] as const) {
      const bytes = enc(`${currents(rows, rate, decimals).join("\n")}\n`);
      const { verdict, readings } = streamed(bytes, { fileName: "long.csv" }, [65_536, 1_000_003]);
      expect(verdict).toEqual(oracle(bytes, { fileName: "long.csv" }));
      expect(verdict).toMatchObject({ summary: { sampleRate: rate, samples: rows } });
      expect(readings).toBe(1);
    }
  });

  it("reads the file again to name the first faulty row of a time column (gap, drift) and agrees with the full parser", () => {
    // One row missing before the middle: the step there is twice the mean (a gap later in the file would make the
    // values before it drift from the mean line first).
    const gap = currents(50_000, 10000, 6);
    gap.splice(12_345, 1);
    const drift = currents(50_000, 10000, 7);
    for (let i = 30_000; i < drift.length; i++) drift[i] = drift[i].replace(/^[^,]*/, (t) => (Number(t) * 1.0009).toFixed(7));
    for (const [lines, line] of [[gap, 12_346], [drift, undefined]] as const) {
      const bytes = enc(lines.join("\n"));
      const { verdict, readings } = streamed(bytes, {}, [4096, 77_777]);
      expect(verdict).toEqual(oracle(bytes, {}));
      expect(verdict).toMatchObject({ error: { code: "time-not-uniform" } });
      if (line !== undefined) expect(verdict).toMatchObject({ error: { line } });
      expect(readings).toBe(2);
    }
  });

  it("names the row where time goes backwards without a second reading when the rows before it are even", () => {
    const lines = currents(20_000, 5000, 6);
    lines[15_001] = lines[15_001].replace(/^[^,]*/, "0.5");
    const bytes = enc(lines.join("\n"));
    const { verdict, readings } = streamed(bytes, {}, [8192]);
    expect(verdict).toEqual(oracle(bytes, {}));
    expect(verdict).toMatchObject({ error: { code: "time-decreasing", line: 15_002 } });
    expect(readings).toBe(1);
  });

  it("chooses the decimal mark from the first 64 KiB of data, like the full parser", () => {
    const lines = currents(12_000, 1000, 3, ";").map((l) => l.replace(/\./g, ","));
    // A dot after the first 64 KiB: the file uses decimal commas, and that cell is refused.
    lines[9000] = lines[9000].replace(/,/, ".");
    const bytes = enc(lines.join("\n"));
    expect(bytes.length).toBeGreaterThan(2 * 65536);
    const verdict = sameVerdict(bytes, {}, [1000]);
    expect(verdict).toMatchObject({ error: { code: "non-numeric-cell", line: 9001, message: expect.stringMatching(/This file uses decimal commas/) } });
  });

  it("checks float WAV samples for NaN in passing, and in a second reading when the fmt chunk follows the data", () => {
    const capture: Capture = { sampleRate: 8000, channels: [0, 1, 2].map((k) => ({ name: `ch${k}`, kind: "current" as const, unit: "A", data: Float64Array.from({ length: 40_000 }, (_, i) => Math.sin(i / (k + 3))) })) };
    const wav = writeWav(capture);
    const chunks = readChunks(wav);
    const data = chunks.find((c) => c.id === "data")!;
    new DataView(data.body.buffer, data.body.byteOffset).setFloat32((31_000 * 3 + 2) * 4, NaN, true);
    new DataView(data.body.buffer, data.body.byteOffset).setFloat32((35_000 * 3 + 1) * 4, Infinity, true);
    const inOrder = writeChunks(chunks);
    const fmtLast = writeChunks([...chunks.filter((c) => c.id !== "fmt "), chunks.find((c) => c.id === "fmt ")!]);
    for (const [bytes, expectedReadings] of [[inOrder, 1], [fmtLast, 2]] as const) {
      const { verdict, readings } = streamed(bytes, {}, [5000, 3]);
      expect(verdict).toEqual(oracle(bytes, {}));
      expect(verdict).toMatchObject({ error: { code: "non-finite", message: expect.stringMatching(/^Sample 35001 of channel 2 /) } });
      expect(readings).toBe(expectedReadings);
    }
  });
});

describe("the limits that bound the validator's memory (both parsers apply them)", () => {
  it("refuses a line longer than 1 MiB, before anything wrong inside it", () => {
    const long = `0.002,${"1".repeat((1 << 20) + 10)}`;
    for (const text of [`t,Ia\n0,1\n0.001,2\n${long}\n0.003,4\n`, `# fs=5000 ${"x".repeat(1 << 20)}\nt,Ia\n`, `t,Ia\n0,1\n${long.replace("0.002", "abc")}`]) {
      const bytes = enc(text);
      const verdict = sameVerdict(bytes, { fileName: "long.csv" }, [4096]);
      expect(verdict).toMatchObject({ error: { code: "unknown-format", message: expect.stringMatching(/runs on for more than 1 MiB without a line break/) } });
      sameVerdict(bytes, {}, [1 << 21]);
    }
  });

  it("calls a file of blanks empty however long its lines, and refuses blanks followed by content as the full parser does", () => {
    const tabs = "\t".repeat((1 << 20) + 5);
    expect(sameVerdict(enc(`${tabs}\n\n`), { fileName: "blank.csv" }, [4099, 100_000])).toMatchObject({ error: { code: "empty", message: '"blank.csv" is empty.' } });
    expect(sameVerdict(enc(`${tabs}\nt,Ia\n0,1\n`), {}, [4099, 100_000])).toMatchObject({ error: { code: "unknown-format" } });
    expect(sameVerdict(enc(`${" ".repeat(5000)}\nt,Ia\n0,1\n`), {}, [10])).toMatchObject({ error: { code: "unknown-format" } });
  });

  it("refuses a WAV channel description larger than 1 MiB", () => {
    const capture: Capture = { sampleRate: 1000, channels: [{ name: "Ia", kind: "current", unit: "A", data: new Float64Array(300) }] };
    const chunks = readChunks(writeWav(capture));
    chunks.find((c) => c.id === "bhch")!.body = enc(`[{"name":"${"x".repeat(1 << 20)}"}]`);
    const verdict = sameVerdict(writeChunks(chunks), {}, [65_536]);
    expect(verdict).toMatchObject({ error: { code: "wav-bad-header", message: expect.stringMatching(/at most 1048576 are allowed/) } });
  });
});

describe("validateCapture", () => {
  it("reads an async source, twice when needed", async () => {
    const lines = ["t,Ia", ...Array.from({ length: 5000 }, (_, i) => `${(i / 1000).toFixed(6)},${i % 7}`)];
    lines.splice(1000, 1);
    const bytes = enc(lines.join("\n"));
    let opened = 0;
    const read = async function* () {
      opened++;
      for (const chunk of chunked(bytes, [999])) yield chunk;
    };
    await expect(validateCapture(read, { fileName: "gap.csv" })).rejects.toMatchObject({ code: "time-not-uniform", line: 1001 });
    expect(opened).toBe(2);
    opened = 0;
    const summary = await validateCapture(async function* () {
      opened++;
      yield enc("# sample_rate=2000\nIa,Ib\n");
      yield enc(Array.from({ length: 300 }, (_, i) => `${i},${-i}`).join("\n"));
    });
    expect(summary).toEqual({ format: "csv", sampleRate: 2000, samples: 300, durationS: 0.15, channels: [{ name: "Ia", kind: "current", unit: "A", position: "A" }, { name: "Ib", kind: "current", unit: "A", position: "B" }] });
    expect(opened).toBe(1);
  });

  it("refuses to go on after its verdict, and notices a file that changed between readings", () => {
    const v = createCaptureValidator();
    v.push(enc("t,Ia\n0,1\n"));
    expect(() => v.finish()).toThrow(CaptureParseError);
    expect(() => v.push(enc("1"))).toThrow(/already finished/);
    const lines = ["t,Ia", ...Array.from({ length: 400 }, (_, i) => `${(i / 1000).toFixed(6)},1`)];
    lines.splice(100, 1);
    const again = createCaptureValidator({ minSamples: 1 });
    again.push(enc(lines.join("\n")));
    expect(again.finish()).toBeNull();
    again.push(enc(lines.slice(0, 50).join("\n")));
    expect(() => again.finish()).toThrow(/changed between its two readings/);
  });
});
