// Asset register import: one CSV row per motor, matched by tag (created when new, updated when known).
// Every row is checked on its own; a bad row is reported with its line number and nothing of it is written.
import type { Knex } from "knex";
import type { ZodError } from "zod";
import { nameplateChanges, toRow } from "./asset-service.ts";
import { assetBody, assetPatchBody, speedProblem } from "../../src/shared/schemas/assets.ts";

export interface ImportReport {
  created: number;
  updated: number;
  errors: { line: number; message: string }[];
}

/** Header spellings accepted, normalised (lower case, letters and digits only) → API field. */
const HEADERS: Record<string, string> = {
  tag: "tag", name: "name", description: "name", site: "site", sitecode: "site", area: "area", areaname: "area",
  drivenequipment: "drivenEquipment", equipment: "drivenEquipment", driven: "drivenEquipment", criticality: "criticality",
  ratedkw: "ratedKw", kw: "ratedKw", ratedvoltage: "ratedVoltage", voltage: "ratedVoltage", v: "ratedVoltage",
  ratedcurrent: "ratedCurrent", current: "ratedCurrent", a: "ratedCurrent", ratedhz: "ratedHz", hz: "ratedHz", frequency: "ratedHz",
  ratedrpm: "ratedRpm", rpm: "ratedRpm", poles: "poles", rotorbars: "rotorBars", statorslots: "statorSlots",
  designletter: "designLetter", efficiencyclass: "efficiencyClass", efficiencypct: "efficiencyPct", efficiency: "efficiencyPct",
  powerfactor: "powerFactor", pf: "powerFactor", connection: "connection", drivefed: "driveFed", vfd: "driveFed",
  machinegroup: "machineGroup", support: "support",
  ...bearingHeaders("de", ["de", "drivend", "driveend"]),
  ...bearingHeaders("nde", ["nde", "nondrivend", "nondriveend"]),
};

/**
 * Bearing columns, one set per end, e.g. "DE bearing", "DE elements", "DE element diameter mm", "DE pitch diameter mm",
 * "DE contact angle deg" (or "Non-drive end bearing", …). Headers are compared without case, so d and D are spelled
 * out rather than left to their case.
 */
function bearingHeaders(end: "de" | "nde", prefixes: string[]): Record<string, string> {
  const names: Record<string, string[]> = {
    designation: ["bearing", "bearingdesignation", "designation"],
    rollingElements: ["elements", "rollingelements", "nb", "balls", "bearingelements"],
    elementDiameterMm: ["elementdiameter", "elementdiametermm", "balldiameter", "balldiametermm", "rollingelementdiametermm"],
    pitchDiameterMm: ["pitchdiameter", "pitchdiametermm", "bearingpitchdiametermm"],
    contactAngleDeg: ["contactangle", "contactangledeg", "contactangledegrees"],
  };
  const out: Record<string, string> = {};
  for (const prefix of prefixes) for (const [field, spellings] of Object.entries(names)) for (const n of spellings) out[`${prefix}${n}`] = `bearings.${end}.${field}`;
  return out;
}
const NUMERIC = new Set([
  "ratedKw", "ratedVoltage", "ratedCurrent", "ratedHz", "ratedRpm", "poles", "rotorBars", "statorSlots", "efficiencyPct", "powerFactor", "machineGroup",
  ...["de", "nde"].flatMap((e) => ["rollingElements", "elementDiameterMm", "pitchDiameterMm", "contactAngleDeg"].map((f) => `bearings.${e}.${f}`)),
]);

/**
 * "bearings.de.pitchDiameterMm" cells → { bearings: { de: { pitchDiameterMm } } }. An end whose cells are all empty on
 * a row is left out (kept as stored); an end with any cell given replaces the stored one (see PATCH /api/assets/:id).
 */
function nestBearings(rec: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  const bearings: Record<string, Record<string, unknown>> = {};
  for (const [k, v] of Object.entries(rec)) {
    const m = /^bearings\.(de|nde)\.(\w+)$/.exec(k);
    if (!m) out[k] = v;
    else if (v !== undefined) (bearings[m[1]] ??= {})[m[2]] = v;
  }
  if (Object.keys(bearings).length) out.bearings = bearings;
  return out;
}
const BOOLEAN = new Set(["driveFed"]);

/** RFC 4180-ish: separators "," or ";", double-quoted cells with "" escapes, CRLF or LF. Lines are 1-based. */
export function parseCsvRows(text: string): { line: number; cells: string[] }[] {
  const src = text.replace(/^\uFEFF/, "");
  const firstLine = src.slice(0, src.search(/\r?\n|$/));
  const sep = (firstLine.match(/;/g)?.length ?? 0) > (firstLine.match(/,/g)?.length ?? 0) ? ";" : ",";
  const rows: { line: number; cells: string[] }[] = [];
  let line = 1;
  let startLine = 1;
  let cell = "";
  let cells: string[] = [];
  let quoted = false;
  for (let i = 0; i < src.length; i++) {
    const c = src[i];
    if (quoted) {
      if (c === '"' && src[i + 1] === '"') (cell += '"'), i++;
      else if (c === '"') quoted = false;
      else {
        if (c === "\n") line++;
        cell += c;
      }
    } else if (c === '"' && cell.trim() === "") (quoted = true), (cell = "");
    else if (c === sep) cells.push(cell), (cell = "");
    else if (c === "\n" || c === "\r") {
      if (c === "\r" && src[i + 1] === "\n") i++;
      cells.push(cell);
      if (cells.some((x) => x.trim() !== "")) rows.push({ line: startLine, cells: cells.map((x) => x.trim()) });
      cells = [];
      cell = "";
      line++;
      startLine = line;
    } else cell += c;
  }
  cells.push(cell);
  if (cells.some((x) => x.trim() !== "")) rows.push({ line: startLine, cells: cells.map((x) => x.trim()) });
  return rows;
}

