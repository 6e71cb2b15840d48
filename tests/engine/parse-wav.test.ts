import { describe, expect, it } from "vitest";
import { CaptureParseError, parseWav, writeWav } from "../../src/engine/parse/index.ts";
import type { Capture } from "../../src/engine/types.ts";

function parseError(run: () => unknown, code: string): CaptureParseError {
  try {
    run();
  } catch (error) {
    expect(error).toBeInstanceOf(CaptureParseError);
    const e = error as CaptureParseError;
    expect(e.code, e.message).toBe(code);
    return e;
  }
  throw new Error(`expected a CaptureParseError "${code}", but parsing succeeded`);
}

const N = 1000;
const capture: Capture = {
  sampleRate: 20000,
  channels: [
    { name: "Ia", kind: "current", position: "A", unit: "A", data: Float64Array.from({ length: N }, (_, i) => 14.2 * Math.sin(i / 6.37)) },
    { name: "Ib", kind: "current", position: "B", unit: "A", data: Float64Array.from({ length: N }, (_, i) => 14.2 * Math.sin(i / 6.37 - 2.0944)) },
    { name: "Ic", kind: "current", position: "C", unit: "A", data: Float64Array.from({ length: N }, (_, i) => -0.003 * i) },
    { name: "acc_h", kind: "vibration", position: "H", unit: "g", data: Float64Array.from({ length: N }, (_, i) => 0.02 * Math.cos(i)) },
  ],
};

function peak(data: ArrayLike<number>): number {
  let p = 0;
  for (let i = 0; i < data.length; i++) p = Math.max(p, Math.abs(data[i]));
  return p;
}

/** Minimal WAV builder for hand-made files: chunks given as [id, payload]. */
function riff(chunks: [string, Uint8Array][], riffId = "RIFF"): Uint8Array {
  const size = 12 + chunks.reduce((n, [, body]) => n + 8 + body.length + (body.length & 1), 0);
  const out = new Uint8Array(size);
  const view = new DataView(out.buffer);
  const ascii = (at: number, s: string) => [...s].forEach((ch, i) => (out[at + i] = ch.charCodeAt(0)));
  ascii(0, riffId);
  view.setUint32(4, size - 8, true);
  ascii(8, "WAVE");
  let p = 12;
  for (const [id, body] of chunks) {
    ascii(p, id);
    view.setUint32(p + 4, body.length, true);
    out.set(body, p + 8);
    p += 8 + body.length + (body.length & 1);
  }
  return out;
}

function fmt(code: number, channels: number, rate: number, bits: number): Uint8Array {
  const body = new Uint8Array(16);
  const v = new DataView(body.buffer);
  v.setUint16(0, code, true);
  v.setUint16(2, channels, true);
  v.setUint32(4, rate, true);
  v.setUint32(8, (rate * channels * bits) / 8, true);
  v.setUint16(12, (channels * bits) / 8, true);
  v.setUint16(14, bits, true);
  return body;
}

function int16Data(values: number[]): Uint8Array {
  const out = new Uint8Array(values.length * 2);
  const v = new DataView(out.buffer);
  values.forEach((x, i) => v.setInt16(i * 2, x, true));
  return out;
}

const ramp = Array.from({ length: 300 }, (_, i) => (i - 150) * 200);

