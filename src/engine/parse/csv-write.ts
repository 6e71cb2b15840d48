// CSV writer, for demo data and tests. Output parses back with parseCsv to the same channels.

import type { Capture, Channel } from "../types.ts";
import { classifyColumn } from "./channel-names.ts";

export interface CsvWriteOptions {
  /** Write a first column "time_s" (default true). Without it a "# sample_rate=" line states the rate. */
  timeColumn?: boolean;
  /** Significant digits per sample; default: the shortest text that reads back as the exact same double. */
  digits?: number;
  /** Separator (default ","). */
  separator?: "," | ";" | "\t";
}

/** Header cell: the channel name, plus its unit in brackets when the name alone would not tell it. */
function headerCell(c: Channel): string {
  const implied = classifyColumn(c.name);
  const unit = c.unit === "" || (implied.kind === c.kind && implied.unit === c.unit) ? "" : ` [${c.unit}]`;
  const name = /[",;\t\n\r]/.test(c.name) ? `"${c.name.replace(/"/g, '""')}"` : c.name;
  return `${name}${unit}`;
}

export function writeCsv(capture: Capture, opts: CsvWriteOptions = {}): string {
  const sep = opts.separator ?? ",";
  const withTime = opts.timeColumn ?? true;
  const digits = opts.digits;
  if (digits !== undefined && !(Number.isInteger(digits) && digits >= 1 && digits <= 21)) {
    throw new RangeError("digits must be a whole number from 1 to 21.");
  }
  const { sampleRate, channels } = capture;
  const frames = channels.length > 0 ? channels[0].data.length : 0;
  // Enough decimals that consecutive times differ by many printed steps.
  const timeDecimals = Math.min(20, Math.max(6, Math.ceil(Math.log10(sampleRate)) + 2));
  // String() writes -0 as "0"; keep the sign so the file reads back bit for bit.
  const shortest = (v: number) => (Object.is(v, -0) ? "-0" : String(v));
  const format = digits === undefined ? shortest : (v: number) => shortest(Number(v.toPrecision(digits)));

  const lines: string[] = [];
  if (!withTime) lines.push(`# sample_rate=${sampleRate}`);
  lines.push([...(withTime ? ["time_s"] : []), ...channels.map(headerCell)].join(sep));
  const row: string[] = new Array(channels.length + (withTime ? 1 : 0));
  for (let i = 0; i < frames; i++) {
    let k = 0;
    if (withTime) row[k++] = (i / sampleRate).toFixed(timeDecimals);
    for (const c of channels) row[k++] = format(c.data[i]);
    lines.push(row.join(sep));
  }
  return `${lines.join("\n")}\n`;
}
