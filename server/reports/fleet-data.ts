import type { Knex } from "knex";
import { ROTOR_GRADE_NAMES, type RotorGrade } from "../../src/engine/types.ts";
import { OPEN_STATUSES } from "../plan/workflow.ts";

// Fleet health: where every motor stands by its current latest analysis, counted per site and area,
// with the worst first, this week's rotor grade and vibration zone changes, the load spread and the overdue inspections.
// One loader feeds the JSON view, the CSV export and the printable site report, so they never disagree.

export const GRADES: RotorGrade[] = ["R1", "R2", "R3", "R4", "R5"];
export const ZONES = ["A", "B", "C", "D"] as const;
export const UNDERLOAD_PCT = 40;
export const OVERLOAD_PCT = 110;
export const LOAD_BIN_PCT = 10;
/** Bins 0–10 … 110–120 %, then one open bin "≥ 120 %" so heavy overloads stay visible. */
export const LOAD_BIN_TOP_PCT = 120;
export const CHANGE_WINDOW_DAYS = 7;

export type GradeKey = RotorGrade | "notAssessable" | "noData";
export type GradeCounts = Record<GradeKey, number>;
export type ZoneCounts = Record<(typeof ZONES)[number] | "none", number>;

export const gradeLabel = (grade: string | null | undefined, assessable: boolean | null | undefined, hasAnalysis: boolean) =>
  !hasAnalysis ? "No data" : assessable && grade && grade in ROTOR_GRADE_NAMES ? `${grade} ${ROTOR_GRADE_NAMES[grade as RotorGrade]}` : "Not assessable";

const emptyGrades = (): GradeCounts => ({ R1: 0, R2: 0, R3: 0, R4: 0, R5: 0, notAssessable: 0, noData: 0 });
const emptyZones = (): ZoneCounts => ({ A: 0, B: 0, C: 0, D: 0, none: 0 });

export interface FleetMotor {
  assetId: number;
  tag: string;
  name: string;
  criticality: string;
  ratedKw: number | null;
  siteId: number;
  siteCode: string;
  siteName: string;
  areaId: number;
  areaName: string;
  analysisId: number | null;
  captureId: number | null;
  takenAt: string | null;
  rotorGrade: RotorGrade | null;
  rotorAssessable: boolean;
  gradeKey: GradeKey;
  gradeLabel: string;
  sidebandDb: number | null;
  loadPct: number | null;
  vibrationRms: number | null;
  vibrationZone: string | null;
  openInspections: number;
  overdueInspections: number;
}

export interface FleetArea {
  id: number;
  name: string;
  motors: number;
  grades: GradeCounts;
  zones: ZoneCounts;
}
export interface FleetSite extends Omit<FleetArea, "name"> {
  code: string;
  name: string;
  timezone: string;
  today: string;
  overdueInspections: number;
  areas: FleetArea[];
}

/**
 * A motor's rotor grade or vibration zone that differs from its previous one (each kind compared with the last
 * analysis that had one: a not-assessable grade or a capture without vibration in between does not count),
 * measured in the change window. `captureId` is the capture that showed it.
 */
export interface FleetChange {
  kind: "rotor" | "vibration";
  assetId: number;
  tag: string;
  name: string;
  siteName: string;
  areaName: string;
  /** Rotor grade (R1..R5) or zone letter (A..D). */
  from: string;
  to: string;
  /** "R2 Watch", "Zone C". */
  fromLabel: string;
  toLabel: string;
  direction: "worse" | "better";
  at: string;
  analysisId: number;
  captureId: number;
}

export interface FleetHealth {
  generatedAt: string;
  siteId: number | null;
  totals: { motors: number; grades: GradeCounts; zones: ZoneCounts; overdueInspections: number };
  sites: FleetSite[];
  worst: FleetMotor[];
  /** Worst first (changeOrder). */
  changes: FleetChange[];
  load: {
    binPct: number;
    underPct: number;
    overPct: number;
    bins: { fromPct: number; toPct: number | null; count: number }[];
    withoutLoad: number;
    under: FleetMotor[];
    over: FleetMotor[];
  };
  overdue: { count: number; items: { id: number; title: string; dueDate: string; daysOverdue: number; status: string; priority: string; assetId: number; assetTag: string; siteName: string; assigneeName: string | null }[] };
  motors: FleetMotor[];
}

