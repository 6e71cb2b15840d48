// When an analysis raises a finding: the motor's rotor grade or vibration zone got worse than in its previous
// analysis (or, for a motor's first graded analysis, is already at Watch / zone C or worse).
import { ROTOR_GRADE_NAMES, type RotorGrade } from "../../src/engine/types.ts";

const GRADE_RANK: Record<string, number> = { R1: 1, R2: 2, R3: 3, R4: 4, R5: 5 };
const ZONE_RANK: Record<string, number> = { A: 1, B: 2, C: 3, D: 4 };

export interface Levels {
  rotorGrade: string | null;
  sidebandDb?: number | null;
  loadPct?: number | null;
  vibrationZone: string | null;
  vibrationRms?: number | null;
  takenAt?: Date | string | null;
}

export interface FindingDraft {
  kind: "rotor" | "vibration";
  level: string;
  previousLevel: string | null;
  summary: string;
}

const fmt = (v: number | null | undefined, digits: number) => (v === null || v === undefined ? "?" : v.toFixed(digits));
const day = (d: Date | string | null | undefined) => (d ? new Date(d).toISOString().slice(0, 10) : null);

/**
 * Findings for the current analysis, given the previous graded levels of the same motor (each the most recent
 * earlier analysis that had that reading; null when there is none).
 */
export function decideFindings(current: Levels, previousRotor: Levels | null, previousZone: Levels | null): FindingDraft[] {
  const out: FindingDraft[] = [];
  const g = current.rotorGrade;
  if (g && GRADE_RANK[g] >= 2) {
    const before = previousRotor?.rotorGrade ?? null;
    if (!before || GRADE_RANK[g] > GRADE_RANK[before]) {
      const name = ROTOR_GRADE_NAMES[g as RotorGrade] ?? g;
      const load = current.loadPct !== null && current.loadPct !== undefined ? ` at ${fmt(current.loadPct, 0)} % load` : "";
      const was = before
        ? `, was ${before} ${ROTOR_GRADE_NAMES[before as RotorGrade] ?? ""}`.trimEnd() + (day(previousRotor?.takenAt) ? ` on ${day(previousRotor?.takenAt)}` : "")
        : ", first graded capture of this motor";
      out.push({
        kind: "rotor",
        level: g,
        previousLevel: before,
        summary: `Rotor grade ${g} ${name}: lower sideband ${fmt(current.sidebandDb, 1)} dB below the supply line${load}${was}.`,
      });
    }
  }
  const z = current.vibrationZone;
  if (z && ZONE_RANK[z] >= 3) {
    const before = previousZone?.vibrationZone ?? null;
    if (!before || ZONE_RANK[z] > ZONE_RANK[before]) {
      const was = before ? `, was zone ${before}` + (day(previousZone?.takenAt) ? ` on ${day(previousZone?.takenAt)}` : "") : ", first vibration reading of this motor";
      out.push({
        kind: "vibration",
        level: z,
        previousLevel: before,
        summary: `Vibration zone ${z}: ${fmt(current.vibrationRms, 2)} mm/s RMS${was}.`,
      });
    }
  }
  return out;
}

export const gradeRank = (g: string | null | undefined) => (g ? GRADE_RANK[g] ?? 0 : 0);
export const zoneRank = (z: string | null | undefined) => (z ? ZONE_RANK[z] ?? 0 : 0);
