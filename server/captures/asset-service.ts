// Motors (assets): list/detail queries with their latest reading, create/update with nameplate versioning,
// and the asset register's CSV import.
import type { Knex } from "knex";
import { badRequest } from "../errors.ts";
import { NAMEPLATE_FIELDS, type AssetBody, type AssetPatchBody } from "../../src/shared/schemas/assets.ts";
import type { BearingsBody } from "../../src/shared/schemas/bearings.ts";

// The request bodies (assetBody, assetPatchBody) and their rules live in src/shared/schemas/assets.ts, shared with the
// client's forms.
export type AssetInput = AssetBody | AssetPatchBody;

const COLUMN: Record<string, string> = {
  tag: "tag", name: "name", areaId: "area_id", drivenEquipment: "driven_equipment", criticality: "criticality",
  ratedKw: "rated_kw", ratedVoltage: "rated_voltage", ratedCurrent: "rated_current", ratedHz: "rated_hz", ratedRpm: "rated_rpm",
  poles: "poles", rotorBars: "rotor_bars", statorSlots: "stator_slots", designLetter: "design_letter", efficiencyClass: "efficiency_class",
  efficiencyPct: "efficiency_pct", powerFactor: "power_factor", connection: "connection", driveFed: "drive_fed",
  machineGroup: "machine_group", support: "support",
};

/** A parsed body → the assets row's columns (fields left out are not touched). */
export function toRow(input: Partial<AssetInput>): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(input)) if (v !== undefined && COLUMN[k]) row[COLUMN[k]] = v;
  if (input.bearings !== undefined) Object.assign(row, bearingColumns(input.bearings));
  return row;
}

export const BEARING_ENDS = ["de", "nde"] as const;
const BEARING_COLUMN = { designation: "designation", rollingElements: "elements", elementDiameterMm: "element_mm", pitchDiameterMm: "pitch_mm", contactAngleDeg: "contact_deg" } as const;

/** Columns of the bearings in an update: an end left out is kept, null clears it, an object replaces it whole. */
export function bearingColumns(bearings: BearingsBody | null): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  for (const end of BEARING_ENDS) {
    const b = bearings === null ? null : bearings[end];
    if (b === undefined) continue;
    for (const [field, col] of Object.entries(BEARING_COLUMN)) row[`bearing_${end}_${col}`] = b ? (b[field as keyof typeof BEARING_COLUMN] ?? null) : null;
  }
  return row;
}

/** One end's bearing as the API answers it, or null when nothing is stored for it. */
export function bearingOut(r: Record<string, any>, end: (typeof BEARING_ENDS)[number]) {
  const out = Object.fromEntries(Object.entries(BEARING_COLUMN).map(([field, col]) => [field, r[`bearing_${end}_${col}`] ?? null])) as Record<keyof typeof BEARING_COLUMN, any>;
  return Object.values(out).every((v) => v === null) ? null : out;
}

/** Which nameplate fields differ between a stored row and an update ("bearings.de" / "bearings.nde" for the bearings). */
export function nameplateChanges(row: Record<string, unknown>, input: Partial<AssetInput>): string[] {
  const changed: string[] = NAMEPLATE_FIELDS.filter((f) => {
    const v = input[f];
    if (v === undefined) return false;
    const old = row[COLUMN[f]];
    return (old ?? null) !== (v ?? null);
  });
  if (input.bearings !== undefined) {
    const cols = bearingColumns(input.bearings);
    for (const end of BEARING_ENDS) if (Object.keys(cols).some((c) => c.startsWith(`bearing_${end}_`) && (row[c] ?? null) !== cols[c])) changed.push(`bearings.${end}`);
  }
  return changed;
}

/** The list/detail query: motor, area, site, its latest current analysis and open findings. */
export function assetBase(db: Knex) {
  return db("assets as a")
    .join("areas as ar", "ar.id", "a.area_id")
    .join("sites as s", "s.id", "ar.site_id")
    .joinRaw(
      `left join lateral (select an.id as l_analysis_id, an.capture_id as l_capture_id, an.taken_at as l_taken_at,
         an.rotor_grade as l_rotor_grade, an.rotor_assessable as l_rotor_assessable, an.sideband_db as l_sideband_db,
         an.load_pct as l_load_pct, an.slip as l_slip, an.rpm as l_rpm, an.supply_hz as l_supply_hz,
         an.vibration_rms as l_vibration_rms, an.vibration_zone as l_vibration_zone
       from analyses an where an.asset_id = a.id and an.is_current order by an.taken_at desc, an.id desc limit 1) l on true`,
    );
}