const gradeRank = (m: FleetMotor) => (m.gradeKey === "noData" ? -2 : m.gradeKey === "notAssessable" ? -1 : GRADES.indexOf(m.rotorGrade!));
const zoneRank = (z: string | null) => (z ? ZONES.indexOf(z as (typeof ZONES)[number]) : -1);

/** Worst first: rotor grade, then sideband depth (fewer dB below the supply line is worse), then vibration zone. */
export function worstFirst(a: FleetMotor, b: FleetMotor): number {
  return (
    gradeRank(b) - gradeRank(a) ||
    (a.sidebandDb ?? Infinity) - (b.sidebandDb ?? Infinity) ||
    zoneRank(b.vibrationZone) - zoneRank(a.vibrationZone) ||
    a.tag.localeCompare(b.tag)
  );
}

/** One scale for grades and zones, as the review queue's (worst = highest): R1..R5 → 1..5, zone A..D → 1..4. */
export function changeLevelRank(kind: FleetChange["kind"], level: string): number {
  return kind === "rotor" ? GRADES.indexOf(level as RotorGrade) + 1 : ZONES.indexOf(level as (typeof ZONES)[number]) + 1;
}

/**
 * Worst first: changes for the worse before those for the better; then the level reached (R5 and zone D first),
 * the size of the step (R2 → R5 before R4 → R5), the latest first, the tag.
 */
export function changeOrder(a: FleetChange, b: FleetChange): number {
  const step = (c: FleetChange) => Math.abs(changeLevelRank(c.kind, c.to) - changeLevelRank(c.kind, c.from));
  return (
    (a.direction === "worse" ? 0 : 1) - (b.direction === "worse" ? 0 : 1) ||
    changeLevelRank(b.kind, b.to) - changeLevelRank(a.kind, a.to) ||
    step(b) - step(a) ||
    Date.parse(b.at) - Date.parse(a.at) ||
    a.tag.localeCompare(b.tag) ||
    a.kind.localeCompare(b.kind)
  );
}

/** Index of a load % in the histogram: [0,10) → 0 … [110,120) → 11, ≥ 120 → 12; below 0 counts in the first bin. */
export function loadBin(pct: number): number {
  const top = LOAD_BIN_TOP_PCT / LOAD_BIN_PCT;
  return Math.min(top, Math.max(0, Math.floor(pct / LOAD_BIN_PCT)));
}

export function loadHistogram(loads: number[]) {
  const bins = Array.from({ length: LOAD_BIN_TOP_PCT / LOAD_BIN_PCT + 1 }, (_, i) => ({
    fromPct: i * LOAD_BIN_PCT,
    toPct: i * LOAD_BIN_PCT >= LOAD_BIN_TOP_PCT ? null : (i + 1) * LOAD_BIN_PCT,
    count: 0,
  }));
  for (const l of loads) bins[loadBin(l)].count++;
  return bins;
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Row = Record<string, any>;
const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));
const iso = (v: unknown) => (v ? new Date(v as string).toISOString() : null);

function changeOut(c: Row, kind: FleetChange["kind"]): FleetChange {
  const label = (level: string) => (kind === "rotor" ? gradeLabel(level, true, true) : `Zone ${level}`);
  return {
    kind,
    assetId: c.asset_id,
    tag: c.tag,
    name: c.name,
    siteName: c.site_name,
    areaName: c.area_name,
    from: c.prev_level,
    to: c.level,
    fromLabel: label(c.prev_level),
    toLabel: label(c.level),
    direction: changeLevelRank(kind, c.level) > changeLevelRank(kind, c.prev_level) ? "worse" : "better",
    at: iso(c.taken_at)!,
    analysisId: c.id,
    captureId: c.capture_id,
  };
}

