import { describe, expect, it } from "vitest";
import { CaptureParseError, parseCapture, sniffFormat, writeCsv, writeWav } from "../../src/engine/parse/index.ts";
import type { Capture } from "../../src/engine/types.ts";

const enc = (text: string) => new TextEncoder().encode(text);

const capture: Capture = {
  sampleRate: 10000,
  channels: [{ name: "Ia", kind: "current", position: "A", unit: "A", data: Float64Array.from({ length: 512 }, (_, i) => Math.sin(i / 10)) }],
};

function parseError(run: () => unknown, code: string): CaptureParseError {
  try {
    run();
  } catch (error) {
    expect(error).toBeInstanceOf(CaptureParseError);
    expect((error as CaptureParseError).code).toBe(code);
    return error as CaptureParseError;
  }
  throw new Error(`expected a CaptureParseError "${code}"`);
}

describe("sniffFormat", () => {
  it("tells WAV from its RIFF/WAVE magic and CSV from printable text", () => {
    expect(sniffFormat(writeWav(capture))).toBe("wav");
    expect(sniffFormat(enc(writeCsv(capture)))).toBe("csv");
    expect(sniffFormat(enc("\ufeffZeit [s];Strom µA\r\n0;1,5\r\n"))).toBe("csv");
    expect(sniffFormat(enc("# sample_rate=1000\nIa\n1\n"))).toBe("csv");
  });

  it("returns null for binary and for text without digits or separators", () => {
    expect(sniffFormat(new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]))).toBeNull();
    expect(sniffFormat(new Uint8Array([0, 1, 2, 3, 4, 5]))).toBeNull();
    expect(sniffFormat(enc("hello world"))).toBeNull();
    expect(sniffFormat(new Uint8Array(0))).toBeNull();
    expect(sniffFormat(new Uint8Array([0x31, 0x2c, 0xff, 0xfe, 0x32]))).toBeNull(); // 40 % stray high bytes
    expect(sniffFormat(new Uint8Array([0x31, 0x2c, 0x1b, 0x32]))).toBeNull(); // control byte
  });

  it("accepts a legacy code-page byte in a header (°, µ in Windows-1252)", () => {
    const header = [...enc("Temp "), 0xb0, ...enc("C,I [A]\n")];
    const rows = enc(Array.from({ length: 40 }, (_, i) => `${i},${i / 2}`).join("\n"));
    expect(sniffFormat(new Uint8Array([...header, ...rows]))).toBe("csv");
  });

  it("ignores the file name", () => {
    expect(parseCapture(writeWav(capture), { fileName: "capture.csv" }).format).toBe("wav");
    expect(parseCapture(enc(writeCsv(capture)), { fileName: "capture.wav" }).format).toBe("csv");
  });
});

describe("parseCapture", () => {
  it("dispatches and passes options through", () => {
    const wav = parseCapture(writeWav(capture), { channels: [{ name: "Phase A" }] });
    expect(wav.channels[0].name).toBe("Phase A");
    const csv = parseCapture(enc(writeCsv(capture, { timeColumn: false })), { sampleRate: 5000 });
    expect(csv.sampleRate).toBe(5000);
    expect(Array.from(csv.channels[0].data)).toEqual(Array.from(capture.channels[0].data));
    parseError(() => parseCapture(enc(writeCsv(capture)), { minSamples: 1000 }), "too-few-samples");
  });

  it("says empty for an empty or blank file", () => {
    expect(parseError(() => parseCapture(new Uint8Array(0), { fileName: "motor7.csv" }), "empty").message).toBe('"motor7.csv" is empty.');
    parseError(() => parseCapture(enc("\n\r\n  \t")), "empty");
  });

  it("says unknown-format for other files, with a hint for common ones", () => {
    const xlsx = parseError(() => parseCapture(new Uint8Array([0x50, 0x4b, 3, 4, 0, 0, 0xff, 0xfe]), { fileName: "log.xlsx" }), "unknown-format");
    expect(xlsx.message).toBe('"log.xlsx" is neither a CSV table of numbers nor a WAV recording. It looks like a ZIP archive or an Excel workbook (.xlsx); save the sheet as CSV.');
    const other = parseError(() => parseCapture(new Uint8Array([0, 1, 2, 250, 251])), "unknown-format");
    expect(other.message).toBe("The file is neither a CSV table of numbers nor a WAV recording. Upload a .csv or .wav capture.");
  });
});
