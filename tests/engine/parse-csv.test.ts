import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { CaptureParseError, classifyColumn, parseCsv, writeCsv } from "../../src/engine/parse/index.ts";
import type { Capture } from "../../src/engine/types.ts";

const enc = (text: string) => new TextEncoder().encode(text);

/** Catches the parse error, checks its code, and returns it for further checks. */
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

/** A CSV with a time column at `rate` Hz and three current columns, `rows` rows. */
function currentsCsv(rows: number, rate = 10000, sep = ",", eol = "\n"): string {
  const lines = [["t", "Ia", "Ib", "Ic"].join(sep)];
  for (let i = 0; i < rows; i++) {
    const t = (i / rate).toFixed(6);
    lines.push([t, (10 * Math.sin(i / 7)).toFixed(4), (i % 13) - 6, (-i / 1000).toFixed(3)].join(sep));
  }
  return lines.join(eol) + eol;
}

describe("parseCsv: layout", () => {
  it("reads a time column and derives the sample rate", () => {
    const capture = parseCsv(enc(currentsCsv(300)));
    expect(capture.format).toBe("csv");
    expect(capture.sampleRate).toBe(10000);
    expect(capture.channels.map((c) => [c.name, c.kind, c.position, c.unit])).toEqual([
      ["Ia", "current", "A", "A"],
      ["Ib", "current", "B", "A"],
      ["Ic", "current", "C", "A"],
    ]);
    expect(capture.channels[0].data).toBeInstanceOf(Float64Array);
    expect(capture.channels[0].data.length).toBe(300);
    expect(capture.channels[0].data[5]).toBe(Number((10 * Math.sin(5 / 7)).toFixed(4)));
    expect(capture.channels[1].data[0]).toBe(-6);
    expect(capture.channels[2].data[299]).toBe(-0.299);
  });

  it("takes the separator from the header: comma, semicolon or tab", () => {
    const reference = parseCsv(enc(currentsCsv(300)));
    for (const sep of [";", "\t"]) {
      const capture = parseCsv(enc(currentsCsv(300, 10000, sep)));
      expect(capture.sampleRate).toBe(10000);
      expect(capture.channels.map((c) => Array.from(c.data))).toEqual(reference.channels.map((c) => Array.from(c.data)));
    }
  });

  it("accepts a UTF-8 BOM, CRLF line ends, quoted header names and trailing blank lines", () => {
    const text = "\ufeff" + currentsCsv(300, 10000, ",", "\r\n").replace("t,Ia,Ib,Ic", '"Time [s]","Ia","Ib","Ic"') + "\r\n\r\n  \r\n";
    const capture = parseCsv(enc(text));
    expect(capture.sampleRate).toBe(10000);
    expect(capture.channels.map((c) => c.name)).toEqual(["Ia", "Ib", "Ic"]);
    expect(capture.channels[0].data.length).toBe(300);
  });

  it("accepts a file without a final line break", () => {
    const capture = parseCsv(enc(currentsCsv(300).trimEnd()));
    expect(capture.channels[2].data.length).toBe(300);
    expect(capture.channels[2].data[299]).toBe(-0.299);
  });

  it("reads the sample rate from a comment line: # sample_rate=, # fs= Hz / kHz, # dt=", () => {
    const body = "Ia,Ib\n" + Array.from({ length: 300 }, (_, i) => `${i},${-i}`).join("\n");
    expect(parseCsv(enc(`# sample_rate=10000\n${body}`)).sampleRate).toBe(10000);
    expect(parseCsv(enc(`# motor 4\n# fs=5120 Hz\n${body}`)).sampleRate).toBe(5120);
    expect(parseCsv(enc(`# Sampling rate: 25.6 kHz\n${body}`)).sampleRate).toBe(25600);
    expect(parseCsv(enc(`% dt = 100 us\n${body}`)).sampleRate).toBeCloseTo(10000, 6);
    const capture = parseCsv(enc(`# sample_rate=10000\n${body}`));
    expect(capture.channels.map((c) => c.name)).toEqual(["Ia", "Ib"]);
    expect(capture.channels[1].data[299]).toBe(-299);
  });

  it("lets opts.sampleRate override the file, dropping the time column", () => {
    const capture = parseCsv(enc(currentsCsv(300)), { sampleRate: 8000 });
    expect(capture.sampleRate).toBe(8000);
    expect(capture.channels.length).toBe(3);
  });

  it("needs a sample rate and says how to give one", () => {
    const body = "Ia,Ib\n" + Array.from({ length: 300 }, (_, i) => `${i},${-i}`).join("\n");
    const e = parseError(() => parseCsv(enc(body)), "no-sample-rate");
    expect(e.message).toMatch(/sample_rate=/);
    expect(e.message).toMatch(/time/);
  });

  it("rejects a sample-rate line that gives no usable rate, naming the line", () => {
    const e = parseError(() => parseCsv(enc(`# note\n# fs=0\nIa\n1\n`)), "no-sample-rate");
    expect(e.line).toBe(2);
    expect(e.message).toMatch(/^Line 2:/);
  });

  it("derives the rate from time in milliseconds and from rates that are not whole", () => {
    const ms = ["time_ms,Ia", ...Array.from({ length: 300 }, (_, i) => `${(i * 0.2).toFixed(1)},${i}`)].join("\n");
    expect(parseCsv(enc(ms)).sampleRate).toBe(5000);
    const rate = 3000;
    const odd = ["Time [s],vib_h [mm/s]", ...Array.from({ length: 3000 }, (_, i) => `${(i / rate).toFixed(6)},${i % 5}`)].join("\n");
    const capture = parseCsv(enc(odd));
    expect(capture.sampleRate).toBe(3000);
    expect(capture.channels[0]).toMatchObject({ name: "vib_h", kind: "vibration", position: "H", unit: "mm/s" });
  });

  it("accepts decimal commas with semicolon separators", () => {
    const text = ["t;Ia;Ib", ...Array.from({ length: 300 }, (_, i) => `${(i / 1000).toFixed(3).replace(".", ",")};${(i / 8).toString().replace(".", ",")};-${i},5`)].join("\n");
    const capture = parseCsv(enc(text));
    expect(capture.sampleRate).toBe(1000);
    expect(capture.channels[0].data[3]).toBe(0.375);
    expect(capture.channels[1].data[2]).toBe(-2.5);
  });

  it("reads a units row under the header", () => {
    const text = ["t;Ia;acc", "s;A;g", ...Array.from({ length: 300 }, (_, i) => `${i / 1000};${i};${-i}`)].join("\n");
    const capture = parseCsv(enc(text));
    expect(capture.channels.map((c) => [c.name, c.kind, c.unit])).toEqual([
      ["Ia", "current", "A"],
      ["acc", "vibration", "g"],
    ]);
  });

  it("skips blank and comment lines between rows, and counts them in line numbers", () => {
    const rows = Array.from({ length: 300 }, (_, i) => `${i / 1000},${i}`);
    rows.splice(100, 0, "", "# pause marker");
    const capture = parseCsv(enc(["t,Ia", ...rows].join("\n")));
    expect(capture.channels[0].data.length).toBe(300);
    expect(capture.channels[0].data[100]).toBe(100);
    rows[250] = "0.25,oops"; // row index 248 after the two inserted lines → file line 1 + 250 + 1
    const e = parseError(() => parseCsv(enc(["t,Ia", ...rows].join("\n"))), "non-numeric-cell");
    expect(e.line).toBe(252);
    expect(e.message).toBe('Line 252, column 2 (Ia): "oops" is not a number.');
  });

  it("accepts quoted numbers, spaces around cells and one trailing separator", () => {
    const text = ["t,Ia,", ...Array.from({ length: 300 }, (_, i) => ` "${i / 1000}" , ${i} ,`)].join("\n");
    const capture = parseCsv(enc(text));
    expect(capture.sampleRate).toBe(1000);
    expect(capture.channels.length).toBe(1);
    expect(capture.channels[0].data[7]).toBe(7);
  });

  it("treats an all-numeric first line as data without a header", () => {
    const text = Array.from({ length: 300 }, (_, i) => `${i},${2 * i}`).join("\n");
    const capture = parseCsv(enc(text), { sampleRate: 1000 });
    expect(capture.channels.map((c) => [c.name, c.kind])).toEqual([
      ["col1", "other"],
      ["col2", "other"],
    ]);
    expect(capture.channels[1].data[0]).toBe(0);
    expect(capture.channels[1].data[299]).toBe(598);
  });

  it("grows its arrays past the first estimate (short first row, long later rows)", () => {
    const rows = [`0,1`, ...Array.from({ length: 5000 }, (_, i) => `${(i + 1) / 1000},${(i * 1.000123456789).toFixed(10)}`)];
    const capture = parseCsv(enc(["t,Ia", ...rows].join("\n")));
    expect(capture.channels[0].data.length).toBe(5001);
    expect(capture.channels[0].data[5000]).toBe(Number((4999 * 1.000123456789).toFixed(10)));
    expect(capture.channels[0].data.buffer.byteLength).toBe(5001 * 8);
  });

  it("reads every cell exactly as ECMAScript Number() reads it (both the inline and the full scanner)", () => {
    const cell = fc.oneof(
      fc.double({ min: -1e6, max: 1e6, noNaN: true }).map((x) => String(x)),
      fc.tuple(fc.double({ min: -1e3, max: 1e3, noNaN: true }), fc.integer({ min: 0, max: 12 })).map(([x, d]) => x.toFixed(d)),
      fc.double({ noNaN: true, noDefaultInfinity: true }).map((x) => x.toExponential(8)),
      fc.constantFrom("-0", ".5", "5.", "+3", "1e-3", "-0.000100", "123456789012345678"),
    );
    fc.assert(
      fc.property(fc.array(fc.tuple(cell, cell), { minLength: 1, maxLength: 40 }), (rows) => {
        const text = ["a,b", ...rows.map(([x, y]) => `${x},${y}`)].join("\n");
        const capture = parseCsv(enc(text), { sampleRate: 1, minSamples: 1 });
        rows.forEach(([x, y], i) => {
          expect(Object.is(capture.channels[0].data[i], Number(x))).toBe(true);
          expect(Object.is(capture.channels[1].data[i], Number(y))).toBe(true);
        });
      }),
      { numRuns: 500 },
    );
  });
});

