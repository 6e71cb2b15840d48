// Tells channel kind, phase/axis and unit from a CSV column header such as "Ia", "IA [A]", "acc_x",
// "accel (g)", "vel_h [mm/s]", "U1" or "Time [s]".

import type { ChannelKind } from "../types.ts";

export interface ColumnMeaning {
  /** Header text without the unit part, trimmed; e.g. "IA" for "IA [A]". */
  name: string;
  kind: ChannelKind;
  position?: string;
  unit: string;
  /** True when the phase came from a bare trailing "a"/"A" token (e.g. "current_A"), which may mean amperes. */
  positionAmbiguous?: boolean;
}

export interface TimeColumnInfo {
  /** Factor from the column's unit to seconds. */
  toSeconds: number;
}

const PHASES: Record<string, string> = {
  a: "A", b: "B", c: "C", "1": "A", "2": "B", "3": "C", l1: "A", l2: "B", l3: "C",
  r: "A", s: "B", t: "C", u: "A", v: "B", w: "C",
};
const LINE_PAIRS: Record<string, string> = { ab: "AB", bc: "BC", ca: "CA", "12": "AB", "23": "BC", "31": "CA", uv: "AB", vw: "BC", wu: "CA" };
const AXES: Record<string, string> = { h: "H", v: "V", a: "A", x: "x", y: "y", z: "z", hor: "H", vert: "V", ax: "A", axial: "A", horizontal: "H", vertical: "V", r: "H" };

/** Splits "IA [A]" / "accel (g)" / "current_A" into a base name and an explicit unit (if bracketed). */
export function splitUnit(header: string): { base: string; unit?: string } {
  const text = header.trim();
  const match = /^(.*?)[\s_]*[[(]\s*([^\])]*?)\s*[\])]\s*$/.exec(text);
  if (match && match[1].trim() !== "") return { base: match[1].trim(), unit: normaliseUnit(match[2]) };
  return { base: text };
}

export function normaliseUnit(unit: string): string {
  const u = unit.trim().replace(/\s+/g, "");
  const lower = u.toLowerCase();
  if (/^m\/s(2|²|\^2|\*\*2)$|^m\/s\/s$|^ms-2$|^ms\^-2$/.test(lower)) return "m/s2";
  if (lower === "mm/s" || lower === "mms-1") return "mm/s";
  if (lower === "in/s" || lower === "ips") return "in/s";
  if (lower === "g" || lower === "gs") return "g";
  if (lower === "a" || lower === "amp" || lower === "amps") return "A";
  if (lower === "v" || lower === "volt" || lower === "volts") return "V";
  if (lower === "kv") return "kV";
  if (lower === "ma") return "mA";
  if (lower === "µs" || lower === "μs" || lower === "us") return "us";
  return u;
}

function tokens(base: string): string[] {
  return base
    .toLowerCase()
    .split(/[\s_\-.:/]+/)
    .filter((t) => t !== "");
}

const TIME_NAMES = new Set(["t", "time", "times", "seconds", "second", "sec", "secs", "s", "timestamp", "elapsed", "zeit", "temps", "tiempo"]);
const TIME_UNITS: Record<string, number> = { s: 1, sec: 1, secs: 1, seconds: 1, ms: 1e-3, us: 1e-6, "µs": 1e-6, "μs": 1e-6, ns: 1e-9 };

/** Recognises a time column header ("t", "time", "time_s", "seconds", "Time [s]", "t_ms", "time (ms)"). */
export function timeColumnInfo(header: string): TimeColumnInfo | null {
  const { base, unit } = splitUnit(header);
  const parts = tokens(base);
  if (parts.length === 0 || !TIME_NAMES.has(parts[0])) return null;
  let unitText = unit;
  if (parts.length === 2) unitText ??= parts[1];
  else if (parts.length > 2) return null;
  if (unitText === undefined) return { toSeconds: 1 };
  const factor = TIME_UNITS[unitText.toLowerCase()];
  return factor === undefined ? null : { toSeconds: factor };
}

const CURRENT_WORDS = new Set(["current", "currents", "curr", "amps", "amp", "ampere", "amperes", "strom", "courant", "corriente"]);
const VOLTAGE_WORDS = new Set(["voltage", "volt", "volts", "spannung", "tension", "tensione"]);
const ACCEL_WORDS = new Set(["acc", "accel", "acceleration", "accelerometer", "vib", "vibration", "vibr"]);
const VELOCITY_WORDS = new Set(["vel", "velocity"]);
const UNIT_KIND: Record<string, ChannelKind> = { A: "current", mA: "current", V: "voltage", kV: "voltage", g: "vibration", "m/s2": "vibration", "mm/s": "vibration", "in/s": "vibration" };

