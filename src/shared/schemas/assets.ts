// Motors (assets): the request bodies of POST /api/assets and PATCH /api/assets/:id (nameplate and all), as the
// register import, the motor register's "Add motor" form, the motor page's "Edit motor" and "Move to another area"
// forms send them. Messages are the ones a technician sees under a field.
import { z } from "zod";
import { bearingsBody } from "./bearings.ts";

export const DRIVEN_EQUIPMENT = ["pump", "fan", "compressor", "conveyor", "mixer", "crusher", "blower", "mill", "other"] as const;
export const CRITICALITIES = ["low", "medium", "high"] as const;
/** NEMA MG 1 design letters of cage motors: the motor model's starting estimate depends on it. */
export const DESIGN_LETTERS = ["A", "B", "C", "D"] as const;
export const CONNECTIONS = ["star", "delta"] as const;
/** ISO 20816-3: machine group 1 (large, above 300 kW) or 2 (medium, 15–300 kW) and the support class. */
export const MACHINE_GROUPS = [1, 2] as const;
export const SUPPORTS = ["rigid", "flexible"] as const;

export const assetAreaId = z.number({ message: "Choose an area" }).int("Choose an area").positive("Choose an area");

/** A positive reading of the nameplate, or null / left out when not given. */
const optionalPositive = (what: string, unit: string) =>
  z
    .number({ message: `Give the ${what} as a number in ${unit}` })
    .finite(`Give the ${what} as a number in ${unit}`)
    .gt(0, `The ${what} must be above 0 ${unit}`)
    .nullable()
    .optional();
const optionalCount = (what: string) =>
  z
    .number({ message: `Give the number of ${what} as a whole number` })
    .int(`The number of ${what} is a whole number`)
    .positive(`The number of ${what} must be at least 1`)
    .max(1000, `The number of ${what} is at most 1000`)
    .nullable()
    .optional();
const POLES = "The number of poles is an even whole number (2, 4, 6, …)";

/**
 * Every field of a motor as the API spells it, each on its own and without defaults (an edit leaves out what it
 * does not change). The nameplate fields are the ones the engine reads (NAMEPLATE_FIELDS).
 */
export const assetFields = {
  tag: z.string({ message: "Give the motor a tag" }).trim().min(1, "Give the motor a tag").max(60, "Keep the tag to 60 characters"),
  name: z.string({ message: "Give the motor a name" }).trim().min(1, "Give the motor a name").max(200, "Keep the name to 200 characters"),
  areaId: assetAreaId,
  drivenEquipment: z.enum(DRIVEN_EQUIPMENT, { message: `One of: ${DRIVEN_EQUIPMENT.join(", ")}` }),
  criticality: z.enum(CRITICALITIES, { message: "One of: low, medium, high" }),
  ratedKw: optionalPositive("rated power", "kW"),
  ratedVoltage: optionalPositive("rated voltage", "V"),
  ratedCurrent: optionalPositive("rated current", "A"),
  ratedHz: z
    .number({ message: "Give the rated frequency in Hz (50 or 60 on most nameplates)" })
    .finite("Give the rated frequency in Hz (50 or 60 on most nameplates)")
    .gt(0, "The rated frequency must be above 0 Hz")
    .max(400, "The rated frequency is at most 400 Hz"),
  ratedRpm: z
    .number({ message: "Give the full-load speed in rpm, as on the nameplate" })
    .finite("Give the full-load speed in rpm, as on the nameplate")
    .gt(0, "The full-load speed must be above 0 rpm")
    .max(100_000, "The full-load speed is at most 100 000 rpm"),
  poles: z
    .number({ message: POLES })
    .int(POLES)
    .min(2, POLES)
    .max(120, "At most 120 poles")
    .refine((p) => p % 2 === 0, "Poles must be an even number (2, 4, 6, …)"),
  rotorBars: optionalCount("rotor bars"),
  statorSlots: optionalCount("stator slots"),
  designLetter: z
    .string({ message: "NEMA design letter A, B, C or D" })
    .trim()
    .toUpperCase()
    .pipe(z.enum(DESIGN_LETTERS, { message: "NEMA design letter A, B, C or D" }))
    .nullable()
    .optional(),
  efficiencyClass: z.string({ message: "An efficiency class such as IE3" }).trim().max(10, "At most 10 characters (e.g. IE3)").nullable().optional(),
  efficiencyPct: z
    .number({ message: "Give the efficiency in %" })
    .finite("Give the efficiency in %")
    .gt(0, "The efficiency must be above 0 %")
    .max(100, "The efficiency is at most 100 %")
    .nullable()
    .optional(),
  powerFactor: z
    .number({ message: "Give the power factor cos φ, e.g. 0.86" })
    .finite("Give the power factor cos φ, e.g. 0.86")
    .gt(0, "The power factor is above 0 and at most 1 (e.g. 0.86)")
    .max(1, "The power factor is above 0 and at most 1 (e.g. 0.86)")
    .nullable()
    .optional(),
  connection: z.enum(CONNECTIONS, { message: "star or delta" }).nullable().optional(),
  driveFed: z.boolean({ message: "Yes or no: is the motor fed by a variable-frequency drive?" }),
  machineGroup: z.union([z.literal(1), z.literal(2)], { message: "1 (large, above 300 kW) or 2 (medium, 15–300 kW)" }),
  support: z.enum(SUPPORTS, { message: "rigid or flexible" }),
  /** Rolling bearings { de, nde } (./bearings.ts); versioned with the nameplate. */
  bearings: bearingsBody.nullable().optional(),
};

