// Hand-rolled decimal scanner working directly on bytes, for the CSV hot path.
//
// It yields exactly the double that ECMAScript Number() gives for the same text. Most cells of a capture have
// few significant digits, so the mantissa is accumulated as an integer and, when it has at most 16 digits
// (and stays below 2^53) and the decimal exponent is within ±22, the value is one correctly rounded multiply or
// divide by an exactly representable power of ten (Clinger's fast path). Anything else (long mantissas, tiny or
// huge exponents) decodes just that cell and hands it to Number(), which is correctly rounded by the spec.

/** Scan result statuses. */
export const SCAN_OK = 0;
/** No number starts here. */
export const SCAN_INVALID = 1;
/** The text is "NaN", "Infinity" or "inf" (any case, optional sign). */
export const SCAN_NON_FINITE_TEXT = 2;

export interface ScanResult {
  value: number;
  /** Byte offset just past the number. */
  end: number;
  /** Decimal exponent of the last written digit: "0.000100" → -6, "1500" → 0, "1.5e-3" → -4. */
  lastDigitExp: number;
}

export function newScanResult(): ScanResult {
  return { value: 0, end: 0, lastDigitExp: 0 };
}

const POW10 = [
  1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19,
  1e20, 1e21, 1e22,
];
const MAX_FAST_DIGITS = 16;
const MAX_SAFE = 9007199254740991; // 2^53 - 1
const DOT = 46;
const MINUS = 45;
const PLUS = 43;

/**
 * Scans a decimal number at `pos` (no leading blanks): `[+-]? (digits [mark digits?] | mark digits) ([eE][+-]?digits)?`.
 * `decimalMark` is the byte of the decimal separator ('.' = 46, or ',' = 44 for decimal-comma files).
 * An exponent marker without digits ("1e") is not consumed, like Number() would reject it: the caller then sees
 * the "e" as trailing garbage. On SCAN_OK, `out` holds the value and the end offset.
 */
export function scanNumber(bytes: Uint8Array, pos: number, end: number, decimalMark: number, out: ScanResult): number {
  const start = pos;
  let p = pos;
  let c = p < end ? bytes[p] : 0;
  let negative = false;
  if (c === MINUS || c === PLUS) {
    negative = c === MINUS;
    p++;
    c = p < end ? bytes[p] : 0;
  }

  let mantissa = 0;
  let sigDigits = 0; // digits folded into `mantissa`
  let pendingZeros = 0; // zeros after the first significant digit, not yet folded in
  let exp10 = 0;
  let digitCount = 0;
  let exact = true;

  // Integer part.
  for (;;) {
    const d = c - 48;
    if (d < 0 || d > 9) break;
    digitCount++;
    if (d === 0) {
      if (mantissa !== 0) pendingZeros++;
    } else if (pendingZeros === 0 && sigDigits < 15) {
      mantissa = mantissa * 10 + d; // stays below 10^15: exact
      sigDigits++;
    } else if (exact) {
      const need = sigDigits + pendingZeros + 1;
      if (need > MAX_FAST_DIGITS) exact = false;
      else {
        mantissa = mantissa * POW10[pendingZeros + 1] + d;
        sigDigits = need;
        pendingZeros = 0;
        if (mantissa > MAX_SAFE) exact = false;
      }
    }
    p++;
    c = p < end ? bytes[p] : 0;
  }

  // Fraction part: every fraction digit lowers the exponent, folded or not.
  if (c === decimalMark) {
    p++;
    c = p < end ? bytes[p] : 0;
    for (;;) {
      const d = c - 48;
      if (d < 0 || d > 9) break;
      digitCount++;
      exp10--;
      if (d === 0) {
        if (mantissa !== 0) pendingZeros++;
      } else if (pendingZeros === 0 && sigDigits < 15) {
        mantissa = mantissa * 10 + d; // stays below 10^15: exact
        sigDigits++;
      } else if (exact) {
        const need = sigDigits + pendingZeros + 1;
        if (need > MAX_FAST_DIGITS) exact = false;
        else {
          mantissa = mantissa * POW10[pendingZeros + 1] + d;
          sigDigits = need;
          pendingZeros = 0;
          if (mantissa > MAX_SAFE) exact = false;
        }
      }
      p++;
      c = p < end ? bytes[p] : 0;
    }
  }

  if (digitCount === 0) return scanNonFiniteText(bytes, start, end, out);

  // Exponent part.
  if (c === 101 || c === 69) {
    let q = p + 1;
    let e = q < end ? bytes[q] : 0;
    let expNegative = false;
    if (e === MINUS || e === PLUS) {
      expNegative = e === MINUS;
      q++;
      e = q < end ? bytes[q] : 0;
    }
    let d = e - 48;
    if (d >= 0 && d <= 9) {
      let expValue = 0;
      do {
        if (expValue < 100000000) expValue = expValue * 10 + d; // clamp: beyond this the result is 0 or Infinity anyway
        q++;
        e = q < end ? bytes[q] : 0;
        d = e - 48;
      } while (d >= 0 && d <= 9);
      exp10 += expNegative ? -expValue : expValue;
      p = q;
    }
  }

  out.end = p;
  out.lastDigitExp = exp10;
  const scale = exp10 + pendingZeros;
  let value: number;
  if (mantissa === 0 && exact) value = 0;
  else if (!exact) value = NaN;
  else if (scale === 0) value = mantissa;
  else if (scale > 0) {
    if (scale <= 22) value = mantissa * POW10[scale];
    else if (scale <= 22 + 15 && mantissa * POW10[scale - 22] <= MAX_SAFE) value = mantissa * POW10[scale - 22] * 1e22;
    else value = NaN;
  } else if (scale >= -22) value = mantissa / POW10[-scale];
  else value = NaN;
  // NaN marks "no exact fast path": decode this one cell (sign included) and let Number() round it.
  out.value = value === value ? (negative ? -value : value) : slowNumber(bytes, start, p, decimalMark);
  return SCAN_OK;
}