/** Classifies one column header. */
export function classifyColumn(header: string): ColumnMeaning {
  const { base, unit } = splitUnit(header);
  const name = base === "" ? header.trim() : base;
  const parts = tokens(base);
  const first = parts[0] ?? "";
  const rest = parts.slice(1);
  let kind: ChannelKind = "other";
  let position: string | undefined;
  let positionAmbiguous = false;
  let velocity = false;

  const phaseFrom = (tok: string | undefined): string | undefined => (tok === undefined ? undefined : PHASES[tok]);
  const axisFrom = (tok: string | undefined): string | undefined => (tok === undefined ? undefined : AXES[tok]);

  let m: RegExpExecArray | null;
  if ((m = /^i(a|b|c|1|2|3|r|s|t|u|v|w|l1|l2|l3)?$/.exec(first))) {
    kind = "current";
    position = m[1] !== undefined ? PHASES[m[1]] : phaseFrom(rest[0]);
  } else if (CURRENT_WORDS.has(first) || parts.some((p) => CURRENT_WORDS.has(p))) {
    kind = "current";
    const tok = rest.find((p) => PHASES[p] !== undefined);
    position = phaseFrom(tok);
    positionAmbiguous = tok === "a";
  } else if ((m = /^(acc|accel|a|vib)(x|y|z|h|v)?$/.exec(first)) && (m[1] !== "a" || m[2] !== undefined || axisFrom(rest[0]) !== undefined)) {
    // "a" alone is too vague; "a_h", "ax", "acc_x", "vibh" are vibration.
    kind = "vibration";
    position = m[2] !== undefined ? AXES[m[2]] : axisFrom(rest[0]);
  } else if (ACCEL_WORDS.has(first) || parts.some((p) => ACCEL_WORDS.has(p))) {
    kind = "vibration";
    position = axisFrom(rest.find((p) => AXES[p] !== undefined));
  } else if (VELOCITY_WORDS.has(first) || (first === "v" && rest.length > 0 && ["h", "x", "y", "z", "hor", "vert", "axial"].includes(rest[0]))) {
    kind = "vibration";
    velocity = true;
    position = axisFrom(rest.find((p) => AXES[p] !== undefined));
  } else if ((m = /^(v|u)(a|b|c|1|2|3|ab|bc|ca|12|23|31|uv|vw|wu|l1|l2|l3)?$/.exec(first))) {
    kind = "voltage";
    const tok = m[2] ?? rest[0];
    position = tok === undefined ? undefined : (LINE_PAIRS[tok] ?? PHASES[tok]);
  } else if (VOLTAGE_WORDS.has(first) || parts.some((p) => VOLTAGE_WORDS.has(p))) {
    kind = "voltage";
    const tok = rest.find((p) => PHASES[p] !== undefined || LINE_PAIRS[p] !== undefined);
    position = tok === undefined ? undefined : (LINE_PAIRS[tok] ?? PHASES[tok]);
  }

  // A unit in brackets decides the kind of an otherwise unknown column, and always overrides the default unit.
  if (kind === "other" && unit !== undefined && UNIT_KIND[unit] !== undefined) kind = UNIT_KIND[unit];
  let resolvedUnit = unit ?? defaultUnit(kind, velocity);
  if (kind === "vibration" && unit === undefined && parts.some((p) => p === "g")) resolvedUnit = "g";
  if (kind === "vibration" && unit === undefined && (/mm\/s/i.test(base) || parts.includes("mms"))) resolvedUnit = "mm/s";

  const meaning: ColumnMeaning = { name, kind, unit: resolvedUnit };
  if (position !== undefined) meaning.position = position;
  if (positionAmbiguous) meaning.positionAmbiguous = true;
  return meaning;
}

function defaultUnit(kind: ChannelKind, velocity: boolean): string {
  switch (kind) {
    case "current":
      return "A";
    case "voltage":
      return "V";
    case "vibration":
      return velocity ? "mm/s" : "m/s2";
    default:
      return "";
  }
}

/**
 * Classifies all data columns together: a bare "_A" suffix ("current_A") is taken as phase A only when
 * another current column of the file names phase B or C; otherwise it reads as the unit (amperes).
 */
export function classifyColumns(headers: string[]): ColumnMeaning[] {
  const meanings = headers.map(classifyColumn);
  const otherPhases = meanings.some((m) => m.kind === "current" && (m.position === "B" || m.position === "C"));
  for (const m of meanings) {
    if (m.positionAmbiguous) {
      if (!otherPhases) delete m.position;
      delete m.positionAmbiguous;
    }
  }
  return meanings;
}