describe("writeWav / parseWav round trip", () => {
  for (const bits of [16, 24, 32] as const) {
    it(`${bits}-bit integer PCM: within half a quantisation step, description restored`, () => {
      const bytes = writeWav(capture, { bits, float: false });
      expect(new DataView(bytes.buffer).getUint16(20, true)).toBe(0xfffe); // 4 channels → WAVE_FORMAT_EXTENSIBLE
      const back = parseWav(bytes);
      expect(back.format).toBe("wav");
      expect(back.sampleRate).toBe(20000);
      back.channels.forEach((ch, k) => {
        const original = capture.channels[k];
        expect([ch.name, ch.kind, ch.position, ch.unit]).toEqual([original.name, original.kind, original.position, original.unit]);
        expect(ch.data.length).toBe(N);
        const step = peak(original.data) / (2 ** (bits - 1) - 1);
        for (let i = 0; i < N; i++) expect(Math.abs(ch.data[i] - original.data[i])).toBeLessThanOrEqual(step * 0.5 * (1 + 1e-9));
      });
    });
  }

  it("32-bit float: each sample is the float32 of the original", () => {
    const back = parseWav(writeWav(capture));
    back.channels.forEach((ch, k) => {
      for (let i = 0; i < N; i++) expect(ch.data[i]).toBe(Math.fround(capture.channels[k].data[i]));
    });
  });

  it("mono 16-bit uses the plain PCM header and still round-trips", () => {
    const mono: Capture = { sampleRate: 8000, channels: [capture.channels[0]] };
    const bytes = writeWav(mono, { bits: 16 });
    expect(new DataView(bytes.buffer).getUint16(20, true)).toBe(1);
    const back = parseWav(bytes);
    expect(back.channels[0].name).toBe("Ia");
    const step = peak(mono.channels[0].data) / 32767;
    for (let i = 0; i < N; i++) expect(Math.abs(back.channels[0].data[i] - mono.channels[0].data[i])).toBeLessThanOrEqual(step / 2 + 1e-12);
  });

  it("without a channel description: ch1..chN, current, A, samples normalised to [-1, 1)", () => {
    const back = parseWav(writeWav(capture, { bits: 16, describeChannels: false }));
    expect(back.channels.map((c) => [c.name, c.kind, c.unit])).toEqual([
      ["ch1", "current", "A"],
      ["ch2", "current", "A"],
      ["ch3", "current", "A"],
      ["ch4", "current", "A"],
    ]);
    for (const ch of back.channels) for (const v of ch.data) expect(v >= -1 && v < 1).toBe(true);
    expect(peak(back.channels[0].data)).toBeCloseTo(32767 / 32768, 9);
  });

  it("opts.channels override the description field by field", () => {
    const back = parseWav(writeWav(capture, { bits: 16 }), { channels: [{ name: "L1" }, { kind: "other", unit: "x" }] });
    expect(back.channels[0]).toMatchObject({ name: "L1", kind: "current", unit: "A" });
    expect(back.channels[1]).toMatchObject({ name: "Ib", kind: "other", unit: "x" });
    const scaled = parseWav(writeWav(capture, { bits: 16, describeChannels: false }), { channels: [{ scale: 100 }] });
    expect(peak(scaled.channels[0].data)).toBeCloseTo((100 * 32767) / 32768, 6);
  });

  it("refuses a fractional sample rate when writing", () => {
    expect(() => writeWav({ ...capture, sampleRate: 1000.5 })).toThrow(RangeError);
  });
});

describe("parseWav: layout", () => {
  it("skips unknown chunks, including odd-sized ones with a pad byte", () => {
    const bytes = riff([
      ["fmt ", fmt(1, 1, 4000, 16)],
      ["LIST", new Uint8Array([1, 2, 3, 4, 5])],
      ["junk", new Uint8Array(0)],
      ["data", int16Data(ramp)],
      ["id3 ", new Uint8Array([9, 9, 9])],
    ]);
    const back = parseWav(bytes);
    expect(back.sampleRate).toBe(4000);
    expect(Array.from(back.channels[0].data)).toEqual(ramp.map((x) => x / 32768));
  });

  it("reads the channel description wherever it sits, and 8 channels interleaved", () => {
    const channels = 8;
    const values = Array.from({ length: 300 * channels }, (_, i) => (i % channels) * 1000 - 4000);
    const description = new TextEncoder().encode(JSON.stringify(Array.from({ length: channels }, (_, k) => ({ name: `s${k}`, kind: "voltage", unit: "V", scale: 2 }))));
    const back = parseWav(riff([["fmt ", fmt(1, channels, 1000, 16)], ["data", int16Data(values)], ["bhch", description]]));
    expect(back.channels.length).toBe(8);
    back.channels.forEach((ch, k) => {
      expect(ch).toMatchObject({ name: `s${k}`, kind: "voltage", unit: "V" });
      expect(ch.data[7]).toBe(((k * 1000 - 4000) / 32768) * 2);
    });
  });

  it("reads 64-bit float", () => {
    const samples = Float64Array.from({ length: 300 }, (_, i) => Math.sin(i) * 1e-3);
    const back = parseWav(riff([["fmt ", fmt(3, 1, 2000, 64)], ["data", new Uint8Array(samples.buffer)]]));
    expect(Array.from(back.channels[0].data)).toEqual(Array.from(samples));
  });

  it("treats a data size of 0xFFFFFFFF as 'to the end of the file' and drops a partial last frame", () => {
    const bytes = riff([["fmt ", fmt(1, 2, 4000, 16)], ["data", int16Data([...ramp, ...ramp, 7])]]);
    const dataSizeAt = 12 + 8 + 16 + 4;
    new DataView(bytes.buffer).setUint32(dataSizeAt, 0xffffffff, true);
    const back = parseWav(bytes.subarray(0, bytes.length - (bytes.length % 2 === 0 ? 0 : 1)));
    expect(back.channels[0].data.length).toBe(300);
  });

  it("reads a WAV inside a larger buffer (non-zero byteOffset)", () => {
    const inner = writeWav(capture, { bits: 24 });
    const outer = new Uint8Array(inner.length + 3);
    outer.set(inner, 3);
    const back = parseWav(outer.subarray(3));
    expect(back.channels[3].name).toBe("acc_h");
    expect(back.channels[3].data.length).toBe(N);
  });
});

