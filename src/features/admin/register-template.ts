// The columns of the motor register import (POST /api/assets/import, server/captures/asset-import.ts), for the
// Admin → Import screen's column list and its "Download a template" CSV. Each column is written in a spelling the
// importer accepts (it compares headers without case, spaces or punctuation) and names the API field it fills
// (src/shared/schemas/assets.ts, bearings.ts). tests/client/register-template.test.ts runs the template through the
// server's importer and compares the fields with the shared schema, so the two cannot drift apart.
import { ASSET_DEFAULTS, CONNECTIONS, CRITICALITIES, DESIGN_LETTERS, DRIVEN_EQUIPMENT, SUPPORTS } from "../../shared/schemas/assets.ts";

export interface RegisterColumn {
  /** The header as the template writes it. */
  header: string;
  /** The API field it fills ("bearings.de.pitchDiameterMm" for a bearing); `site` and `area` are the importer's own. */
  field: string;
  /** "always": every row needs it; "new": a row that adds a motor needs it (a known tag keeps what is stored). */
  required: "always" | "new" | false;
  unit?: string;
  /** What it holds and the values it takes. */
  note: string;
  /** The example motor's value (invented). */
  example: string | number | boolean;
}

const list = (values: readonly (string | number)[]) => values.join(", ");

const bearingColumns = (end: "de" | "nde", header: string, example: { designation: string; elements: number; d: number; D: number }): RegisterColumn[] => [
  { header: `${header} bearing`, field: `bearings.${end}.designation`, required: false, note: "Bearing designation, as on the bearing", example: example.designation },
  { header: `${header} elements`, field: `bearings.${end}.rollingElements`, required: false, note: "Number of rolling elements Nb, 3–60", example: example.elements },
  { header: `${header} element diameter mm`, field: `bearings.${end}.elementDiameterMm`, required: false, unit: "mm", note: "Rolling-element diameter d", example: example.d },
  { header: `${header} pitch diameter mm`, field: `bearings.${end}.pitchDiameterMm`, required: false, unit: "mm", note: "Pitch diameter D (give Nb, d and D together)", example: example.D },
  { header: `${header} contact angle deg`, field: `bearings.${end}.contactAngleDeg`, required: false, unit: "°", note: "Contact angle, 0 for a deep-groove ball bearing (0 when left empty)", example: 0 },
];

/** Every column the import reads, in template order. */
export const REGISTER_COLUMNS: RegisterColumn[] = [
  { header: "Tag", field: "tag", required: "always", note: "The motor's tag; a known tag updates that motor", example: "GBT-DST-F03" },
  { header: "Name", field: "name", required: false, note: "What the motor drives; the tag when left empty", example: "Baghouse fan 3" },
  { header: "Site", field: "site", required: "always", note: "The site's code (Admin → Sites); the site must exist", example: "GBT" },
  { header: "Area", field: "area", required: "always", note: "The area's name on that site; a new name adds the area", example: "Dust Control" },
  { header: "Driven equipment", field: "drivenEquipment", required: false, note: `One of ${list(DRIVEN_EQUIPMENT)} (${ASSET_DEFAULTS.drivenEquipment} when left empty)`, example: "fan" },
  { header: "Criticality", field: "criticality", required: false, note: `${list(CRITICALITIES)} (${ASSET_DEFAULTS.criticality} when left empty)`, example: "medium" },
  { header: "Rated kW", field: "ratedKw", required: false, unit: "kW", note: "Rated output power", example: 75 },
  { header: "Rated voltage", field: "ratedVoltage", required: false, unit: "V", note: "Rated line voltage", example: 400 },
  { header: "Rated current", field: "ratedCurrent", required: false, unit: "A", note: "Rated current", example: 132 },
  { header: "Rated Hz", field: "ratedHz", required: false, unit: "Hz", note: `Rated frequency (${ASSET_DEFAULTS.ratedHz} when left empty)`, example: 50 },
  { header: "Rated rpm", field: "ratedRpm", required: "new", unit: "rpm", note: "Full-load speed, below the synchronous 120·f/p", example: 1485 },
  { header: "Poles", field: "poles", required: "new", note: "Number of poles, an even whole number (2, 4, 6, …)", example: 4 },
  { header: "Rotor bars", field: "rotorBars", required: false, note: "Number of rotor bars", example: 40 },
  { header: "Stator slots", field: "statorSlots", required: false, note: "Number of stator slots", example: 48 },
  { header: "Design letter", field: "designLetter", required: false, note: `NEMA design letter ${list(DESIGN_LETTERS)}`, example: "B" },
  { header: "Efficiency class", field: "efficiencyClass", required: false, note: "Efficiency class, e.g. IE3", example: "IE3" },
  { header: "Efficiency %", field: "efficiencyPct", required: false, unit: "%", note: "Rated efficiency", example: 95 },
  { header: "Power factor", field: "powerFactor", required: false, unit: "cos φ", note: "Rated power factor, above 0 and at most 1", example: 0.85 },
  { header: "Connection", field: "connection", required: false, note: list(CONNECTIONS), example: "delta" },
  { header: "Drive fed", field: "driveFed", required: false, note: "yes or no: fed by a variable-frequency drive (no when left empty)", example: false },
  { header: "Machine group", field: "machineGroup", required: false, note: `ISO 20816-3 group: 1 (above 300 kW) or 2 (15–300 kW); ${ASSET_DEFAULTS.machineGroup} when left empty`, example: 2 },
  { header: "Support", field: "support", required: false, note: `${list(SUPPORTS)} (${ASSET_DEFAULTS.support} when left empty)`, example: "rigid" },
  ...bearingColumns("de", "DE", { designation: "6316 C3", elements: 8, d: 26.988, D: 125 }),
  ...bearingColumns("nde", "NDE", { designation: "6313 C3", elements: 8, d: 23.813, D: 102.5 }),
];

/** A value as a CSV cell: yes/no for a flag, quoted (RFC 4180) when it holds a separator, a quote or a line break. */
export function csvCell(value: string | number | boolean): string {
  const s = typeof value === "boolean" ? (value ? "yes" : "no") : String(value);
  return /[",;\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** The template: the header row, and the example motor's row when asked for. CRLF line ends, as spreadsheets write. */
export function registerTemplateCsv(opts: { example?: boolean } = {}): string {
  const rows = [REGISTER_COLUMNS.map((c) => csvCell(c.header))];
  if (opts.example) rows.push(REGISTER_COLUMNS.map((c) => csvCell(c.example)));
  return rows.map((r) => r.join(",")).join("\r\n") + "\r\n";
}
