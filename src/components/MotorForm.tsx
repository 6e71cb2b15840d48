// The motor form of "Add motor" (Motors) and "Edit motor" (the motor page): tag, name, site → area, driven equipment,
// criticality, the nameplate with units beside its inputs, and the ISO 20816-3 machine class. Rules and messages are
// the server's (src/lib/motor-form.ts wraps src/shared/schemas/assets.ts); the server's 400 and 409 land on the field.
import type { ReactNode } from "react";
import { Button } from "./Button.tsx";
import { Field, FormError, Select, TextInput, UnitInput, useZodForm } from "./Form.tsx";
import { SiteOptions } from "./SiteOptions.tsx";
import { useSites } from "../lib/sites.ts";
import { MOTOR_FIELD_LABEL, motorFormSchema, type MotorField, type MotorFormData, type MotorFormValues } from "../lib/motor-form.ts";
import { CONNECTIONS, CRITICALITIES, DESIGN_LETTERS, DRIVEN_EQUIPMENT, SUPPORTS } from "../shared/schemas/assets.ts";
import { inputNumber } from "../lib/forms.ts";

export interface MotorFormProps {
  initial: MotorFormValues;
  submitLabel: string;
  /** Called with the parsed body; a thrown ApiError's field messages land on the fields. */
  onSave: (data: MotorFormData, values: MotorFormValues) => Promise<unknown>;
  onCancel: () => void;
  /** Shown above the buttons, given the current values (e.g. the offer to analyse stored captures again). */
  footer?: (values: MotorFormValues) => ReactNode;
  label: string;
}

