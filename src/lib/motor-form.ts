// The motor form: "Add motor" on the register and "Edit motor" on the motor page. The rules are the server's motor
// schema (src/shared/schemas/assets.ts) wrapped for text inputs and selects; here too are the form's starting values,
// what an edit sends (only what changed, null for a cleared field), which nameplate fields an edit touches, and the
// note shown after saving.
import { z } from "zod";
import type { Asset } from "./contracts.ts";
import { numberInput, optionalInput } from "./forms.ts";
import { ASSET_DEFAULTS, assetFields, checkSpeed, NAMEPLATE_FIELDS, type AssetPatchBody, type NameplateField } from "../shared/schemas/assets.ts";

/** The form's values as the inputs hold them: text for numbers, "" for a select or input left empty. */
export type MotorFormValues = {
  tag: string;
  name: string;
  /** Form only: picks the areas the area select offers. */
  siteId: string;
  areaId: string;
  drivenEquipment: string;
  criticality: string;
  ratedKw: string;
  ratedVoltage: string;
  ratedCurrent: string;
  ratedHz: string;
  ratedRpm: string;
  poles: string;
  rotorBars: string;
  statorSlots: string;
  designLetter: string;
  efficiencyClass: string;
  efficiencyPct: string;
  powerFactor: string;
  connection: string;
  driveFed: boolean;
  machineGroup: string;
  support: string;
};

/** Each field's rule on its input: a number from text ("" is not given, a decimal comma is fine), "" from a select is not given. */
export const motorFormFields = {
  tag: assetFields.tag,
  name: assetFields.name,
  areaId: numberInput(assetFields.areaId),
  drivenEquipment: assetFields.drivenEquipment,
  criticality: assetFields.criticality,
  ratedKw: numberInput(assetFields.ratedKw),
  ratedVoltage: numberInput(assetFields.ratedVoltage),
  ratedCurrent: numberInput(assetFields.ratedCurrent),
  ratedHz: numberInput(assetFields.ratedHz),
  ratedRpm: numberInput(assetFields.ratedRpm),
  poles: numberInput(assetFields.poles),
  rotorBars: numberInput(assetFields.rotorBars),
  statorSlots: numberInput(assetFields.statorSlots),
  designLetter: optionalInput(assetFields.designLetter),
  efficiencyClass: optionalInput(assetFields.efficiencyClass),
  efficiencyPct: numberInput(assetFields.efficiencyPct),
  powerFactor: numberInput(assetFields.powerFactor),
  connection: optionalInput(assetFields.connection),
  driveFed: assetFields.driveFed,
  machineGroup: numberInput(assetFields.machineGroup),
  support: assetFields.support,
};
export type MotorField = keyof typeof motorFormFields;
export const MOTOR_FIELDS = Object.keys(motorFormFields) as MotorField[];

/** The whole form: every field's rule, the full-load speed below synchronous speed, then the body without siteId. */
export const motorFormSchema = z
  .object({ ...motorFormFields, siteId: z.string() })
  .superRefine(checkSpeed)
  .transform(({ siteId: _site, ...body }) => body);
export type MotorFormData = z.output<typeof motorFormSchema>;

/** Label and unit of each field, for the form and for saying which nameplate fields an edit changed. */
export const MOTOR_FIELD_LABEL: Record<MotorField, { label: string; unit?: string }> = {
  tag: { label: "Tag" },
  name: { label: "Name" },
  areaId: { label: "Area" },
  drivenEquipment: { label: "Driven equipment" },
  criticality: { label: "Criticality" },
  ratedKw: { label: "Rated power", unit: "kW" },
  ratedVoltage: { label: "Rated voltage", unit: "V" },
  ratedCurrent: { label: "Rated current", unit: "A" },
  ratedHz: { label: "Rated frequency", unit: "Hz" },
  ratedRpm: { label: "Full-load speed", unit: "rpm" },
  poles: { label: "Poles" },
  rotorBars: { label: "Rotor bars" },
  statorSlots: { label: "Stator slots" },
  designLetter: { label: "Design letter" },
  efficiencyClass: { label: "Efficiency class" },
  efficiencyPct: { label: "Efficiency", unit: "%" },
  powerFactor: { label: "Power factor", unit: "cos φ" },
  connection: { label: "Connection" },
  driveFed: { label: "Fed by a variable-frequency drive" },
  machineGroup: { label: "Machine group" },
  support: { label: "Support" },
};