function cellValue(field: string, raw: string): unknown {
  if (raw === "") return undefined;
  if (NUMERIC.has(field)) {
    const n = Number(raw.replace(",", "."));
    return Number.isFinite(n) ? n : raw; // a string fails the schema with a readable message
  }
  if (BOOLEAN.has(field)) {
    const v = raw.toLowerCase();
    if (["yes", "y", "true", "1", "vfd"].includes(v)) return true;
    if (["no", "n", "false", "0", "dol", ""].includes(v)) return false;
    return raw;
  }
  if (field === "criticality" || field === "support" || field === "connection" || field === "drivenEquipment") return raw.toLowerCase();
  return raw;
}

function zodMessage(err: ZodError): string {
  return err.issues.map((i) => `${i.path.join(".") || "row"}: ${i.message}`).join("; ");
}

export async function importAssets(db: Knex, csv: string): Promise<ImportReport> {
  const report: ImportReport = { created: 0, updated: 0, errors: [] };
  const rows = parseCsvRows(csv);
  if (!rows.length) return { ...report, errors: [{ line: 1, message: "The file is empty: expected a header row (tag, name, site, area, ratedRpm, poles, …) and one row per motor." }] };
  const header = rows[0];
  const fields = header.cells.map((h) => HEADERS[h.toLowerCase().replace(/[^a-z0-9]/g, "")] ?? null);
  const unknown = header.cells.filter((_h, i) => !fields[i]);
  for (const need of ["tag", "site", "area"]) {
    if (!fields.includes(need)) report.errors.push({ line: header.line, message: `The header has no "${need}" column.` });
  }
  if (unknown.length) report.errors.push({ line: header.line, message: `Unknown column${unknown.length > 1 ? "s" : ""} ignored: ${unknown.join(", ")}.` });
  if (!["tag", "site", "area"].every((f) => fields.includes(f))) return report;

  const sites = new Map((await db("sites").select("id", "code")).map((s) => [String(s.code).toLowerCase(), s.id as number]));
  const seen = new Map<string, number>();
  for (const row of rows.slice(1)) {
    if (row.cells.length > header.cells.length) {
      report.errors.push({ line: row.line, message: `The row has ${row.cells.length} cells, the header ${header.cells.length}.` });
      continue;
    }
    const cells: Record<string, unknown> = {};
    fields.forEach((f, i) => {
      if (f) cells[f] = cellValue(f, row.cells[i] ?? "");
    });
    const rec = nestBearings(cells);
    const tag = String(rec.tag ?? "");
    if (!tag) {
      report.errors.push({ line: row.line, message: "The tag is empty." });
      continue;
    }
    if (seen.has(tag.toLowerCase())) {
      report.errors.push({ line: row.line, message: `Tag ${tag} already appears on line ${seen.get(tag.toLowerCase())}.` });
      continue;
    }
    seen.set(tag.toLowerCase(), row.line);
    const siteId = sites.get(String(rec.site ?? "").toLowerCase());
    if (!siteId) {
      report.errors.push({ line: row.line, message: `Unknown site code "${rec.site ?? ""}" (create the site first).` });
      continue;
    }
    if (!rec.area) {
      report.errors.push({ line: row.line, message: "The area is empty." });
      continue;
    }
    const { site: _s, area, ...fieldsOnly } = rec;
    try {
      const outcome = await db.transaction(async (trx) => {
        const existing = await trx("assets").where({ tag }).first();
        let areaRow = await trx("areas").where({ site_id: siteId, name: area }).first("id");
        if (!areaRow) [areaRow] = await trx("areas").insert({ site_id: siteId, name: area }).returning("id");
        const input = { ...fieldsOnly, areaId: areaRow.id };
        if (existing) {
          const parsed = assetPatchBody.safeParse(input);
          if (!parsed.success) throw new RowError(zodMessage(parsed.error));
          const speed = speedProblem({ ratedRpm: parsed.data.ratedRpm ?? existing.rated_rpm, ratedHz: parsed.data.ratedHz ?? existing.rated_hz, poles: parsed.data.poles ?? existing.poles });
          if (speed) throw new RowError(`ratedRpm: ${speed}`);
          const changed = nameplateChanges(existing, parsed.data);
          await trx("assets")
            .where({ id: existing.id })
            .update({ ...toRow(parsed.data), ...(changed.length ? { nameplate_version: existing.nameplate_version + 1 } : {}), updated_at: trx.fn.now() });
          return "updated" as const;
        }
        const parsed = assetBody.safeParse({ name: tag, ...input });
        if (!parsed.success) throw new RowError(zodMessage(parsed.error));
        await trx("assets").insert(toRow(parsed.data));
        return "created" as const;
      });
      report[outcome]++;
    } catch (err) {
      report.errors.push({ line: row.line, message: err instanceof RowError ? err.message : `Could not save: ${(err as Error).message}` });
    }
  }
  return report;
}

class RowError extends Error {}
