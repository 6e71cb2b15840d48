// The motor page's measured-model form (PUT /api/assets/:id/motor-model): either the circuit values themselves or
// the no-load and locked-rotor readings. The rules are the server's (src/shared/schemas/motor-model.ts) wrapped for
// text inputs; the inputs are named by the server's field paths ("noLoad.V"), so its 400 messages land on them.
// Also: the starting values (what was saved, else empty), how a circuit value is written, the note after saving, and
// the label of an operating point that does not fit the model.
import { z } from "zod";
import { numberInput, optionalInput } from "../../../lib/forms.ts";
import { measuredCircuitFields, measuredTestsFields, readingFields, type AssetMotorModelBody } from "../../../shared/schemas/motor-model.ts";

export const READINGS = ["noLoad", "lockedRotor"] as const;
export const READING_FIELDS = ["V", "I", "P", "f"] as const;
export const CIRCUIT_INPUTS = ["r1", "x1", "r2", "x2", "xm", "rc", "rotationalLossW"] as const;
type ReadingKey = `${(typeof READINGS)[number]}.${(typeof READING_FIELDS)[number]}`;

export type MotorModelFormValues = {
  method: "circuit" | "tests";
  /** "" = as on the nameplate (star when it says nothing). */
  connection: string;
  statorResistanceDc: string;
  designLetter: string;
  refine: boolean;
} & Record<(typeof CIRCUIT_INPUTS)[number], string> &
  Record<ReadingKey, string>;

const readingInputs = Object.fromEntries(
  READINGS.flatMap((r) => READING_FIELDS.map((f) => [`${r}.${f}`, numberInput(readingFields[f])])),
) as Record<ReadingKey, ReturnType<typeof numberInput<typeof readingFields.V>>>;

const circuitForm = z.object({
  method: z.literal("circuit"),
  r1: numberInput(measuredCircuitFields.r1),
  x1: numberInput(measuredCircuitFields.x1),
  r2: numberInput(measuredCircuitFields.r2),
  x2: numberInput(measuredCircuitFields.x2),
  xm: numberInput(measuredCircuitFields.xm),
  rc: numberInput(measuredCircuitFields.rc),
  rotationalLossW: numberInput(measuredCircuitFields.rotationalLossW),
  connection: optionalInput(measuredCircuitFields.connection),
});
const testsForm = z.object({
  method: z.literal("tests"),
  ...readingInputs,
  statorResistanceDc: numberInput(measuredTestsFields.statorResistanceDc),
  designLetter: measuredTestsFields.designLetter,
  connection: optionalInput(measuredTestsFields.connection),
  refine: z.boolean(),
});

/** The form: each input's server rule, then the body the server takes (nested readings, nothing left empty). */
export const motorModelFormSchema = z.discriminatedUnion("method", [circuitForm, testsForm]).transform((v): AssetMotorModelBody => {
  const connection = v.connection ? { connection: v.connection } : {};
  if (v.method === "circuit") {
    const { r1, x1, r2, x2, xm, rc, rotationalLossW } = v as z.output<typeof circuitForm>;
    return { method: "circuit", r1, x1, r2, x2, xm, ...(rc !== undefined && rc !== null ? { rc } : {}), rotationalLossW, ...connection } as AssetMotorModelBody;
  }
  const t = v as z.output<typeof testsForm> & Record<ReadingKey, number>;
  const reading = (r: (typeof READINGS)[number]) => ({ V: t[`${r}.V`], I: t[`${r}.I`], P: t[`${r}.P`], f: t[`${r}.f`] });
  return {
    method: "tests",
    noLoad: reading("noLoad"),
    lockedRotor: reading("lockedRotor"),
    ...(t.statorResistanceDc !== undefined ? { statorResistanceDc: t.statorResistanceDc } : {}),
    designLetter: t.designLetter,
    ...connection,
    ...(t.refine ? { refine: true } : {}),
  } as AssetMotorModelBody;
});

const text = (v: unknown) => (v === null || v === undefined ? "" : String(v));

