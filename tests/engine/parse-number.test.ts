// The byte-level decimal scanner against the reference: ECMAScript Number() (reference implementation in the
// runtime). Every comparison uses Object.is, so -0 and the last bit of the mantissa count.

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { newScanResult, parseDecimal, scanNumber } from "../../src/engine/parse/number-scan.ts";

const REFERENCE = "ECMAScript Number() (reference implementation in the runtime)";

const digitString = (min: number, max: number) =>
  fc.array(fc.integer({ min: 0, max: 9 }), { minLength: min, maxLength: max }).map((d) => d.join(""));

/** Decimal literals in the scanner's grammar: [+-]? (int [. frac?] | . frac) ([eE][+-]?exp)? */
const decimalLiteral = fc
  .record({
    sign: fc.constantFrom("", "-", "+"),
    int: fc.oneof(digitString(0, 3), digitString(0, 25), fc.constantFrom("0", "00", "9007199254740993", "18446744073709551616")),
    dot: fc.boolean(),
    frac: fc.oneof(digitString(0, 3), digitString(0, 30), fc.constantFrom("000000000000000000001", "5", "4999999999999999999")),
    exp: fc.option(
      fc.record({
        marker: fc.constantFrom("e", "E"),
        sign: fc.constantFrom("", "-", "+"),
        value: fc.oneof(fc.integer({ min: 0, max: 30 }), fc.integer({ min: 0, max: 400 }), fc.integer({ min: 280, max: 345 }), fc.integer({ min: 0, max: 100000 })),
        pad: fc.constantFrom("", "0", "000"),
      }),
      { nil: undefined },
    ),
  })
  .filter((r) => r.int.length + (r.dot ? r.frac.length : 0) > 0)
  .map((r) => {
    const mantissa = r.dot ? `${r.int}.${r.frac}` : r.int;
    const exp = r.exp ? `${r.exp.marker}${r.exp.sign}${r.exp.pad}${r.exp.value}` : "";
    return `${r.sign}${mantissa}${exp}`;
  });

const finiteDouble = fc.double({ noNaN: true, noDefaultInfinity: true });

function expectSame(text: string): void {
  const got = parseDecimal(text);
  const want = Number(text);
  if (!Object.is(got, want)) throw new Error(`${JSON.stringify(text)}: scanner ${got}, ${REFERENCE} ${want}`);
}

describe(`decimal scanner matches ${REFERENCE}`, () => {
  it("agrees on hand-picked edge cases", () => {
    const cases = [
      "0", "-0", "+0", "-0.0", "0.", ".0", "-.0e5", "5.", ".5", "+.5", "-.5e-3", "00012", "0.000100", "12.3456", "-9.1355",
      "1e5", "1E+02", "1e-3", "2.5e-0", "1e22", "1e23", "9e22", "1.5e37", "123456789012345e22",
      "9007199254740991", "9007199254740992", "9007199254740993", "9007199254740994.5", "123456789012345678901234567890",
      "0.1", "0.2", "0.30000000000000004", "1.7976931348623157e308", "1.7976931348623158e308", "1.7976931348623159e308",
      "1e309", "-1e400", "4.9e-324", "5e-324", "2.4703282292062327e-324", "2.4703282292062328e-324", "1e-400",
      "2.2250738585072011e-308", "2.2250738585072014e-308", "0e99999999999", "1e-99999999999",
      "3.141592653589793238462643383279", "1000000000000000000000000", "0.000000000000000000000000000001",
      "8.98846567431158e307", "1.000000000000000111022302462515654042363166809082031250",
    ];
    for (const text of cases) expectSame(text);
  });

  it("agrees on generated decimal strings (signs, dots, exponents, long mantissas)", () => {
    fc.assert(fc.property(decimalLiteral, (text) => expectSame(text)), { numRuns: 20000 });
  });

  it("agrees on String(double) of arbitrary doubles", () => {
    fc.assert(fc.property(finiteDouble, (x) => expectSame(String(x))), { numRuns: 20000 });
  });

  it("agrees on toExponential / toFixed / toPrecision renderings of arbitrary doubles", () => {
    fc.assert(
      fc.property(finiteDouble, fc.integer({ min: 0, max: 25 }), fc.integer({ min: 1, max: 25 }), (x, decimals, precision) => {
        expectSame(x.toExponential(decimals));
        expectSame(x.toFixed(decimals));
        expectSame(x.toPrecision(precision));
      }),
      { numRuns: 10000 },
    );
  });

  it("agrees on doubles in the ranges a capture holds (small magnitudes, few decimals)", () => {
    fc.assert(
      fc.property(fc.double({ min: -1000, max: 1000, noNaN: true }), fc.integer({ min: 0, max: 9 }), (x, decimals) => {
        expectSame(x.toFixed(decimals));
        expectSame(String(Number(x.toFixed(decimals))));
      }),
      { numRuns: 10000 },
    );
  });

  it("reads decimal commas the same way when asked to", () => {
    fc.assert(
      fc.property(decimalLiteral, (text) => {
        expect(Object.is(parseDecimal(text.replace(".", ","), ","), Number(text))).toBe(true);
      }),
      { numRuns: 5000 },
    );
  });
});

describe("scanner boundaries", () => {
  const scan = (text: string) => {
    const bytes = new TextEncoder().encode(text);
    const out = newScanResult();
    const status = scanNumber(bytes, 0, bytes.length, 46, out);
    return { status, value: out.value, end: out.end, lastDigitExp: out.lastDigitExp };
  };

  it("stops at the first byte that cannot continue the number", () => {
    expect(scan("12.5,3")).toMatchObject({ status: 0, value: 12.5, end: 4 });
    expect(scan("-3.25\n")).toMatchObject({ status: 0, value: -3.25, end: 5 });
    expect(scan("7x")).toMatchObject({ status: 0, value: 7, end: 1 });
  });

  it("leaves an exponent marker without digits unconsumed, as Number() rejects it", () => {
    expect(scan("1e")).toMatchObject({ status: 0, value: 1, end: 1 });
    expect(scan("1e+")).toMatchObject({ status: 0, value: 1, end: 1 });
    expect(Number.isNaN(parseDecimal("1e"))).toBe(true);
    expect(Number.isNaN(Number("1e"))).toBe(true);
  });

  it("reports text that is not a number, and NaN / Infinity words separately", () => {
    for (const text of ["", "-", "+", ".", "-.", "e5", "abc", ",5", " 5"]) expect(scan(text).status).toBe(1);
    for (const text of ["NaN", "nan", "-nan", "Infinity", "-Infinity", "+inf", "INF"]) expect(scan(text).status).toBe(2);
  });

  it("does not accept what Number() accepts but a capture cell must not contain", () => {
    for (const text of ["0x10", "0b1", "1_000", " 5", "5 "]) expect(Number.isNaN(parseDecimal(text))).toBe(true);
  });

  it("reports the decimal exponent of the last written digit (the printing resolution)", () => {
    expect(scan("0.000100").lastDigitExp).toBe(-6);
    expect(scan("1500").lastDigitExp).toBe(0);
    expect(scan("1.5e-3").lastDigitExp).toBe(-4);
    expect(scan("12").lastDigitExp).toBe(0);
  });
});