describe("parseWav: errors", () => {
  it("truncated data says how much the header claims and how much is there", () => {
    const full = writeWav(capture, { bits: 16 });
    const cut = full.subarray(0, full.length - 1000);
    const e = parseError(() => parseWav(cut), "wav-truncated");
    expect(e.message).toMatch(new RegExp(`audio data is ${N * 4 * 2} bytes, but only ${N * 4 * 2 - 1000} bytes follow it`));
    expect(e.byte).toBe(full.length - N * 8);
  });

  it("a file that ends before the data chunk, or is tiny", () => {
    parseError(() => parseWav(riff([["fmt ", fmt(1, 1, 4000, 16)]])), "wav-truncated");
    parseError(() => parseWav(new TextEncoder().encode("RIFF")), "wav-truncated");
    parseError(() => parseWav(new Uint8Array(0)), "empty");
  });

  it("unsupported encodings name the format code", () => {
    const eight = parseError(() => parseWav(riff([["fmt ", fmt(1, 1, 8000, 8)], ["data", new Uint8Array(400)]])), "unsupported-encoding");
    expect(eight.message).toMatch(/8-bit integer PCM/);
    const alaw = parseError(() => parseWav(riff([["fmt ", fmt(6, 1, 8000, 8)], ["data", new Uint8Array(400)]])), "unsupported-encoding");
    expect(alaw.message).toMatch(/A-law \(format code 6, 0x0006\)/);
    const mulaw = parseError(() => parseWav(riff([["fmt ", fmt(7, 1, 8000, 8)], ["data", new Uint8Array(400)]])), "unsupported-encoding");
    expect(mulaw.message).toMatch(/µ-law \(format code 7/);
    const adpcm = parseError(() => parseWav(riff([["fmt ", fmt(2, 1, 8000, 4)], ["data", new Uint8Array(400)]])), "unsupported-encoding");
    expect(adpcm.message).toMatch(/ADPCM \(format code 2/);
    const float16 = parseError(() => parseWav(riff([["fmt ", fmt(3, 1, 8000, 16)], ["data", new Uint8Array(800)]])), "unsupported-encoding");
    expect(float16.message).toMatch(/16-bit float/);
    parseError(() => parseWav(riff([["fmt ", fmt(1, 1, 8000, 16)]], "RIFX")), "unsupported-encoding");
  });

  it("an extensible header with an unsupported sub-format", () => {
    const bytes = writeWav(capture, { bits: 24 });
    const view = new DataView(bytes.buffer);
    expect(view.getUint16(20, true)).toBe(0xfffe);
    view.setUint16(20 + 24, 6, true); // sub-format code → A-law
    const e = parseError(() => parseWav(bytes), "unsupported-encoding");
    expect(e.message).toMatch(/A-law/);
  });

  it("bad headers: not RIFF/WAVE, no fmt chunk, zero channels, broken description", () => {
    parseError(() => parseWav(new TextEncoder().encode("t,Ia\n0,1\n0.1,2\n")), "wav-bad-header");
    parseError(() => parseWav(riff([["data", int16Data(ramp)]])), "wav-bad-header");
    parseError(() => parseWav(riff([["fmt ", fmt(1, 0, 8000, 16)], ["data", int16Data(ramp)]])), "wav-bad-header");
    const json = parseError(() => parseWav(riff([["fmt ", fmt(1, 1, 8000, 16)], ["bhch", new TextEncoder().encode("[{nope")], ["data", int16Data(ramp)]])), "wav-bad-header");
    expect(json.message).toBe('The channel description in the WAV file (chunk "bhch" at byte 36) is not valid JSON.');
    expect(json.byte).toBe(36);
    const count = parseError(() => parseWav(riff([["fmt ", fmt(1, 1, 8000, 16)], ["bhch", new TextEncoder().encode("[{},{}]")], ["data", int16Data(ramp)]])), "wav-bad-header");
    expect(count.message).toMatch(/lists 2 channels but the audio has 1/);
  });

  it("NaN in float samples", () => {
    const samples = new Float32Array(300);
    samples[123] = NaN;
    const e = parseError(() => parseWav(riff([["fmt ", fmt(3, 1, 2000, 32)], ["data", new Uint8Array(samples.buffer)]])), "non-finite");
    expect(e.byte).toBe(44 + 123 * 4);
    expect(e.message).toMatch(/^Sample 124 of channel 1 \(byte 536\) is NaN/);
  });

  it("too few samples", () => {
    const e = parseError(() => parseWav(riff([["fmt ", fmt(1, 1, 8000, 16)], ["data", int16Data([1, 2, 3])]])), "too-few-samples");
    expect(e.message).toMatch(/only 3 samples per channel/);
    expect(parseWav(riff([["fmt ", fmt(1, 1, 8000, 16)], ["data", int16Data([1, 2, 3])]]), { minSamples: 3 }).channels[0].data.length).toBe(3);
  });
});
