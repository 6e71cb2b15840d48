// Admin → Import's column list and template (src/features/admin/register-template.ts) against what the server's
// register import accepts (server/captures/asset-import.ts, run here on a stand-in database) and the shared motor
// schema (src/shared/schemas/assets.ts, bearings.ts): the same columns, no more, no fewer, so they cannot drift apart.
import type { Knex } from "knex";
import { describe, expect, it } from "vitest";
import { importAssets, parseCsvRows } from "../../server/captures/asset-import.ts";
import { toRow } from "../../server/captures/asset-service.ts";
import { assetBody, assetFields } from "../../src/shared/schemas/assets.ts";
import { bearingFields } from "../../src/shared/schemas/bearings.ts";
import { csvCell, REGISTER_COLUMNS, registerTemplateCsv } from "../../src/features/admin/register-template.ts";

const SITE = { id: 11, code: "GBT" };
const AREA_ID = 7;

/**
 * Just enough of Knex for importAssets: the site list, a transaction that finds no motor by the tag and the area by
 * its name, and the insert of the new motor (recorded).
 */
function standInDb() {
  const inserted: Record<string, unknown>[] = [];
  const table = (name: string) => {
    const q = {
      select: async () => (name === "sites" ? [SITE] : []),
      where: () => q,
      first: async () => (name === "areas" ? { id: AREA_ID } : undefined),
      insert: (row: Record<string, unknown>) => {
        if (name === "assets") inserted.push(row);
        return Object.assign(Promise.resolve(), { returning: async () => [{ id: AREA_ID }] });
      },
      update: async () => 1,
    };
    return q;
  };
  const db = Object.assign((name: string) => table(name), { transaction: async (fn: (trx: unknown) => unknown) => fn(db), fn: { now: () => new Date() } });
  return { db: db as unknown as Knex, inserted };
}

/** The fields the import can fill: the motor's own (its area comes from site + area), each bearing field per end. */
function schemaFields(): string[] {
  const own = Object.keys(assetFields).filter((f) => f !== "areaId" && f !== "bearings");
  const bearings = ["de", "nde"].flatMap((end) => Object.keys(bearingFields).map((f) => `bearings.${end}.${f}`));
  return [...own, "site", "area", ...bearings].sort();
}

describe("the register import's template", () => {
  it("its header row is exactly the template's columns, in order", () => {
    const [header] = parseCsvRows(registerTemplateCsv());
    expect(header.cells).toEqual(REGISTER_COLUMNS.map((c) => c.header));
    expect(parseCsvRows(registerTemplateCsv())).toHaveLength(1); // the header only: nothing invented gets imported
  });

  it("names every field the shared motor schema has, each once", () => {
    const fields = REGISTER_COLUMNS.map((c) => c.field);
    expect(new Set(fields).size).toBe(fields.length);
    expect([...fields].sort()).toEqual(schemaFields());
  });

  it("the server's importer takes every header of it: no unknown column, no missing one", async () => {
    const { db } = standInDb();
    const report = await importAssets(db, registerTemplateCsv());
    expect(report).toEqual({ created: 0, updated: 0, errors: [] });
  });

  it("marks as required what the importer and the schema require", async () => {
    // every row: the importer refuses a header without it
    for (const c of REGISTER_COLUMNS) {
      const header = REGISTER_COLUMNS.filter((x) => x !== c).map((x) => csvCell(x.header)).join(",");
      const report = await importAssets(standInDb().db, header);
      const refused = report.errors.some((e) => e.message.includes(`no "${c.field}" column`));
      expect(refused, c.header).toBe(c.required === "always");
    }
    // a new motor: what assetBody has no default for (the importer fills the name from the tag, the area from site + area)
    const issues = assetBody.safeParse({}).error!.issues.map((i) => String(i.path[0]));
    const needed = REGISTER_COLUMNS.filter((c) => c.required).map((c) => c.field);
    expect(issues.filter((f) => f !== "name" && f !== "areaId").every((f) => needed.includes(f))).toBe(true);
    expect(REGISTER_COLUMNS.filter((c) => c.required === "new").map((c) => c.field).sort()).toEqual(issues.filter((f) => !["name", "areaId", "tag"].includes(f)).sort());
  });

  it("the example row imports as the motor it describes, each column into its own field", async () => {
    const { db, inserted } = standInDb();
    const report = await importAssets(db, registerTemplateCsv({ example: true }));
    expect(report).toEqual({ created: 1, updated: 0, errors: [] });
    // the same motor as the API would take it, built from each column's field and example value
    const body: Record<string, unknown> = { areaId: AREA_ID };
    for (const c of REGISTER_COLUMNS) {
      if (c.field === "site" || c.field === "area") continue;
      const [head, end, f] = c.field.split(".");
      if (head === "bearings") ((((body.bearings ??= {}) as Record<string, Record<string, unknown>>)[end] ??= {})[f] = c.example);
      else body[head] = c.example;
    }
    expect(inserted).toEqual([toRow(assetBody.parse(body))]);
    expect(REGISTER_COLUMNS.find((c) => c.field === "site")!.example).toBe(SITE.code);
  });

  it("every column says what it holds; figures with a unit carry it", () => {
    for (const c of REGISTER_COLUMNS) expect(c.note.length, c.header).toBeGreaterThan(3);
    const units = Object.fromEntries(REGISTER_COLUMNS.filter((c) => c.unit).map((c) => [c.field, c.unit]));
    expect(units).toMatchObject({ ratedKw: "kW", ratedVoltage: "V", ratedCurrent: "A", ratedHz: "Hz", ratedRpm: "rpm", efficiencyPct: "%", "bearings.de.pitchDiameterMm": "mm" });
  });

  it("quotes a cell with a separator, a quote or a line break, and writes flags as yes / no", () => {
    expect(csvCell("Fans, north")).toBe('"Fans, north"');
    expect(csvCell('6316 "C3"')).toBe('"6316 ""C3"""');
    expect(csvCell("a;b")).toBe('"a;b"');
    expect(csvCell(true)).toBe("yes");
    expect(csvCell(0.85)).toBe("0.85");
  });
});