export function MotorForm({ initial, submitLabel, onSave, onCancel, footer, label }: MotorFormProps) {
  const sites = useSites();
  const form = useZodForm(motorFormSchema, initial);
  const v = form.values;
  const site = sites.data?.find((s) => String(s.id) === v.siteId);
  const onSubmit = form.submit((data) => onSave(data, v));

  const labelOf = (f: MotorField) => {
    const { label, unit } = MOTOR_FIELD_LABEL[f];
    return unit ? (
      <>
        {label}
        <span className="sr-only"> ({unit})</span>
      </>
    ) : (
      label
    );
  };
  const number = (f: MotorField, opts: { optional?: boolean; hint?: ReactNode } = {}) => (
    <Field label={labelOf(f)} error={form.errors[f]} hint={opts.hint} optional={opts.optional}>
      {(p) => <UnitInput {...p} unit={MOTOR_FIELD_LABEL[f].unit} value={v[f] as string} onChange={(e) => form.set(f, e.target.value)} />}
    </Field>
  );
  const select = (f: MotorField, options: readonly (string | { value: string; label: string })[], opts: { optional?: boolean; empty?: string; hint?: ReactNode } = {}) => {
    const list = options.map((o) => (typeof o === "string" ? { value: o, label: o } : o));
    const stored = v[f] as string;
    if (stored && !list.some((o) => o.value === stored)) list.push({ value: stored, label: stored });
    return (
      <Field label={labelOf(f)} error={form.errors[f]} optional={opts.optional} hint={opts.hint}>
        {(p) => (
          <Select {...p} value={stored} onChange={(e) => form.set(f, e.target.value)}>
            {opts.empty !== undefined && <option value="">{opts.empty}</option>}
            {list.map((o) => (
              <option key={o.value} value={o.value}>
                {o.label}
              </option>
            ))}
          </Select>
        )}
      </Field>
    );
  };

  // The full-load speed lies below synchronous speed 120·f/p: say where that is while the poles and frequency are known.
  const poles = inputNumber(v.poles);
  const hz = inputNumber(v.ratedHz);
  const sync = typeof poles === "number" && typeof hz === "number" && poles >= 2 && poles % 2 === 0 && hz > 0 ? Math.round((120 * hz) / poles) : null;
  const speedHint = sync ? `Below the synchronous ${sync} rpm of ${poles} poles at ${hz} Hz` : "As on the nameplate, at full load";

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-5" aria-label={label}>
      <fieldset className="grid gap-3 sm:grid-cols-2">
        <legend className="mb-2 font-semibold">Motor</legend>
        <Field label="Tag" error={form.errors.tag} hint="Unique in the register, e.g. TWT-HLP-P04">
          {(p) => <TextInput {...p} className="num" value={v.tag} onChange={(e) => form.set("tag", e.target.value)} />}
        </Field>
        <Field label="Name" error={form.errors.name}>
          {(p) => <TextInput {...p} value={v.name} onChange={(e) => form.set("name", e.target.value)} />}
        </Field>
        <Field label="Site">
          {(p) => (
            <Select
              {...p}
              value={v.siteId}
              onChange={(e) => {
                form.set("siteId", e.target.value);
                form.set("areaId", "");
              }}
            >
              <option value="">Pick a site</option>
              <SiteOptions sites={sites.data} />
            </Select>
          )}
        </Field>
        <Field label="Area" error={form.errors.areaId} hint={site && site.areas.length === 0 ? "This site has no areas yet: add one under Admin → Sites and areas." : undefined}>
          {(p) => (
            <Select {...p} value={v.areaId} onChange={(e) => form.set("areaId", e.target.value)} disabled={!site || site.areas.length === 0}>
              <option value="">{site ? "Pick an area" : "Pick a site first"}</option>
              {site?.areas.map((a) => (
                <option key={a.id} value={a.id}>
                  {a.name}
                </option>
              ))}
            </Select>
          )}
        </Field>
        {select("drivenEquipment", DRIVEN_EQUIPMENT)}
        {select("criticality", CRITICALITIES, { hint: "Weighs in the inspection priority" })}
      </fieldset>

      <fieldset className="grid gap-3 sm:grid-cols-3">
        <legend className="mb-2 font-semibold">Nameplate</legend>
        {number("ratedKw", { optional: true })}
        {number("ratedVoltage", { optional: true })}
        {number("ratedCurrent", { optional: true })}
        {number("ratedHz")}
        {number("ratedRpm", { hint: speedHint })}
        {number("poles", { hint: "Slip and load are computed from it" })}
        {number("rotorBars", { optional: true, hint: "For the slot-harmonic speed estimate" })}
        {number("statorSlots", { optional: true })}
        {select("designLetter", DESIGN_LETTERS, { optional: true, empty: "Not given (B assumed)", hint: "NEMA MG 1; sets the starting estimate of the motor model" })}
        <Field label={labelOf("efficiencyClass")} error={form.errors.efficiencyClass} optional hint="e.g. IE3">
          {(p) => <TextInput {...p} value={v.efficiencyClass} onChange={(e) => form.set("efficiencyClass", e.target.value)} />}
        </Field>
        {number("efficiencyPct", { optional: true })}
        {number("powerFactor", { optional: true })}
        {select("connection", CONNECTIONS, { optional: true, empty: "Not given" })}
        <div className="flex items-end sm:col-span-2">
          <label className="inline-flex items-center gap-2 pb-1.5">
            <input type="checkbox" checked={v.driveFed} onChange={(e) => form.set("driveFed", e.target.checked)} />
            {MOTOR_FIELD_LABEL.driveFed.label}
          </label>
        </div>
      </fieldset>

      <fieldset className="grid gap-3 sm:grid-cols-2">
        <legend className="mb-2 font-semibold">Vibration zones (ISO 20816-3)</legend>
        {select("machineGroup", [
          { value: "1", label: "Group 1: large, above 300 kW" },
          { value: "2", label: "Group 2: medium, 15 to 300 kW" },
        ])}
        {select("support", SUPPORTS, { hint: "Rigid when the lowest natural frequency of machine and support is at least 25 % above the running speed" })}
      </fieldset>

      {footer?.(v)}
      <FormError message={form.formError} />
      <div className="flex gap-2">
        <Button type="submit" variant="primary" disabled={form.submitting}>
          {submitLabel}
        </Button>
        <Button onClick={onCancel}>Cancel</Button>
      </div>
    </form>
  );
}
