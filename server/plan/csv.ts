// CSV after RFC 4180: fields separated by commas, records by CRLF; a field holding a comma, a double quote,
// CR or LF is wrapped in double quotes and its quotes doubled. Formula-looking text is prefixed with an
// apostrophe so a spreadsheet opening the export does not execute it (CSV injection).

export type CsvValue = string | number | boolean | Date | null | undefined;

export function csvField(value: CsvValue): string {
  if (value === null || value === undefined) return "";
  let s = value instanceof Date ? value.toISOString() : String(value);
  if (typeof value === "string" && /^[=+\-@\t\r]/.test(s) && !/^-?\d/.test(s)) s = `'${s}`;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export function csvRow(values: CsvValue[]): string {
  return values.map(csvField).join(",");
}

/** Header + rows, every record ended by CRLF. */
export function toCsv(header: string[], rows: CsvValue[][]): string {
  return [header, ...rows].map((r) => csvRow(r) + "\r\n").join("");
}