export const assetSelect = (db: Knex) => (q: Knex.QueryBuilder) =>
  q.select(
    "a.*",
    "ar.name as area_name",
    "s.id as site_id",
    "s.name as site_name",
    "l.*",
    db.raw(`(select count(*)::int from findings f where f.asset_id = a.id and f.status = 'open') as open_findings`),
  );

export const ASSET_SORT: Record<string, string> = {
  tag: "a.tag",
  name: "a.name",
  siteName: "s.name",
  areaName: "ar.name",
  drivenEquipment: "a.driven_equipment",
  criticality: "(case a.criticality when 'high' then 3 when 'medium' then 2 else 1 end)",
  ratedKw: "a.rated_kw",
  poles: "a.poles",
  takenAt: "l.l_taken_at",
  rotorGrade: "l.l_rotor_grade",
  sidebandDb: "l.l_sideband_db",
  loadPct: "l.l_load_pct",
  vibrationRms: "l.l_vibration_rms",
  vibrationZone: "l.l_vibration_zone",
  openFindings: "(select count(*) from findings f where f.asset_id = a.id and f.status = 'open')",
  createdAt: "a.created_at",
};

export function assetOut(r: Record<string, any>) {
  return {
    id: r.id,
    tag: r.tag,
    name: r.name,
    areaId: r.area_id,
    areaName: r.area_name,
    siteId: r.site_id,
    siteName: r.site_name,
    drivenEquipment: r.driven_equipment,
    criticality: r.criticality,
    ratedKw: r.rated_kw,
    ratedVoltage: r.rated_voltage,
    ratedCurrent: r.rated_current,
    ratedHz: r.rated_hz,
    ratedRpm: r.rated_rpm,
    poles: r.poles,
    rotorBars: r.rotor_bars,
    statorSlots: r.stator_slots,
    designLetter: r.design_letter,
    efficiencyClass: r.efficiency_class,
    efficiencyPct: r.efficiency_pct,
    powerFactor: r.power_factor,
    connection: r.connection,
    driveFed: r.drive_fed,
    machineGroup: r.machine_group,
    support: r.support,
    bearings: { de: bearingOut(r, "de"), nde: bearingOut(r, "nde") },
    nameplateVersion: r.nameplate_version,
    latest: r.l_analysis_id
      ? {
          analysisId: r.l_analysis_id,
          captureId: r.l_capture_id,
          takenAt: r.l_taken_at,
          rotorGrade: r.l_rotor_grade,
          rotorAssessable: r.l_rotor_assessable,
          sidebandDb: r.l_sideband_db,
          loadPct: r.l_load_pct,
          slip: r.l_slip,
          rpm: r.l_rpm,
          supplyHz: r.l_supply_hz,
          vibrationRms: r.l_vibration_rms,
          vibrationZone: r.l_vibration_zone,
        }
      : null,
    openFindings: Number(r.open_findings ?? 0),
  };
}

export async function loadAsset(db: Knex, id: number) {
  const row = await assetSelect(db)(assetBase(db).where("a.id", id)).first();
  return row ? assetOut(row) : null;
}

export const pointOut = (p: Record<string, any>) => ({
  id: p.id,
  name: p.name,
  kind: p.kind,
  position: p.position,
  ctRatio: p.ct_ratio,
  sensitivity: p.sensitivity,
  unit: p.unit,
});

/** Grade filter: R1..R5, "na" (analysed, not assessable), "none" (never analysed); comma-separated. */
export function applyGradeFilter(q: Knex.QueryBuilder, grade: string) {
  const wanted = grade.split(",").map((g) => g.trim()).filter(Boolean);
  const bad = wanted.filter((g) => !/^R[1-5]$/.test(g) && g !== "na" && g !== "none");
  if (bad.length) throw badRequest("Invalid list query", { grade: "Use R1…R5, na (not assessable) or none (no data), comma-separated" });
  q.where((w) => {
    const grades = wanted.filter((g) => g.startsWith("R"));
    if (grades.length) w.orWhereIn("l.l_rotor_grade", grades);
    if (wanted.includes("na")) w.orWhere((x) => x.whereNotNull("l.l_analysis_id").whereNull("l.l_rotor_grade"));
    if (wanted.includes("none")) w.orWhereNull("l.l_analysis_id");
  });
}