const text = (v: unknown) => (v === null || v === undefined ? "" : String(v));

/** Starting values: the stored motor's, or a new motor's (the register's site and area filter, if any, preselected). */
export function motorFormValues(asset?: Asset | null, place: { siteId?: string; areaId?: string } = {}): MotorFormValues {
  if (!asset)
    return {
      tag: "", name: "", siteId: place.siteId ?? "", areaId: place.areaId ?? "",
      drivenEquipment: ASSET_DEFAULTS.drivenEquipment, criticality: ASSET_DEFAULTS.criticality,
      ratedKw: "", ratedVoltage: "", ratedCurrent: "", ratedHz: String(ASSET_DEFAULTS.ratedHz), ratedRpm: "", poles: "",
      rotorBars: "", statorSlots: "", designLetter: "", efficiencyClass: "", efficiencyPct: "", powerFactor: "", connection: "",
      driveFed: ASSET_DEFAULTS.driveFed, machineGroup: String(ASSET_DEFAULTS.machineGroup), support: ASSET_DEFAULTS.support,
    };
  const values: Record<string, string | boolean> = { siteId: text(asset.siteId), driveFed: !!asset.driveFed };
  for (const f of MOTOR_FIELDS) if (f !== "driveFed") values[f] = text(asset[f]);
  return values as MotorFormValues;
}

/** Stored and entered values compared as the API holds them: "" / undefined / null are all "not given". */
const same = (stored: unknown, next: unknown) => {
  const norm = (v: unknown) => (v === undefined || v === "" ? null : typeof v === "string" ? v.trim() : v);
  return norm(stored) === norm(next);
};

/** What an edit sends: only the fields that differ from the stored motor; a field emptied is sent as null (cleared). */
export function motorPatchBody(asset: Asset, data: MotorFormData): AssetPatchBody {
  const out: Record<string, unknown> = {};
  for (const f of MOTOR_FIELDS) {
    const next = (data as Record<string, unknown>)[f];
    if (!same(asset[f], next)) out[f] = next ?? null;
  }
  return out as AssetPatchBody;
}

/**
 * The nameplate fields the person has changed so far, while they type: a field whose input does not parse yet
 * counts as changed (it is being edited). Drives the offer to analyse the stored captures again.
 */
export function nameplateEdits(asset: Asset, values: MotorFormValues): NameplateField[] {
  return NAMEPLATE_FIELDS.filter((f) => {
    const r = motorFormFields[f].safeParse(values[f]);
    return !r.success || !same(asset[f], r.data);
  });
}

/** "the full-load speed and the poles": the changed fields, as a sentence part. */
export function fieldList(fields: readonly MotorField[]): string {
  const names = fields.map((f) => `the ${MOTOR_FIELD_LABEL[f].label.toLowerCase()}`);
  return names.length <= 1 ? (names[0] ?? "") : `${names.slice(0, -1).join(", ")} and ${names[names.length - 1]}`;
}

/** The note after an edit is saved: which nameplate version now applies and what happened to the stored captures. */
export function savedNote(r: { nameplateChanged: boolean; nameplateVersion: number; queued: number; storedCaptures: number }): string {
  if (!r.nameplateChanged) return "Motor saved.";
  const version = `Motor saved with nameplate version ${r.nameplateVersion}.`;
  if (r.queued > 0) return `${version} ${r.queued} stored capture${r.queued === 1 ? " is" : "s are"} queued for analysis with it; the history updates as each one is done.`;
  if (r.storedCaptures > 0) return `${version} New captures are analysed with it; the ${r.storedCaptures} stored one${r.storedCaptures === 1 ? " keeps its" : "s keep their"} analyses until analysed again.`;
  return `${version} New captures are analysed with it.`;
}
