// The priority rule: how urgent an inspection is, from how bad the motor's condition is and how much the
// plant depends on it. Planners may override it; this is the suggestion used when they do not.
//
// Condition class = the worse of the rotor grade and the vibration zone:
//   severe     R5 Severe  or zone D
//   serious    R4 Serious or zone C
//   developing R3 Developing or zone B
//   minor      R1 Sound, R2 Watch, zone A, not assessable, no data
//
//   condition \ criticality |  high   | medium | low
//   ------------------------+---------+--------+--------
//   severe                  | urgent  | urgent | high
//   serious                 | urgent  | high   | normal
//   developing              | high    | normal | low
//   minor                   | normal  | low    | low
//
// Why zone B counts as "developing": a finding is only raised when the zone got worse, and a motor leaving
// zone A for B under the same load is worth a look at the next round, not an emergency.

export const PRIORITIES = ["urgent", "high", "normal", "low"] as const;
export type Priority = (typeof PRIORITIES)[number];
export const CRITICALITIES = ["high", "medium", "low"] as const;
export type Criticality = (typeof CRITICALITIES)[number];
export type ConditionClass = "severe" | "serious" | "developing" | "minor";

/** Sort rank: lower is more urgent. */
export const PRIORITY_RANK: Record<Priority, number> = { urgent: 0, high: 1, normal: 2, low: 3 };

export const PRIORITY_TABLE: Record<ConditionClass, Record<Criticality, Priority>> = {
  severe: { high: "urgent", medium: "urgent", low: "high" },
  serious: { high: "urgent", medium: "high", low: "normal" },
  developing: { high: "high", medium: "normal", low: "low" },
  minor: { high: "normal", medium: "low", low: "low" },
};

const CLASS_ORDER: ConditionClass[] = ["minor", "developing", "serious", "severe"];

function gradeClass(grade: string | null | undefined): ConditionClass {
  switch (grade) {
    case "R5":
      return "severe";
    case "R4":
      return "serious";
    case "R3":
      return "developing";
    default:
      return "minor";
  }
}

function zoneClass(zone: string | null | undefined): ConditionClass {
  switch (zone) {
    case "D":
      return "severe";
    case "C":
      return "serious";
    case "B":
      return "developing";
    default:
      return "minor";
  }
}

/** The worse of rotor grade and vibration zone (either may be missing). */
export function conditionClass(grade: string | null | undefined, zone: string | null | undefined): ConditionClass {
  const g = CLASS_ORDER.indexOf(gradeClass(grade));
  const z = CLASS_ORDER.indexOf(zoneClass(zone));
  return CLASS_ORDER[Math.max(g, z)];
}

export function isCriticality(v: unknown): v is Criticality {
  return typeof v === "string" && (CRITICALITIES as readonly string[]).includes(v);
}

/** Suggested priority; an unknown criticality is treated as medium (the column's default). */
export function computePriority(input: { grade?: string | null; zone?: string | null; criticality?: string | null }): Priority {
  const crit: Criticality = isCriticality(input.criticality) ? input.criticality : "medium";
  return PRIORITY_TABLE[conditionClass(input.grade, input.zone)][crit];
}
