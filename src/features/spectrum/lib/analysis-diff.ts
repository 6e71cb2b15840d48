// "What changed" between two analyses of one capture (a re-analysis after a nameplate fix keeps the older ones):
// which readings differ at the precision the screen shows them, old → new, and what the analyses were computed
// from (engine version, nameplate version and the nameplate fields that differ). Pure: the panel only renders it.
import type { AnalysisVersion } from "../../../lib/contracts.ts";
import { formatNumber } from "../../../lib/format.ts";
import { parseGrade, parseZone, type Grade, type Zone } from "../../../lib/grades.ts";

export type NumberReading = "sidebandDb" | "loadPct" | "slip" | "rpm" | "supplyHz" | "vibrationRms";

/** How each numeric reading is shown (the digits of the Readings panel); slip is shown in %. */
export const NUMBER_READINGS: { key: NumberReading; label: string; unit: string; digits: number; scale?: number; estimate?: boolean }[] = [
  { key: "sidebandDb", label: "Sideband depth", unit: "dB", digits: 1 },
  { key: "loadPct", label: "Load", unit: "%", digits: 0, estimate: true },
  { key: "slip", label: "Slip", unit: "%", digits: 2, scale: 100 },
  { key: "rpm", label: "Speed", unit: "rpm", digits: 1 },
  { key: "supplyHz", label: "Supply", unit: "Hz", digits: 3 },
  { key: "vibrationRms", label: "Vibration", unit: "mm/s RMS", digits: 2 },
];

export interface NumberChange {
  kind: "number";
  key: NumberReading;
  label: string;
  unit: string;
  digits: number;
  estimate?: boolean;
  /** In the unit shown (slip in %). */
  from: number | null;
  to: number | null;
  /** to − from as shown (both rounded to `digits`); null when either is missing. */
  delta: number | null;
}

export interface GradeSide {
  grade: Grade | null;
  assessable: boolean;
  reason: string | null;
}

/** "worse" when the grade number or zone letter rose, "better" when it fell, null otherwise (e.g. to or from Not assessable). */
export type Direction = "worse" | "better" | null;

export interface GradeChange {
  kind: "grade";
  key: "rotorGrade";
  label: string;
  from: GradeSide;
  to: GradeSide;
  direction: Direction;
}

export interface ZoneChange {
  kind: "zone";
  key: "vibrationZone";
  label: string;
  from: Zone | null;
  to: Zone | null;
  direction: Direction;
}

export type ReadingChange = NumberChange | GradeChange | ZoneChange;

/** Something the analyses were computed from: engine, nameplate version, one nameplate field. Values as shown. */
export interface BasisChange {
  key: string;
  label: string;
  from: string;
  to: string;
}

export interface AnalysisComparison {
  from: { id: number; version: number; createdAt: string };
  to: { id: number; version: number; createdAt: string };
  /** The readings that differ, in the panel's order (rotor grade first). */
  readings: ReadingChange[];
  /** Labels of the readings that are the same in both. */
  unchanged: string[];
  basis: BasisChange[];
}

const rounded = (v: number, digits: number) => Math.round(v * 10 ** digits) / 10 ** digits;
const finite = (v: unknown): number | null => (typeof v === "number" && Number.isFinite(v) ? v : null);

function numberChange(spec: (typeof NUMBER_READINGS)[number], a: AnalysisVersion, b: AnalysisVersion): NumberChange | null {
  const scale = spec.scale ?? 1;
  const from = finite(a[spec.key]) === null ? null : finite(a[spec.key])! * scale;
  const to = finite(b[spec.key]) === null ? null : finite(b[spec.key])! * scale;
  if (formatNumber(from, spec.digits) === formatNumber(to, spec.digits)) return null;
  const delta = from === null || to === null ? null : rounded(rounded(to, spec.digits) - rounded(from, spec.digits), spec.digits);
  return { kind: "number", key: spec.key, label: spec.label, unit: spec.unit, digits: spec.digits, ...(spec.estimate ? { estimate: true } : {}), from, to, delta };
}

export function gradeSide(v: AnalysisVersion): GradeSide {
  const grade = v.rotorAssessable ? parseGrade(v.rotorGrade) : null;
  return { grade, assessable: v.rotorAssessable && grade !== null, reason: v.rotorAssessable ? null : (v.rotorReason ?? null) };
}

function gradeChange(a: AnalysisVersion, b: AnalysisVersion): GradeChange | null {
  const from = gradeSide(a);
  const to = gradeSide(b);
  const same = from.assessable === to.assessable && from.grade === to.grade && (from.assessable || from.reason === to.reason);
  if (same) return null;
  const direction: Direction = from.grade !== null && to.grade !== null && from.grade !== to.grade ? (to.grade > from.grade ? "worse" : "better") : null;
  return { kind: "grade", key: "rotorGrade", label: "Rotor grade", from, to, direction };
}

function zoneChange(a: AnalysisVersion, b: AnalysisVersion): ZoneChange | null {
  const from = parseZone(a.vibrationZone);
  const to = parseZone(b.vibrationZone);
  if (from === to) return null;
  const direction: Direction = from && to ? (to > from ? "worse" : "better") : null;
  return { kind: "zone", key: "vibrationZone", label: "Vibration zone", from, to, direction };
}

// ---- what the analyses were computed from ----

const yesNo = (v: unknown) => (v === true ? "yes" : v === false ? "no" : "—");
const plain = (unit?: string) => (v: unknown) => {
  if (v === null || v === undefined || v === "") return "—";
  if (typeof v === "number") return Number.isFinite(v) ? `${v}${unit ? ` ${unit}` : ""}` : "—";
  return String(v);
};