describe("parseCsv: column names", () => {
  const cases: [string, string, string | undefined, string][] = [
    ["Ia", "current", "A", "A"],
    ["Ib", "current", "B", "A"],
    ["IC", "current", "C", "A"],
    ["I1", "current", "A", "A"],
    ["I3", "current", "C", "A"],
    ["IA [A]", "current", "A", "A"],
    ["current_A", "current", "A", "A"],
    ["Current (mA)", "current", undefined, "mA"],
    ["acc_x", "vibration", "x", "m/s2"],
    ["vib_h", "vibration", "H", "m/s2"],
    ["accel (g)", "vibration", undefined, "g"],
    ["a_h [m/s2]", "vibration", "H", "m/s2"],
    ["a_v [m/s²]", "vibration", "V", "m/s2"],
    ["vel_h [mm/s]", "vibration", "H", "mm/s"],
    ["vibration (mm/s)", "vibration", undefined, "mm/s"],
    ["Va", "voltage", "A", "V"],
    ["U1", "voltage", "A", "V"],
    ["Vab", "voltage", "AB", "V"],
    ["voltage", "voltage", undefined, "V"],
    ["temperature", "other", undefined, ""],
    ["phase 1 [A]", "current", undefined, "A"],
    ["speed [rpm]", "other", undefined, "rpm"],
  ];
  it.each(cases)("%s → %s %s %s", (header, kind, position, unit) => {
    const meaning = classifyColumn(header);
    expect(meaning.kind).toBe(kind);
    expect(meaning.position).toBe(position);
    expect(meaning.unit).toBe(unit);
  });

  it("reads a lone current_A as amperes, but as phase A beside current_B and current_C", () => {
    const rows = Array.from({ length: 300 }, (_, i) => `${i}`);
    const alone = parseCsv(enc(["current_A", ...rows].join("\n")), { sampleRate: 1000 });
    expect(alone.channels[0].position).toBeUndefined();
    const three = parseCsv(enc(["current_A,current_B,current_C", ...rows.map((r) => `${r},${r},${r}`)].join("\n")), { sampleRate: 1000 });
    expect(three.channels.map((c) => c.position)).toEqual(["A", "B", "C"]);
  });
});