/** What a new motor gets for a field left out. */
export const ASSET_DEFAULTS = { drivenEquipment: "pump", criticality: "medium", ratedHz: 50, driveFed: false, machineGroup: 2, support: "rigid" } as const;

/** POST /api/assets (and a new motor in the register import): tag, name, area, full-load speed and poles required. */
export const assetBody = z
  .object({
    ...assetFields,
    drivenEquipment: assetFields.drivenEquipment.default(ASSET_DEFAULTS.drivenEquipment),
    criticality: assetFields.criticality.default(ASSET_DEFAULTS.criticality),
    ratedHz: assetFields.ratedHz.default(ASSET_DEFAULTS.ratedHz),
    driveFed: assetFields.driveFed.default(ASSET_DEFAULTS.driveFed),
    machineGroup: assetFields.machineGroup.default(ASSET_DEFAULTS.machineGroup),
    support: assetFields.support.default(ASSET_DEFAULTS.support),
  })
  .superRefine(checkSpeed);
export type AssetBody = z.output<typeof assetBody>;

/**
 * PATCH /api/assets/:id (and an existing motor in the register import): any of the fields; one left out stays as
 * stored (no defaults here, or renaming a 60 Hz motor would set it to 50 Hz), null clears an optional one. The
 * route checks the full-load speed against the stored poles and frequency (speedProblem).
 */
export const assetPatchBody = z.object(assetFields).partial().strict();
export type AssetPatchBody = z.output<typeof assetPatchBody>;

/** Changing any of these changes what the engine computes: the nameplate version goes up. */
export const NAMEPLATE_FIELDS = [
  "ratedKw", "ratedVoltage", "ratedCurrent", "ratedHz", "ratedRpm", "poles", "rotorBars", "statorSlots", "designLetter",
  "efficiencyClass", "efficiencyPct", "powerFactor", "connection", "driveFed", "machineGroup", "support",
] as const;
export type NameplateField = (typeof NAMEPLATE_FIELDS)[number];

/** An induction motor's full-load speed is below the synchronous speed 120·f/p; the message when it is not. */
export function speedProblem(a: { ratedRpm?: number | null; ratedHz?: number | null; poles?: number | null }): string | null {
  if (typeof a.ratedRpm !== "number" || typeof a.poles !== "number" || !(a.poles > 0)) return null;
  const hz = a.ratedHz ?? ASSET_DEFAULTS.ratedHz;
  const sync = (120 * hz) / a.poles;
  return a.ratedRpm >= sync ? `Full-load speed must be below the synchronous ${Math.round(sync)} rpm of a ${a.poles}-pole motor at ${hz} Hz` : null;
}

/** speedProblem as a zod refinement, on the ratedRpm field. */
export function checkSpeed(a: { ratedRpm?: number | null; ratedHz?: number | null; poles?: number | null }, ctx: z.RefinementCtx) {
  const problem = speedProblem(a);
  if (problem) ctx.addIssue({ code: "custom", path: ["ratedRpm"], message: problem });
}

/** Moving a motor: its new area (on this site or another). Its captures, analyses and findings go with it. */
export const moveMotorBody = z.object({ areaId: assetAreaId });
export type MoveMotorBody = z.output<typeof moveMotorBody>;