interface BearingLike {
  position?: unknown;
  designation?: unknown;
  rollingElements?: unknown;
  elementDiameterMm?: unknown;
  pitchDiameterMm?: unknown;
  contactAngleDeg?: unknown;
}

/** "DE 6316 C3: 8 × 22.2 mm on 120 mm, 0°; NDE …", or "—". */
export function bearingsText(v: unknown): string {
  if (!Array.isArray(v) || v.length === 0) return "—";
  return (v as BearingLike[])
    .map((b) => {
      const name = [b.position, b.designation].filter((x) => x !== undefined && x !== null && x !== "").join(" ");
      return `${name}: ${String(b.rollingElements)} × ${String(b.elementDiameterMm)} mm on ${String(b.pitchDiameterMm)} mm, ${String(b.contactAngleDeg ?? 0)}°`;
    })
    .join("; ");
}

/** The nameplate fields the engine gets (server/captures/engine-io.ts nameplateOf), in nameplate order. */
export const NAMEPLATE_FIELDS: { key: string; label: string; show: (v: unknown) => string }[] = [
  { key: "ratedKw", label: "Rated power", show: plain("kW") },
  { key: "ratedVoltage", label: "Rated voltage", show: plain("V") },
  { key: "ratedCurrent", label: "Rated current", show: plain("A") },
  { key: "ratedHz", label: "Rated frequency", show: plain("Hz") },
  { key: "ratedRpm", label: "Full-load speed", show: plain("rpm") },
  { key: "poles", label: "Poles", show: plain() },
  { key: "rotorBars", label: "Rotor bars", show: plain() },
  { key: "statorSlots", label: "Stator slots", show: plain() },
  { key: "machineGroup", label: "Machine group", show: plain() },
  { key: "support", label: "Support", show: plain() },
  { key: "driveFed", label: "Drive-fed", show: yesNo },
  { key: "bearings", label: "Bearings", show: bearingsText },
];

const record = (v: unknown): Record<string, unknown> | null => (v && typeof v === "object" && !Array.isArray(v) ? (v as Record<string, unknown>) : null);

/** The nameplate an analysis used (`params.nameplate`), or null when the row does not say. */
export function nameplateUsed(v: AnalysisVersion): Record<string, unknown> | null {
  return record(record(v.params)?.nameplate);
}

function basisChanges(a: AnalysisVersion, b: AnalysisVersion): BasisChange[] {
  const out: BasisChange[] = [];
  if (a.engineVersion !== b.engineVersion) out.push({ key: "engineVersion", label: "Engine", from: a.engineVersion ?? "—", to: b.engineVersion ?? "—" });
  if (a.nameplateVersion !== b.nameplateVersion)
    out.push({ key: "nameplateVersion", label: "Nameplate version", from: a.nameplateVersion === null ? "—" : `v${a.nameplateVersion}`, to: b.nameplateVersion === null ? "—" : `v${b.nameplateVersion}` });
  const na = nameplateUsed(a);
  const nb = nameplateUsed(b);
  if (!na || !nb) return out;
  const known = new Set(NAMEPLATE_FIELDS.map((f) => f.key));
  const extra = [...new Set([...Object.keys(na), ...Object.keys(nb)])].filter((k) => !known.has(k)).sort();
  const fields = [...NAMEPLATE_FIELDS, ...extra.map((key) => ({ key, label: key, show: (v: unknown) => (v === undefined || v === null ? "—" : typeof v === "object" ? JSON.stringify(v) : String(v)) }))];
  for (const f of fields) {
    const from = f.show(na[f.key]);
    const to = f.show(nb[f.key]);
    if (from !== to) out.push({ key: `nameplate.${f.key}`, label: f.label, from, to });
  }
  return out;
}

/** What differs from analysis `from` (an earlier version) to analysis `to` (usually the current one). */
export function compareAnalyses(from: AnalysisVersion, to: AnalysisVersion): AnalysisComparison {
  const readings: ReadingChange[] = [];
  const unchanged: string[] = [];
  const grade = gradeChange(from, to);
  if (grade) readings.push(grade);
  else unchanged.push("Rotor grade");
  for (const spec of NUMBER_READINGS) {
    const c = numberChange(spec, from, to);
    if (c) readings.push(c);
    else unchanged.push(spec.label);
  }
  const zone = zoneChange(from, to);
  if (zone) readings.push(zone);
  else unchanged.push("Vibration zone");
  return {
    from: { id: from.id, version: from.version, createdAt: from.createdAt },
    to: { id: to.id, version: to.version, createdAt: to.createdAt },
    readings,
    unchanged,
    basis: basisChanges(from, to),
  };
}

/**
 * The current version and the earlier one to compare it with: the chosen one when it is an earlier version of
 * this list, else the newest earlier version. `versions` newest first (as the API answers); null when there is
 * nothing to compare (one version, or none marked current).
 */
export function pickComparison(versions: readonly AnalysisVersion[], chosenId: number | null): { current: AnalysisVersion; earlier: AnalysisVersion[]; chosen: AnalysisVersion } | null {
  const current = versions.find((v) => v.isCurrent);
  if (!current) return null;
  const earlier = versions.filter((v) => v.id !== current.id);
  if (!earlier.length) return null;
  const chosen = earlier.find((v) => v.id === chosenId) ?? earlier[0];
  return { current, earlier, chosen };
}
