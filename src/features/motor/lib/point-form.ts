// The measurement-point form on the motor page (admins): the server's point rules (src/shared/schemas/points.ts) on
// inputs and selects. What a point offers depends on its kind: a current point has a phase and a CT ratio, a
// vibration point an axis and the accelerometer's sensitivity, a voltage point a phase.
import { z } from "zod";
import type { MeasurementPoint } from "../../../lib/contracts.ts";
import { numberInput, optionalInput } from "../../../lib/forms.ts";
import { DEFAULT_POINT_UNIT, pointFields, POINT_KINDS, type PointBody, type PointKind } from "../../../shared/schemas/points.ts";

export type PointFormValues = { name: string; kind: string; position: string; ctRatio: string; sensitivity: string; unit: string };

export const POINT_KIND_LABEL: Record<PointKind, string> = { current: "Current (CT)", vibration: "Vibration (accelerometer)", voltage: "Voltage" };

/** Phases of a current or voltage point, axes of a vibration point. */
export const POINT_POSITIONS: Record<PointKind, { value: string; label: string }[]> = {
  current: [{ value: "A", label: "Phase A" }, { value: "B", label: "Phase B" }, { value: "C", label: "Phase C" }],
  voltage: [{ value: "A", label: "Phase A" }, { value: "B", label: "Phase B" }, { value: "C", label: "Phase C" }],
  vibration: [{ value: "H", label: "Horizontal (H)" }, { value: "V", label: "Vertical (V)" }, { value: "A", label: "Axial (A)" }],
};

/** Units a point of each kind records in; the first is the server's default. */
export const POINT_UNITS: Record<PointKind, string[]> = {
  current: [DEFAULT_POINT_UNIT.current],
  vibration: [DEFAULT_POINT_UNIT.vibration, "m/s2", "g"],
  voltage: [DEFAULT_POINT_UNIT.voltage],
};

const isKind = (k: string): k is PointKind => (POINT_KINDS as readonly string[]).includes(k);

/** The options of a select, with a stored value outside the usual list kept (so an edit does not lose it). */
export function withStored<T extends { value: string; label: string }>(options: T[], stored: string): { value: string; label: string }[] {
  return stored && !options.some((o) => o.value === stored) ? [...options, { value: stored, label: stored }] : options;
}

/** Starting values: the stored point's, or a new current point on phase A. */
export function pointFormValues(p?: MeasurementPoint | null): PointFormValues {
  if (!p) return { name: "", kind: "current", position: "A", ctRatio: "", sensitivity: "", unit: DEFAULT_POINT_UNIT.current };
  const s = (v: unknown) => (v === null || v === undefined ? "" : String(v));
  return { name: p.name, kind: p.kind, position: s(p.position), ctRatio: s(p.ctRatio), sensitivity: s(p.sensitivity), unit: s(p.unit) };
}

/**
 * The values after the kind changes: a phase stays a phase (current ↔ voltage), but a phase never becomes an axis
 * (phase A is not axial A), so between the two the position moves to the new kind's first; the unit likewise when it
 * does not fit; the CT ratio or sensitivity that no longer applies is emptied (so a hidden input cannot hold an error).
 */
export function withKind(values: PointFormValues, kind: string): PointFormValues {
  if (!isKind(kind)) return { ...values, kind };
  const sameMeaning = isKind(values.kind) && (values.kind === "vibration") === (kind === "vibration");
  const position = sameMeaning && POINT_POSITIONS[kind].some((o) => o.value === values.position) ? values.position : POINT_POSITIONS[kind][0].value;
  const unit = POINT_UNITS[kind].includes(values.unit) ? values.unit : POINT_UNITS[kind][0];
  return { ...values, kind, position, unit, ctRatio: kind === "current" ? values.ctRatio : "", sensitivity: kind === "vibration" ? values.sensitivity : "" };
}

/**
 * The form: each field on its input, then the body POST /assets/:id/points and PATCH /points/:id take. The CT ratio
 * belongs to a current point and the sensitivity to a vibration point; the other is sent as null (cleared).
 */
export const pointFormSchema = z
  .object({
    name: pointFields.name,
    kind: pointFields.kind,
    position: optionalInput(pointFields.position),
    ctRatio: numberInput(pointFields.ctRatio),
    sensitivity: numberInput(pointFields.sensitivity),
    unit: optionalInput(pointFields.unit),
  })
  .transform(
    (p): PointBody => ({
      name: p.name,
      kind: p.kind,
      position: p.position ?? null,
      ctRatio: p.kind === "current" ? (p.ctRatio ?? null) : null,
      sensitivity: p.kind === "vibration" ? (p.sensitivity ?? null) : null,
      unit: p.unit ?? DEFAULT_POINT_UNIT[p.kind],
    }),
  );

/** The unit of an accelerometer's sensitivity: "mV/g", "mV/(m/s2)". */
export const sensitivityUnit = (unit: string | null | undefined) => `mV/${!unit ? "unit" : unit.includes("/") ? `(${unit})` : unit}`;

/** One line about the sensor: "CT 100:1", "100 mV/(m/s2)", or just the unit. */
export function pointSensor(p: Pick<MeasurementPoint, "ctRatio" | "sensitivity" | "unit">): string {
  if (p.ctRatio) return `CT ${p.ctRatio}:1`;
  if (p.sensitivity) return `${p.sensitivity} ${sensitivityUnit(p.unit)}`;
  // Only the unit: the capture is already in engineering units (e.g. a clamp meter's own output in A).
  return p.unit ? `in ${p.unit}` : "";
}
