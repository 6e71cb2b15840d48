// Rolling bearings of a motor (drive end, non-drive end), as POST/PATCH /api/assets, the register import and the
// motor page's bearing form send them. Each end is optional, and so is each of its fields; the defect frequencies
// (src/engine/bearings.ts) need Nb, d and D together, so those three come as a set. The contact angle defaults to 0°
// (deep-groove ball bearing).
import { z } from "zod";

const optionalNumber = (rule: z.ZodNumber) => rule.nullable().optional();

/** The fields of one bearing, each on its own (the motor page's form wraps them for its inputs). */
export const bearingFields = {
  designation: z.string().trim().max(60, "At most 60 characters (e.g. 6316 C3)").nullable().optional(),
  rollingElements: optionalNumber(
    z
      .number({ message: "Give the number of rolling elements as a whole number from 3 to 60" })
      .int("The number of rolling elements is a whole number from 3 to 60")
      .min(3, "The number of rolling elements is a whole number from 3 to 60")
      .max(60, "The number of rolling elements is a whole number from 3 to 60"),
  ),
  elementDiameterMm: optionalNumber(
    z.number({ message: "Give the rolling-element diameter d in mm" }).gt(0, "The rolling-element diameter d must be above 0 mm").max(500, "The rolling-element diameter d is at most 500 mm"),
  ),
  pitchDiameterMm: optionalNumber(
    z.number({ message: "Give the pitch diameter D in mm" }).gt(0, "The pitch diameter D must be above 0 mm").max(5000, "The pitch diameter D is at most 5000 mm"),
  ),
  contactAngleDeg: optionalNumber(
    z.number({ message: "Give the contact angle in degrees, from 0 up to (not including) 90" }).min(0, "The contact angle is from 0° up to (not including) 90°").lt(90, "The contact angle is from 0° up to (not including) 90°"),
  ),
};

/** One bearing's designation and geometry, as POST/PATCH /api/assets and the register import send it. */
export const bearingBody = z
  .object(bearingFields)
  .strict()
  .superRefine((b, ctx) => checkBearingGeometry(b, ctx));
export type BearingBody = z.output<typeof bearingBody>;

/** Both ends; an end left out is kept as stored, null clears it, an object replaces it as a whole. */
export const bearingsBody = z.object({ de: bearingBody.nullable().optional(), nde: bearingBody.nullable().optional() }, { message: "Give the bearings as { de, nde }" }).strict();
export type BearingsBody = z.output<typeof bearingsBody>;

const GEOMETRY = [
  ["rollingElements", "the number of rolling elements Nb"],
  ["elementDiameterMm", "the rolling-element diameter d"],
  ["pitchDiameterMm", "the pitch diameter D"],
] as const;

/**
 * Rules across the fields of one bearing: Nb, d and D come together (with a contact angle too), 0 < d < D, and the
 * Nb elements fit round the pitch circle: the distance between neighbouring centres, D·sin(180°/Nb), is at least d.
 */
export function checkBearingGeometry(
  b: Partial<Record<"rollingElements" | "elementDiameterMm" | "pitchDiameterMm" | "contactAngleDeg", number | null>>,
  ctx: z.RefinementCtx,
  /** Prefix of the issue paths, e.g. "de." for a form whose fields are named "de.pitchDiameterMm". */
  pathPrefix = "",
) {
  const at = (k: string) => [`${pathPrefix}${k}`];
  const given = GEOMETRY.filter(([k]) => b[k] !== null && b[k] !== undefined);
  const angle = b.contactAngleDeg !== null && b.contactAngleDeg !== undefined;
  if ((given.length > 0 || angle) && given.length < GEOMETRY.length) {
    for (const [k, name] of GEOMETRY)
      if (b[k] === null || b[k] === undefined) ctx.addIssue({ code: "custom", path: at(k), message: `Give ${name} too: the defect frequencies need Nb, d and D together` });
    return;
  }
  const { rollingElements: nb, elementDiameterMm: d, pitchDiameterMm: D } = b;
  if (typeof nb !== "number" || typeof d !== "number" || typeof D !== "number") return;
  if (d >= D) {
    ctx.addIssue({ code: "custom", path: at("pitchDiameterMm"), message: `The pitch diameter D must be larger than the rolling-element diameter d (${d} mm)` });
    return;
  }
  const room = D * Math.sin(Math.PI / nb);
  if (d > room * (1 + 1e-9))
    ctx.addIssue({ code: "custom", path: at("elementDiameterMm"), message: `${nb} elements of ${d} mm do not fit round a ${D} mm pitch circle: d can be at most D·sin(180°/Nb) = ${room.toFixed(2)} mm` });
}