function slowNumber(bytes: Uint8Array, start: number, end: number, decimalMark: number): number {
  let text = asciiText(bytes, start, end);
  if (decimalMark !== DOT) text = text.replace(String.fromCharCode(decimalMark), ".");
  return Number(text);
}

/** Decodes ASCII bytes; long runs go through TextDecoder to avoid huge argument lists or quadratic concatenation. */
export function asciiText(bytes: Uint8Array, start: number, end: number): string {
  if (end - start > 64) return latin1.decode(bytes.subarray(start, end));
  let text = "";
  for (let i = start; i < end; i++) text += String.fromCharCode(bytes[i]);
  return text;
}

const latin1 = new TextDecoder("latin1");

const NON_FINITE_WORDS = ["infinity", "inf", "nan"];

function scanNonFiniteText(bytes: Uint8Array, start: number, end: number, out: ScanResult): number {
  let p = start;
  if (p < end && (bytes[p] === MINUS || bytes[p] === PLUS)) p++;
  for (const word of NON_FINITE_WORDS) {
    if (p + word.length > end) continue;
    let match = true;
    for (let i = 0; i < word.length; i++) {
      if ((bytes[p + i] | 0x20) !== word.charCodeAt(i)) {
        match = false;
        break;
      }
    }
    if (match) {
      out.end = p + word.length;
      out.value = NaN;
      return SCAN_NON_FINITE_TEXT;
    }
  }
  out.end = start;
  return SCAN_INVALID;
}

const encoder = new TextEncoder();

/**
 * Convenience for callers outside the hot path and for tests: the whole string must be one number in the
 * scanner's grammar (no blanks, no trailing text). Returns NaN when it is not.
 */
export function parseDecimal(text: string, decimalMark: "." | "," = "."): number {
  const bytes = encoder.encode(text);
  const out = newScanResult();
  const status = scanNumber(bytes, 0, bytes.length, decimalMark.charCodeAt(0), out);
  if (status !== SCAN_OK || out.end !== bytes.length) return NaN;
  return out.value;
}