/** Starting values: what was saved on the motor (as entered), else empty, with the motor's design letter. */
export function motorModelFormValues(entered: AssetMotorModelBody | null | undefined, motor: { designLetter?: string | null } = {}): MotorModelFormValues {
  const values: MotorModelFormValues = {
    method: entered?.method ?? "tests",
    connection: text(entered?.connection),
    statorResistanceDc: "",
    designLetter: motor.designLetter ?? "",
    refine: false,
    r1: "", x1: "", r2: "", x2: "", xm: "", rc: "", rotationalLossW: "",
    "noLoad.V": "", "noLoad.I": "", "noLoad.P": "", "noLoad.f": "",
    "lockedRotor.V": "", "lockedRotor.I": "", "lockedRotor.P": "", "lockedRotor.f": "",
  };
  if (entered?.method === "circuit") for (const k of CIRCUIT_INPUTS) values[k] = text(entered[k]);
  if (entered?.method === "tests") {
    for (const r of READINGS) for (const f of READING_FIELDS) values[`${r}.${f}`] = text(entered[r][f]);
    values.statorResistanceDc = text(entered.statorResistanceDc);
    values.designLetter = entered.designLetter;
    values.refine = !!entered.refine;
  }
  return values;
}

/** Label and unit of each input. */
export const MODEL_INPUT_LABEL: Record<string, { label: string; unit: string; hint?: string }> = {
  r1: { label: "R1, stator resistance", unit: "Ω" },
  x1: { label: "X1, stator leakage reactance", unit: "Ω" },
  r2: { label: "R2, rotor resistance", unit: "Ω", hint: "Referred to the stator" },
  x2: { label: "X2, rotor leakage reactance", unit: "Ω", hint: "Referred to the stator" },
  xm: { label: "Xm, magnetising reactance", unit: "Ω" },
  rc: { label: "Rc, core-loss resistance", unit: "Ω", hint: "Leave empty when the core loss is inside the rotational losses" },
  rotationalLossW: { label: "Rotational losses", unit: "W", hint: "Friction and windage (and core loss without Rc)" },
  V: { label: "Line voltage", unit: "V" },
  I: { label: "Line current", unit: "A" },
  P: { label: "Input power, three phases", unit: "W" },
  f: { label: "Frequency", unit: "Hz" },
  statorResistanceDc: { label: "DC stator resistance per phase", unit: "Ω", hint: "From a DC test; without it R1 = R2 is assumed" },
};

/** A circuit value as the table writes it: ohms to four significant digits, watts whole; "—" when not given. */
export function formatCircuitValue(value: number | null | undefined, unit: string): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "—";
  if (unit === "W") return `${Math.round(value)} W`;
  return `${Number(value.toPrecision(4))} Ω`;
}

/** The note after saving or clearing: where the values now come from and what happened to the stored captures. */
export function modelSavedNote(r: { cleared?: boolean; queued: number; storedCaptures: number }): string {
  const first = r.cleared ? "Measured values removed: the motor model is the nameplate estimate again." : "Measured values saved: the motor model uses them.";
  if (r.queued > 0) return `${first} ${r.queued} stored capture${r.queued === 1 ? " is" : "s are"} queued for analysis with it; the history updates as each one is done.`;
  if (r.storedCaptures > 0) return `${first} New captures are analysed with it; the ${r.storedCaptures} stored one${r.storedCaptures === 1 ? " keeps its" : "s keep their"} analyses until analysed again.`;
  return `${first} New captures are analysed with it.`;
}

/** A flag of an operating point, in a few words for the chart: "beyond breakdown", "current +125 %". */
export function flagLabel(f: { code: string; message: string }, currentRatio?: number | null): string {
  if (f.code === "beyond-breakdown") return "beyond breakdown";
  if (f.code === "slip-out-of-range") return "slip out of range";
  if (f.code === "current-mismatch") {
    if (currentRatio === null || currentRatio === undefined) return "current off";
    const pct = Math.round(100 * (currentRatio - 1));
    return `current ${pct >= 0 ? "+" : "\u2212"}${Math.abs(pct)} %`;
  }
  return f.code.replace(/-/g, " ");
}
