// The motor-model calculator: the request bodies of POST /api/motor-model/evaluate, /estimate and /from-tests.
// All numbers are JSON numbers here; the calculator form turns its text inputs into numbers before these rules.
import { z } from "zod";

const capitalised = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);
/** A number, with "Enter …" when it is missing and "… must be a number" when it is something else. */
const num = (what: string) => z.number({ error: (iss) => (iss.input === undefined ? `Enter ${what}.` : `${capitalised(what)} must be a number.`) });

const positive = (what: string, unit = "") => num(what).positive(`Must be above 0${unit ? ` ${unit}` : ""}.`);
const nonNegative = (what: string, unit = "") => num(what).nonnegative(`Must be ≥ 0${unit ? ` ${unit}` : ""}.`);
export const poles = num("the poles")
  .int("Whole number.")
  .min(2, "At least 2.")
  .max(120, "At most 120.")
  .refine((p) => p % 2 === 0, "Poles come in pairs: an even number.");
export const connection = z.enum(["star", "delta"], { message: "Pick star or delta." });
export const designLetter = z.enum(["A", "B", "C", "D", "wound"], { message: "A, B, C, D or wound" });

/** The per-phase equivalent circuit, referred to the stator. */
export const circuitFields = {
  r1: nonNegative("R1", "Ω"),
  x1: nonNegative("X1", "Ω"),
  r2: positive("R2", "Ω"),
  x2: nonNegative("X2", "Ω"),
  xm: positive("Xm", "Ω"),
  rc: positive("Rc", "Ω").nullable().optional(),
  /** Rotor resistance and reactance at standstill, for a cage rotor whose bars crowd current when starting. */
  rotorLockedR2: positive("R2 at standstill", "Ω").nullable().optional(),
  rotorLockedX2: nonNegative("X2 at standstill", "Ω").nullable().optional(),
};

export const evaluateFields = {
  lineVoltage: positive("the line voltage", "V"),
  frequencyHz: positive("the frequency", "Hz"),
  poles,
  connection,
  rotationalLossW: nonNegative("the rotational losses", "W").optional(),
  /** 1 = standstill, 0 = synchronous; plugging (up to 2) and generating (down to −1) are allowed. */
  slip: num("the slip").min(-1, "At least −1.").max(2, "At most 2.").optional(),
  measuredCurrentA: positive("the measured current", "A").optional(),
  points: num("the number of points").int("Whole number.").min(2, "At least 2.").max(2000, "At most 2000.").optional(),
};

/** POST /evaluate with the circuit constants beside the rest (what the calculator sends). */
export const flatEvaluateBody = z.object({ ...evaluateFields, ...circuitFields });
/** POST /evaluate with the circuit constants under `params`. */
export const nestedEvaluateBody = z.object({ ...evaluateFields, params: z.object(circuitFields) });

export const nameplateBody = z.object({
  ratedKw: positive("the rated power", "kW"),
  ratedVoltage: positive("the rated voltage", "V"),
  ratedCurrent: positive("the rated current", "A"),
  ratedHz: positive("the rated frequency", "Hz").optional(),
  poles,
  ratedRpm: positive("the rated speed", "rpm"),
  efficiency: num("the efficiency").gt(0, "Must be above 0 %.").max(100, "At most 100 %.").optional(),
  powerFactor: num("the power factor").gt(0, "Must be above 0.").max(1, "At most 1.").optional(),
  designLetter: designLetter.optional(),
  connection: connection.optional(),
});

/** One test reading: line voltage, line current, total three-phase input power and frequency. */
export const readingFields = { V: positive("the voltage", "V"), I: positive("the current", "A"), P: nonNegative("the power", "W"), f: positive("the frequency", "Hz") };
const reading = z.object(readingFields);
export const fromTestsBody = z.object({
  noLoad: reading,
  lockedRotor: reading,
  statorResistanceDc: positive("the DC stator resistance", "Ω").optional(),
  designLetter,
  connection: connection.optional(),
  refine: z.boolean({ message: "refine is true or false" }).optional(),
});

// ---- A motor's measured model: PUT /api/assets/:id/motor-model -------------------------------------------------
// Either the circuit values themselves (from a test report or the manufacturer), or the no-load and locked-rotor
// readings they are computed from (the same computation as /from-tests). The voltage, frequency and poles the model
// runs at are the motor's nameplate; the connection is the one the per-phase values refer to.

/** The six circuit values and the rotational losses, as entered. */
export const measuredCircuitFields = {
  r1: circuitFields.r1,
  x1: circuitFields.x1,
  r2: circuitFields.r2,
  x2: circuitFields.x2,
  xm: circuitFields.xm,
  /** Empty: the core loss is inside the rotational losses. */
  rc: circuitFields.rc,
  rotationalLossW: nonNegative("the rotational losses", "W"),
  connection: connection.optional(),
};
export const measuredCircuitBody = z.object({ method: z.literal("circuit"), ...measuredCircuitFields }).strict();

/** The no-load and locked-rotor test readings, as in POST /motor-model/from-tests. */
export const measuredTestsFields = {
  noLoad: reading.strict(),
  lockedRotor: reading.strict(),
  statorResistanceDc: positive("the DC stator resistance", "Ω").optional(),
  designLetter,
  connection: connection.optional(),
  refine: z.boolean({ message: "refine is true or false" }).optional(),
};
export const measuredTestsBody = z.object({ method: z.literal("tests"), ...measuredTestsFields }).strict();

export const MEASURED_METHODS = ["circuit", "tests"] as const;
export const assetMotorModelBody = z.discriminatedUnion("method", [measuredCircuitBody, measuredTestsBody], {
  error: (iss) => (iss.code === "invalid_union" ? "Say how the values were found: circuit (the values themselves) or tests (no-load and locked-rotor readings)." : undefined),
});
export type AssetMotorModelBody = z.infer<typeof assetMotorModelBody>;