export async function loadFleetHealth(db: Knex, opts: { siteId?: number; now?: Date } = {}): Promise<FleetHealth> {
  const now = opts.now ?? new Date();
  const bySite = <T extends Knex.QueryBuilder>(q: T, col = "s.id") => (opts.siteId ? q.where(col, opts.siteId) : q);

  const latest = db("analyses")
    .distinctOn("asset_id")
    .where("is_current", true)
    .orderBy([{ column: "asset_id" }, { column: "taken_at", order: "desc" }, { column: "id", order: "desc" }])
    .select("asset_id", "id", "capture_id", "taken_at", "rotor_grade", "rotor_assessable", "sideband_db", "load_pct", "vibration_rms", "vibration_zone")
    .as("l");
  const inspCounts = db("inspections as i")
    .join("assets as a2", "a2.id", "i.asset_id")
    .join("areas as ar2", "ar2.id", "a2.area_id")
    .join("sites as s2", "s2.id", "ar2.site_id")
    .whereIn("i.status", OPEN_STATUSES as string[])
    .groupBy("i.asset_id")
    .select("i.asset_id", db.raw("count(*)::int as open"), db.raw("(count(*) filter (where i.due_date < (now() at time zone s2.timezone)::date))::int as overdue"))
    .as("ic");

  const since = new Date(now.getTime() - CHANGE_WINDOW_DAYS * 86_400_000);
  const changeQuery = (kind: FleetChange["kind"]) => {
    const col = kind === "rotor" ? "rotor_grade" : "vibration_zone";
    return db
      .with(
        "seq",
        db("analyses as an")
          .where("an.is_current", true)
          .modify((q) => (kind === "rotor" ? q.where("an.rotor_assessable", true) : q))
          .whereNotNull(`an.${col}`)
          .select("an.id", "an.asset_id", "an.capture_id", "an.taken_at", db.raw(`an.${col} as level`), db.raw(`lag(an.${col}) over (partition by an.asset_id order by an.taken_at, an.id) as prev_level`)),
      )
      .from("seq")
      .join("assets as a", "a.id", "seq.asset_id")
      .join("areas as ar", "ar.id", "a.area_id")
      .join("sites as s", "s.id", "ar.site_id")
      .whereNotNull("seq.prev_level")
      .whereRaw("seq.prev_level <> seq.level")
      .where("seq.taken_at", ">=", since)
      .modify((q) => void bySite(q))
      .select("seq.*", "a.tag", "a.name", "s.name as site_name", "ar.name as area_name");
  };

  const [sites, areas, rows, rotorChangeRows, zoneChangeRows, overdueRows]: Row[][] = await Promise.all([
    bySite(db("sites as s").orderBy("s.name").select("s.id", "s.code", "s.name", "s.timezone", db.raw("to_char((now() at time zone s.timezone)::date, 'YYYY-MM-DD') as today"))),
    bySite(db("areas as ar").join("sites as s", "s.id", "ar.site_id").orderBy("ar.name").select("ar.id", "ar.name", "ar.site_id")),
    bySite(
      db("assets as a")
        .join("areas as ar", "ar.id", "a.area_id")
        .join("sites as s", "s.id", "ar.site_id")
        .leftJoin(latest, "l.asset_id", "a.id")
        .leftJoin(inspCounts, "ic.asset_id", "a.id")
        .select(
          "a.id as asset_id", "a.tag", "a.name", "a.criticality", "a.rated_kw", "s.id as site_id", "s.code as site_code", "s.name as site_name",
          "ar.id as area_id", "ar.name as area_name", "l.id as analysis_id", "l.capture_id", "l.taken_at", "l.rotor_grade", "l.rotor_assessable",
          "l.sideband_db", "l.load_pct", "l.vibration_rms", "l.vibration_zone", "ic.open", "ic.overdue",
        ),
    ),
    // A change is an assessable grade (or a vibration zone) that differs from the motor's previous one, taken in the window.
    changeQuery("rotor"),
    changeQuery("vibration"),
    bySite(
      db("inspections as i")
        .join("assets as a", "a.id", "i.asset_id")
        .join("areas as ar", "ar.id", "a.area_id")
        .join("sites as s", "s.id", "ar.site_id")
        .leftJoin("users as u", "u.id", "i.assignee_id")
        .whereIn("i.status", OPEN_STATUSES as string[])
        .whereRaw("i.due_date < (now() at time zone s.timezone)::date")
        .orderBy("i.due_date")
        .select(
          "i.id", "i.title", "i.status", "i.priority", "i.asset_id", "a.tag", "s.id as site_id", "s.name as site_name", "u.name as assignee_name",
          db.raw("to_char(i.due_date, 'YYYY-MM-DD') as due_date"),
          db.raw("((now() at time zone s.timezone)::date - i.due_date)::int as days_overdue"),
        ),
    ),
  ]);

  const motors: FleetMotor[] = rows.map((r) => {
    const has = r.analysis_id !== null;
    const assessable = !!r.rotor_assessable && !!r.rotor_grade;
    const gradeKey: GradeKey = !has ? "noData" : assessable && GRADES.includes(r.rotor_grade) ? r.rotor_grade : "notAssessable";
    return {
      assetId: r.asset_id,
      tag: r.tag,
      name: r.name,
      criticality: r.criticality,
      ratedKw: num(r.rated_kw),
      siteId: r.site_id,
      siteCode: r.site_code,
      siteName: r.site_name,
      areaId: r.area_id,
      areaName: r.area_name,
      analysisId: r.analysis_id,
      captureId: r.capture_id,
      takenAt: iso(r.taken_at),
      rotorGrade: gradeKey.startsWith("R") ? (gradeKey as RotorGrade) : null,
      rotorAssessable: gradeKey.startsWith("R"),
      gradeKey,
      gradeLabel: gradeLabel(r.rotor_grade, assessable, has),
      sidebandDb: num(r.sideband_db),
      loadPct: num(r.load_pct),
      vibrationRms: num(r.vibration_rms),
      vibrationZone: r.vibration_zone ?? null,
      openInspections: r.open ?? 0,
      overdueInspections: r.overdue ?? 0,
    };
  });
  motors.sort(worstFirst);

  const overdueBySite = new Map<number, number>();
  for (const o of overdueRows) overdueBySite.set(o.site_id, (overdueBySite.get(o.site_id) ?? 0) + 1);

  const count = (ms: FleetMotor[]) => {
    const grades = emptyGrades();
    const zones = emptyZones();
    for (const m of ms) {
      grades[m.gradeKey]++;
      zones[(m.vibrationZone && (ZONES as readonly string[]).includes(m.vibrationZone) ? m.vibrationZone : "none") as keyof ZoneCounts]++;
    }
    return { motors: ms.length, grades, zones };
  };

  const siteOut: FleetSite[] = sites.map((s) => ({
    id: s.id,
    code: s.code,
    name: s.name,
    timezone: s.timezone,
    today: s.today,
    ...count(motors.filter((m) => m.siteId === s.id)),
    overdueInspections: overdueBySite.get(s.id) ?? 0,
    areas: areas.filter((a) => a.site_id === s.id).map((a) => ({ id: a.id, name: a.name, ...count(motors.filter((m) => m.areaId === a.id)) })),
  }));

  const loads = motors.filter((m) => m.loadPct !== null);
  return {
    generatedAt: now.toISOString(),
    siteId: opts.siteId ?? null,
    totals: { ...count(motors), overdueInspections: overdueRows.length },
    sites: siteOut,
    worst: motors.filter((m) => m.gradeKey.startsWith("R") || zoneRank(m.vibrationZone) >= 2).slice(0, 10),
    changes: [...rotorChangeRows.map((c) => changeOut(c, "rotor")), ...zoneChangeRows.map((c) => changeOut(c, "vibration"))].sort(changeOrder),
    load: {
      binPct: LOAD_BIN_PCT,
      underPct: UNDERLOAD_PCT,
      overPct: OVERLOAD_PCT,
      bins: loadHistogram(loads.map((m) => m.loadPct!)),
      withoutLoad: motors.length - loads.length,
      under: loads.filter((m) => m.loadPct! < UNDERLOAD_PCT).sort((a, b) => a.loadPct! - b.loadPct!),
      over: loads.filter((m) => m.loadPct! > OVERLOAD_PCT).sort((a, b) => b.loadPct! - a.loadPct!),
    },
    overdue: {
      count: overdueRows.length,
      items: overdueRows.map((o) => ({
        id: o.id,
        title: o.title,
        dueDate: o.due_date,
        daysOverdue: o.days_overdue,
        status: o.status,
        priority: o.priority,
        assetId: o.asset_id,
        assetTag: o.tag,
        siteName: o.site_name,
        assigneeName: o.assignee_name ?? null,
      })),
    },
    motors,
  };
}
