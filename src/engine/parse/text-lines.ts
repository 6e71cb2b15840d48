// Small helpers for the non-hot parts of CSV parsing: finding line ends, decoding a line, splitting a header.

export const LF = 10;
export const CR = 13;
export const TAB = 9;
export const SPACE = 32;
export const QUOTE = 34;
export const COMMA = 44;
export const SEMICOLON = 59;
export const HASH = 35;
export const PERCENT = 37;

const utf8 = new TextDecoder("utf-8");

/** Offset of the LF or CR ending the line that starts at `pos`, or `end`. */
export function lineEnd(bytes: Uint8Array, pos: number, end: number): number {
  let p = pos;
  while (p < end && bytes[p] !== LF && bytes[p] !== CR) p++;
  return p;
}

/** Offset of the start of the next line after the line end at `eol`. */
export function skipEol(bytes: Uint8Array, eol: number, end: number): number {
  if (eol >= end) return end;
  if (bytes[eol] === CR) return eol + 1 < end && bytes[eol + 1] === LF ? eol + 2 : eol + 1;
  return eol + 1;
}

export function decodeUtf8(bytes: Uint8Array, start: number, end: number): string {
  return utf8.decode(bytes.subarray(start, end));
}

/** Text of a cell for an error message: decoded, trimmed, cut to a readable length. */
export function cellTextForMessage(bytes: Uint8Array, start: number, end: number): string {
  const text = decodeUtf8(bytes, start, Math.min(end, start + 200)).trim();
  return text.length > 40 ? `${text.slice(0, 40)}…` : text;
}

export function isBlank(bytes: Uint8Array, start: number, end: number): boolean {
  for (let p = start; p < end; p++) {
    const b = bytes[p];
    if (b !== SPACE && b !== TAB) return false;
  }
  return true;
}

/** Picks the separator used in a header line: the most frequent of comma, semicolon and tab outside quotes. */
export function detectSeparator(line: string): number | null {
  let comma = 0;
  let semicolon = 0;
  let tab = 0;
  let inQuotes = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line.charCodeAt(i);
    if (ch === QUOTE) inQuotes = !inQuotes;
    else if (!inQuotes) {
      if (ch === COMMA) comma++;
      else if (ch === SEMICOLON) semicolon++;
      else if (ch === TAB) tab++;
    }
  }
  if (comma === 0 && semicolon === 0 && tab === 0) return null;
  if (tab >= comma && tab >= semicolon) return TAB;
  return semicolon >= comma ? SEMICOLON : COMMA;
}

/** Splits a header-style line into trimmed cells; double-quoted cells may contain separators and "" escapes. */
export function splitCells(line: string, separator: number | null): string[] {
  if (separator === null) return [unquote(line.trim())];
  const cells: string[] = [];
  let current = "";
  let inQuotes = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line.charCodeAt(i);
    if (ch === QUOTE) {
      if (inQuotes && line.charCodeAt(i + 1) === QUOTE) {
        current += '"';
        i++;
      } else inQuotes = !inQuotes;
    } else if (ch === separator && !inQuotes) {
      cells.push(current.trim());
      current = "";
    } else current += line[i];
  }
  cells.push(current.trim());
  return cells;
}

function unquote(cell: string): string {
  if (cell.length >= 2 && cell.startsWith('"') && cell.endsWith('"')) return cell.slice(1, -1).replace(/""/g, '"');
  return cell;
}

export function separatorName(separator: number | null): string {
  if (separator === COMMA) return "comma";
  if (separator === SEMICOLON) return "semicolon";
  if (separator === TAB) return "tab";
  return "none";
}