describe("parseCsv: errors name the problem and where it is", () => {
  it("empty file, blank file, comments only", () => {
    expect(parseError(() => parseCsv(new Uint8Array(0)), "empty").message).toBe("The file is empty.");
    parseError(() => parseCsv(enc("\ufeff\r\n \n")), "empty");
    parseError(() => parseCsv(enc("# sample_rate=1000\n")), "empty");
  });

  it("header without data", () => {
    const e = parseError(() => parseCsv(enc("t,Ia,Ib\n\n")), "no-numeric-data");
    expect(e.line).toBe(1);
    expect(e.message).toMatch(/header \(line 1\) but no rows of numbers/);
  });

  it("a cell that is not a number", () => {
    const rows = currentsCsv(2000).split("\n");
    rows[1233] = rows[1233].replace(/,[^,]*$/, ",12.5x");
    const e = parseError(() => parseCsv(enc(rows.join("\n"))), "non-numeric-cell");
    expect(e).toMatchObject({ line: 1234, column: 4 });
    expect(e.message).toBe('Line 1234, column 4 (Ic): "12.5x" is not a number.');
    expect(e.byte).toBe(rows.slice(0, 1233).join("\n").length + 1 + rows[1233].lastIndexOf(",") + 1);
  });

  it("a decimal comma in a file with decimal points gets a hint", () => {
    const text = ["t;Ia", ...Array.from({ length: 300 }, (_, i) => `${i / 1000};${i === 200 ? "12,5" : i / 4}`)].join("\n");
    const e = parseError(() => parseCsv(enc(text)), "non-numeric-cell");
    expect(e).toMatchObject({ line: 202, column: 2 });
    expect(e.message).toBe('Line 202, column 2 (Ia): "12,5" is not a number. This file uses a decimal point: write 12.5.');
  });

  it("units in cells get a hint", () => {
    const e = parseError(() => parseCsv(enc("t,Ia\n0,1\n0.001,2 A\n")), "non-numeric-cell");
    expect(e.message).toMatch(/^Line 3, column 2 \(Ia\): "2 A" is not a number\. Put units in the header/);
  });

  it("an empty cell", () => {
    const e = parseError(() => parseCsv(enc("t,Ia,Ib\n0,1,2\n0.001,,2\n")), "non-numeric-cell");
    expect(e).toMatchObject({ line: 3, column: 2 });
    expect(e.message).toBe("Line 3, column 2 (Ia) is empty. Every row needs a number in every column.");
  });

  it("NaN, Infinity and overflowing values", () => {
    for (const bad of ["NaN", "-Infinity", "inf", "nan"]) {
      const e = parseError(() => parseCsv(enc(`t,Ia\n0,1\n0.001,${bad}\n`)), "non-finite");
      expect(e).toMatchObject({ line: 3, column: 2 });
      expect(e.message).toBe(`Line 3, column 2 (Ia): "${bad}" is not a finite number. The capture must be complete; re-export it without gaps.`);
    }
    const e = parseError(() => parseCsv(enc("t,Ia\n0,1\n0.001,1e999\n")), "non-finite");
    expect(e.message).toBe('Line 3, column 2 (Ia): "1e999" is too large to be a sample value.');
  });

  it("rows with too few or too many values", () => {
    const few = parseError(() => parseCsv(enc("t,Ia,Ib,Ic\n0,1,2,3\n0.001,1,2\n")), "ragged-row");
    expect(few.line).toBe(3);
    expect(few.message).toBe("Line 3 has 3 values but the header (line 1) names 4 columns. Fill in the missing values or remove the row.");
    const many = parseError(() => parseCsv(enc("t,Ia\n0,1\n0.001,1,2,3\n")), "ragged-row");
    expect(many.line).toBe(3);
    expect(many.message).toMatch(/^Line 3 has 4 values but the header \(line 1\) names 2 columns\./);
    const crlf = parseError(() => parseCsv(enc("t;Ia;Ib\r\n0;1;2\r\n0,001;1\r\n")), "ragged-row");
    expect(crlf.line).toBe(3);
  });

  it("time that goes backwards", () => {
    const rows = currentsCsv(400).split("\n");
    rows[300] = rows[300].replace(/^[^,]*/, "0.0100");
    const e = parseError(() => parseCsv(enc(rows.join("\n"))), "time-decreasing");
    expect(e).toMatchObject({ line: 301, column: 1 });
    expect(e.message).toMatch(/^Line 301: time goes backwards \(0\.01 s after 0\.0298 s on line 300\)/);
  });

  it("time with a gap, a repeated time and a drifting rate", () => {
    const gap = currentsCsv(400).split("\n");
    gap.splice(201, 1); // drop one sample
    const e = parseError(() => parseCsv(enc(gap.join("\n"))), "time-not-uniform");
    expect(e.line).toBe(202);
    expect(e.message).toMatch(/^Line 202: the time step is 0\.0002 s but the file's average step is 0\.000100\d* s/);

    const repeated = currentsCsv(400).split("\n");
    repeated[50] = repeated[50].replace(/^[^,]*/, repeated[49].split(",")[0]);
    const r = parseError(() => parseCsv(enc(repeated.join("\n"))), "time-not-uniform");
    expect(r.line).toBe(51);
    expect(r.message).toMatch(/repeats the previous line's time/);
    expect(r.message).toMatch(/sample_rate=/);

    // Steps are 0.09 % short, then 0.09 % long: each step is close to the mean, but the times drift away from even spacing.
    let t = 0;
    const drifting = ["t,Ia"];
    for (let i = 0; i < 2000; i++) {
      drifting.push(`${t},${i}`);
      t += 1e-4 * (i < 1000 ? 1 - 9e-4 : 1 + 9e-4);
    }
    const d = parseError(() => parseCsv(enc(drifting.join("\n"))), "time-not-uniform");
    expect(d.message).toMatch(/drifted from the even spacing/);
  });

  it("tolerates time rounded to its printed digits", () => {
    // 3 kHz printed to 6 decimals: steps alternate 0.000333 / 0.000334.
    const text = ["time_s,Ia", ...Array.from({ length: 1000 }, (_, i) => `${(i / 3000).toFixed(6)},${i}`)].join("\n");
    expect(parseCsv(enc(text)).sampleRate).toBe(3000);
  });

  it("too few samples", () => {
    const e = parseError(() => parseCsv(enc(currentsCsv(100))), "too-few-samples");
    expect(e.message).toBe("The capture has only 100 samples per channel (0.01 s at 10000 Hz); at least 256 are needed. Record a longer capture.");
    expect(parseCsv(enc(currentsCsv(100)), { minSamples: 100 }).channels[0].data.length).toBe(100);
  });
});

describe("writeCsv / parseCsv round trip", () => {
  const capture: Capture = {
    sampleRate: 5000,
    channels: [
      { name: "Ia", kind: "current", position: "A", unit: "A", data: Float64Array.from({ length: 600 }, (_, i) => Math.sin(i / 3) * 12.345678901234) },
      { name: "Ib", kind: "current", position: "B", unit: "A", data: Float64Array.from({ length: 600 }, (_, i) => -1e-7 * i) },
      { name: "acc_h", kind: "vibration", position: "H", unit: "g", data: Float64Array.from({ length: 600 }, (_, i) => (i % 7) * 1e20) },
      { name: "ch4", kind: "current", unit: "A", data: Float64Array.from({ length: 600 }, (_, i) => i) },
    ],
  };

  const strip = (c: Capture) => c.channels.map(({ name, kind, position, unit, data }) => ({ name, kind, position, unit, data: Array.from(data) }));

  it("is exact with the default (shortest round-trip) digits, with and without a time column", () => {
    for (const timeColumn of [true, false]) {
      const text = writeCsv(capture, { timeColumn });
      const back = parseCsv(enc(text));
      expect(back.sampleRate).toBe(5000);
      expect(strip(back)).toEqual(strip(capture));
    }
  });

  it("keeps the requested significant digits", () => {
    const back = parseCsv(enc(writeCsv(capture, { digits: 4 })));
    back.channels[0].data.forEach((v, i) => expect(v).toBe(Number(capture.channels[0].data[i].toPrecision(4))));
  });

  it("works with semicolon and tab separators", () => {
    for (const separator of [";", "\t"] as const) {
      expect(strip(parseCsv(enc(writeCsv(capture, { separator }))))).toEqual(strip(capture));
    }
  });
});

describe("parseCsv: limits", () => {
  it("refuses a header with thousands of columns", () => {
    const e = parseError(() => parseCsv(enc(`${Array.from({ length: 5000 }, (_, i) => `c${i}`).join(",")}\n`)), "unknown-format");
    expect(e.message).toBe("Line 1 has 5000 columns; a capture table can have at most 4096. This does not look like a waveform capture.");
  });
});
