import type { Knex } from "knex";
import { SCENARIO, type ScenarioMotor } from "./scenario.ts";

// The scenario's sites, areas, motors (with their nameplates) and measurement points. Idempotent: rows are
// matched by their natural keys (site code, area name within the site, motor tag, point name within the motor)
// and only missing ones are inserted; nothing that exists is changed (an admin's later edits survive a restart).

export interface PointSpec {
  name: string;
  kind: "current" | "vibration";
  position: string;
  unit: string;
  sensitivity?: number;
}

/** Three current phases for every motor; drive-end horizontal and vertical accelerometers on the watched ones. */
export function pointsFor(m: ScenarioMotor): PointSpec[] {
  const out: PointSpec[] = ["A", "B", "C"].map((p) => ({ name: `Phase ${p} current`, kind: "current" as const, position: p, unit: "A" }));
  if (m.vibration) {
    out.push({ name: "Drive end horizontal", kind: "vibration", position: "H", unit: "m/s2", sensitivity: 100 });
    out.push({ name: "Drive end vertical", kind: "vibration", position: "V", unit: "m/s2", sensitivity: 100 });
  }
  return out;
}

/** The assets row of a scenario motor (nameplate columns as the API stores them). */
export function assetRow(m: ScenarioMotor, areaId: number) {
  return {
    area_id: areaId,
    tag: m.tag,
    name: m.name,
    driven_equipment: m.drivenEquipment,
    criticality: m.criticality,
    rated_kw: m.ratedKw,
    rated_voltage: m.ratedVoltage,
    rated_current: m.ratedCurrent,
    rated_hz: m.ratedHz,
    rated_rpm: m.ratedRpm,
    poles: m.poles,
    rotor_bars: m.rotorBars,
    stator_slots: m.statorSlots,
    design_letter: m.designLetter ?? null,
    efficiency_class: m.efficiencyClass ?? null,
    efficiency_pct: m.efficiencyPct,
    power_factor: m.powerFactor,
    connection: m.connection,
    drive_fed: !!m.driveFed,
    machine_group: m.machineGroup,
    support: m.support,
    ...bearingColumns(m),
  };
}

/** The bearing columns of a scenario motor (null where no bearing is on record). */
function bearingColumns(m: ScenarioMotor): Record<string, string | number | null> {
  const row: Record<string, string | number | null> = {};
  for (const end of ["de", "nde"] as const) {
    const b = m.bearings?.[end];
    row[`bearing_${end}_designation`] = b?.designation ?? null;
    row[`bearing_${end}_elements`] = b?.rollingElements ?? null;
    row[`bearing_${end}_element_mm`] = b?.elementDiameterMm ?? null;
    row[`bearing_${end}_pitch_mm`] = b?.pitchDiameterMm ?? null;
    row[`bearing_${end}_contact_deg`] = b?.contactAngleDeg ?? null;
  }
  return row;
}

export const SCENARIO_MOTORS: ScenarioMotor[] = SCENARIO.flatMap((s) => s.motors);
export const SCENARIO_TAGS: string[] = SCENARIO_MOTORS.map((m) => m.tag);

/** Insert what is missing of the scenario's fleet. Returns the motors' asset ids by tag. */
export async function seedFleet(db: Knex | Knex.Transaction): Promise<Map<string, number>> {
  // Fast path for every start after the first: all motors and points are there.
  const have = await db("assets").whereIn("tag", SCENARIO_TAGS).select("id", "tag");
  if (have.length === SCENARIO_TAGS.length) {
    const [{ count }] = await db("measurement_points").whereIn("asset_id", have.map((a) => a.id)).count({ count: "*" });
    if (Number(count) >= SCENARIO_MOTORS.reduce((n, m) => n + pointsFor(m).length, 0)) return new Map(have.map((a) => [a.tag as string, a.id as number]));
  }
  const ids = new Map<string, number>();
  for (const site of SCENARIO) {
    await db("sites").insert({ code: site.code, name: site.name, timezone: site.timezone }).onConflict("code").ignore();
    const siteId = (await db("sites").where({ code: site.code }).first("id")).id as number;
    const areaIds = new Map<string, number>();
    for (const area of site.areas) {
      await db("areas").insert({ site_id: siteId, name: area }).onConflict(["site_id", "name"]).ignore();
      areaIds.set(area, (await db("areas").where({ site_id: siteId, name: area }).first("id")).id);
    }
    for (const m of site.motors) {
      const areaId = areaIds.get(m.area);
      if (!areaId) throw new Error(`scenario: motor ${m.tag} names unknown area "${m.area}"`);
      await db("assets").insert(assetRow(m, areaId)).onConflict("tag").ignore();
      const assetId = (await db("assets").where({ tag: m.tag }).first("id")).id as number;
      ids.set(m.tag, assetId);
      for (const p of pointsFor(m)) {
        await db("measurement_points")
          .insert({ asset_id: assetId, name: p.name, kind: p.kind, position: p.position, unit: p.unit, sensitivity: p.sensitivity ?? null })
          .onConflict(["asset_id", "name"])
          .ignore();
      }
    }
  }
  return ids;
}
