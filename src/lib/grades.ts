// Rotor grades and vibration zones: one place for names, bands and parsing, used by badges, filters and tests.

export type Grade = 1 | 2 | 3 | 4 | 5;

export const GRADES: { grade: Grade; code: string; name: string; band: string }[] = [
  { grade: 1, code: "R1", name: "Sound", band: "≥ 54 dB" },
  { grade: 2, code: "R2", name: "Watch", band: "48–54 dB" },
  { grade: 3, code: "R3", name: "Developing", band: "42–48 dB" },
  { grade: 4, code: "R4", name: "Serious", band: "36–42 dB" },
  { grade: 5, code: "R5", name: "Severe", band: "< 36 dB" },
];

export const NOT_ASSESSABLE = "Not assessable";

/** 3, "3", "R3", "r3", "developing" → 3; anything else → null. */
export function parseGrade(value: unknown): Grade | null {
  if (typeof value === "number") return Number.isInteger(value) && value >= 1 && value <= 5 ? (value as Grade) : null;
  if (typeof value !== "string") return null;
  const s = value.trim().toLowerCase();
  const m = /^r?([1-5])$/.exec(s);
  if (m) return Number(m[1]) as Grade;
  const byName = GRADES.find((g) => g.name.toLowerCase() === s);
  return byName ? byName.grade : null;
}

export function gradeInfo(grade: Grade) {
  return GRADES[grade - 1];
}

/** The grade for a lower-sideband depth below the supply line, in dB (the bands above). */
export function gradeFromSidebandDb(db: number | null | undefined): Grade | null {
  if (db === null || db === undefined || !Number.isFinite(db)) return null;
  if (db >= 54) return 1;
  if (db >= 48) return 2;
  if (db >= 42) return 3;
  if (db >= 36) return 4;
  return 5;
}

export type Zone = "A" | "B" | "C" | "D";
export const ZONES: { zone: Zone; meaning: string }[] = [
  { zone: "A", meaning: "Zone A: typical of newly commissioned machines" },
  { zone: "B", meaning: "Zone B: acceptable for unrestricted long-term operation" },
  { zone: "C", meaning: "Zone C: not suitable for long-term continuous operation" },
  { zone: "D", meaning: "Zone D: severe enough to cause damage" },
];

export function parseZone(value: unknown): Zone | null {
  if (typeof value !== "string") return null;
  const s = value.trim().toUpperCase().replace(/^ZONE\s*/, "");
  return s === "A" || s === "B" || s === "C" || s === "D" ? s : null;
}
