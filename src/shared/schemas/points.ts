// Measurement points of a motor: the request bodies of POST /api/assets/:id/points and PATCH /api/points/:id, as the
// motor page's point form sends them. A point is where a sensor goes: a current phase (through a CT), a vibration
// axis (an accelerometer), or a voltage phase.
import { z } from "zod";

export const POINT_KINDS = ["current", "vibration", "voltage"] as const;
export type PointKind = (typeof POINT_KINDS)[number];

/** The unit a point gets when none is sent. */
export const DEFAULT_POINT_UNIT: Record<PointKind, string> = { current: "A", vibration: "mm/s", voltage: "V" };

export const pointFields = {
  name: z.string({ message: "Give the point a name" }).trim().min(1, "Give the point a name").max(100, "Keep the name to 100 characters"),
  kind: z.enum(POINT_KINDS, { message: "current, vibration or voltage" }),
  /** Phase A/B/C of a current or voltage point, axis H/V/A (horizontal, vertical, axial) of a vibration point. */
  position: z.string({ message: "A phase (A, B, C) or an axis (H, V, A)" }).trim().max(10, "At most 10 characters: a phase (A, B, C) or an axis (H, V, A)").nullable().optional(),
  ctRatio: z
    .number({ message: "Give the CT ratio as a number, e.g. 100 for a 100:1 (500/5 A) transformer" })
    .finite("Give the CT ratio as a number, e.g. 100 for a 100:1 (500/5 A) transformer")
    .gt(0, "The CT ratio must be above 0")
    .nullable()
    .optional(),
  sensitivity: z
    .number({ message: "Give the sensor's sensitivity in mV per unit, e.g. 100" })
    .finite("Give the sensor's sensitivity in mV per unit, e.g. 100")
    .gt(0, "The sensitivity must be above 0 mV per unit")
    .nullable()
    .optional(),
  unit: z.string({ message: "Give the unit, e.g. A or mm/s" }).trim().min(1, "Give the unit, e.g. A or mm/s").max(10, "At most 10 characters").optional(),
};

export const pointBody = z.object(pointFields);
export type PointBody = z.output<typeof pointBody>;

/** An edit: any of the fields; one left out stays as stored, null clears position, CT ratio or sensitivity. */
export const pointPatchBody = pointBody.partial().strict();
export type PointPatchBody = z.output<typeof pointPatchBody>;
