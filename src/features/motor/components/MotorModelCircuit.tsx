// The motor model's circuit values on the motor page, each with where it came from (nameplate estimate with its
// assumption, no-load test, locked-rotor test, entered), and for admins the form to enter measured values (the
// circuit itself, or the no-load and locked-rotor readings) and the way back to the nameplate estimate. Both offer to
// analyse the stored captures again, as editing the nameplate does.
import { useState } from "react";
import { Button } from "../../../components/Button.tsx";
import { Dialog } from "../../../components/Dialog.tsx";
import { Field, FormError, Select, UnitInput, useZodForm } from "../../../components/Form.tsx";
import { errorMessage } from "../../../lib/api.ts";
import type { AssetDetail } from "../../../lib/contracts.ts";
import { formatDate } from "../../../lib/format.ts";
import {
  CIRCUIT_INPUTS,
  formatCircuitValue,
  MODEL_INPUT_LABEL,
  modelSavedNote,
  motorModelFormSchema,
  motorModelFormValues,
  READING_FIELDS,
  type MotorModelFormValues,
} from "../lib/motor-model-form.ts";
import type { MotorModelResponse } from "../api/get-motor.ts";
import { useClearMotorModel, useSaveMotorModel } from "../api/motor-model.ts";

const METHOD_WORDS = { circuit: "circuit values entered", tests: "no-load and locked-rotor tests" } as const;

export function CircuitTable({ model }: { model: MotorModelResponse }) {
  const m = model.measured;
  return (
    <div>
      <p className="mb-1 text-caption text-ink-muted">
        {m ? (
          <>
            Measured values ({METHOD_WORDS[m.method]}), saved {formatDate(m.savedAt)}
            {m.savedBy ? <> by {m.savedBy.name}</> : null}. Per phase of the {model.input.connection} connection at {model.input.frequencyHz} Hz; the model runs at the
            nameplate's {model.input.lineVoltage} V.
          </>
        ) : (
          <>
            Estimated from the nameplate: per phase of the {model.input.connection} connection at {model.input.frequencyHz} Hz, {model.input.lineVoltage} V. Each value says
            which assumption sets it.
          </>
        )}
      </p>
      <table className="w-full text-body" data-testid="circuit-values">
        <caption className="sr-only">Equivalent-circuit values of the motor model and where each came from</caption>
        <thead>
          <tr className="border-b border-line text-caption text-ink-muted">
            <th className="py-1 text-left font-medium">Value</th>
            <th className="py-1 text-right font-medium">Per phase</th>
            <th className="py-1 pl-3 text-left font-medium">Source</th>
          </tr>
        </thead>
        <tbody>
          {model.circuit.map((c) => (
            <tr key={c.name} className="border-b border-line align-top last:border-b-0">
              <td className="py-1">
                <span className="num">{c.label}</span>
                <div className="text-caption text-ink-faint">{c.meaning}</div>
              </td>
              <td className="num whitespace-nowrap py-1 text-right">{formatCircuitValue(c.value, c.unit)}</td>
              <td className="py-1 pl-3">
                {c.source}
                {c.basis && <div className="text-caption text-ink-muted">{c.basis}</div>}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {m && m.notes.length > 0 && (
        <details className="mt-2 text-caption text-ink-muted">
          <summary className="cursor-pointer">How the values were worked out: {m.notes.length} notes</summary>
          <ul className="mt-1 list-disc pl-5">
            {m.notes.map((n) => (
              <li key={n}>{n}</li>
            ))}
          </ul>
        </details>
      )}
    </div>
  );
}

/** "Enter measured values" / "Edit measured values" and "Back to the nameplate estimate", for admins. */
export function MeasuredModelActions({ motor, model, onDone }: { motor: AssetDetail; model: MotorModelResponse | undefined; onDone: (note: string) => void }) {
  const [open, setOpen] = useState<"edit" | "clear" | null>(null);
  const measured = model?.measured ?? null;
  return (
    <div className="flex flex-wrap gap-2">
      <Button size="sm" onClick={() => setOpen("edit")}>
        {measured ? "Edit measured values" : "Enter measured values"}
      </Button>
      {measured && (
        <Button size="sm" variant="ghost" onClick={() => setOpen("clear")}>
          Back to the nameplate estimate
        </Button>
      )}
      <Dialog open={open === "edit"} onClose={() => setOpen(null)} title={`Measured motor model · ${motor.tag}`} wide>
        {open === "edit" && (
          <MeasuredModelForm
            motor={motor}
            initial={motorModelFormValues(measured?.entered, motor)}
            onCancel={() => setOpen(null)}
            onSaved={(note) => {
              setOpen(null);
              onDone(note);
            }}
          />
        )}
      </Dialog>
      <Dialog open={open === "clear"} onClose={() => setOpen(null)} title={`Back to the nameplate estimate · ${motor.tag}`}>
        {open === "clear" && (
          <ClearModel
            motor={motor}
            onCancel={() => setOpen(null)}
            onDone={(note) => {
              setOpen(null);
              onDone(note);
            }}
          />
        )}
      </Dialog>
    </div>
  );
}

function ReanalyseOffer({ stored, checked, onChange, what }: { stored: number; checked: boolean; onChange: (v: boolean) => void; what: string }) {
  if (stored === 0) return <p className="text-caption text-ink-muted">Captures from now on are analysed with {what}.</p>;
  return (
    <label className="inline-flex items-center gap-2">
      <input type="checkbox" checked={checked} onChange={(e) => onChange(e.target.checked)} />
      Analyse the {stored} stored capture{stored === 1 ? "" : "s"} again with {what}
    </label>
  );
}

function MeasuredModelForm({ motor, initial, onCancel, onSaved }: { motor: AssetDetail; initial: MotorModelFormValues; onCancel: () => void; onSaved: (note: string) => void }) {
  const form = useZodForm(motorModelFormSchema, initial);
  const save = useSaveMotorModel(motor.id);
  const stored = motor.storedCaptureCount ?? 0;
  const [reanalyse, setReanalyse] = useState(true);
  const v = form.values;
  const onSubmit = form.submit(async (body) => {
    const saved = await save.mutateAsync({ body, reanalyse: stored > 0 && reanalyse });
    onSaved(modelSavedNote({ queued: saved.queued ?? 0, storedCaptures: stored }));
  });
  const input = (name: keyof MotorModelFormValues & string, key: string, optional = false) => {
    const info = MODEL_INPUT_LABEL[key];
    return (
      <Field
        key={name}
        label={
          <>
            {info.label}
            <span className="sr-only"> ({info.unit})</span>
          </>
        }
        error={form.errors[name]}
        hint={info.hint}
        optional={optional}
      >
        {(p) => <UnitInput {...p} unit={info.unit} value={v[name] as string} onChange={(e) => form.set(name, e.target.value as never)} />}
      </Field>
    );
  };
  const connectionHint = `The connection the per-phase values refer to; the nameplate says ${motor.connection ?? "nothing (star assumed)"}`;

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Measured motor model">
      <fieldset>
        <legend className="mb-1 font-semibold">What you have</legend>
        <div className="flex flex-wrap gap-4">
          {(["tests", "circuit"] as const).map((m) => (
            <label key={m} className="inline-flex items-center gap-2">
              <input type="radio" name="method" value={m} checked={v.method === m} onChange={() => form.set("method", m)} />
              {m === "tests" ? "No-load and locked-rotor test readings" : "The circuit values (test report or manufacturer)"}
            </label>
          ))}
        </div>
        <p className="mt-1 text-caption text-ink-muted">
          The model runs at the nameplate's voltage ({motor.ratedVoltage ?? "not given"} V) and poles ({motor.poles}).
        </p>
      </fieldset>

      {v.method === "tests" ? (
        <>
          <fieldset className="grid gap-3 sm:grid-cols-4">
            <legend className="mb-2 font-semibold">No-load test (shaft uncoupled, rated voltage and frequency)</legend>
            {READING_FIELDS.map((f) => input(`noLoad.${f}`, f))}
          </fieldset>
          <fieldset className="grid gap-3 sm:grid-cols-4">
            <legend className="mb-2 font-semibold">Locked-rotor test (rotor blocked, about rated current; often at 25 % of rated frequency)</legend>
            {READING_FIELDS.map((f) => input(`lockedRotor.${f}`, f))}
          </fieldset>
          <fieldset className="grid gap-3 sm:grid-cols-3">
            <legend className="mb-2 font-semibold">Winding</legend>
            {input("statorResistanceDc", "statorResistanceDc", true)}
            <Field label="Design letter" error={form.errors.designLetter} hint="Sets the X1 : X2 split of the locked-rotor reactance">
              {(p) => (
                <Select {...p} value={v.designLetter} onChange={(e) => form.set("designLetter", e.target.value)}>
                  <option value="">Pick the design letter</option>
                  {["A", "B", "C", "D", "wound"].map((d) => (
                    <option key={d} value={d}>
                      {d === "wound" ? "wound rotor" : `design ${d}`}
                    </option>
                  ))}
                </Select>
              )}
            </Field>
            <ConnectionField form={form} hint={connectionHint} />
            <label className="inline-flex items-center gap-2 sm:col-span-3">
              <input type="checkbox" checked={v.refine} onChange={(e) => form.set("refine", e.target.checked)} />
              Refine: keep the magnetising branch in the locked-rotor test and the stator drop in the no-load test
            </label>
          </fieldset>
        </>
      ) : (
        <fieldset className="grid gap-3 sm:grid-cols-3">
          <legend className="mb-2 font-semibold">Circuit values per phase, referred to the stator, at the rated frequency</legend>
          {CIRCUIT_INPUTS.map((k) => input(k, k, k === "rc"))}
          <ConnectionField form={form} hint={connectionHint} />
        </fieldset>
      )}

      <ReanalyseOffer stored={stored} checked={reanalyse} onChange={setReanalyse} what="the measured values" />
      <FormError message={form.formError} />
      <div className="flex gap-2">
        <Button type="submit" variant="primary" disabled={form.submitting}>
          Save measured values
        </Button>
        <Button onClick={onCancel}>Cancel</Button>
      </div>
    </form>
  );
}

function ConnectionField({ form, hint }: { form: ReturnType<typeof useZodForm<typeof motorModelFormSchema, MotorModelFormValues>>; hint: string }) {
  return (
    <Field label="Connection" error={form.errors.connection} optional hint={hint}>
      {(p) => (
        <Select {...p} value={form.values.connection} onChange={(e) => form.set("connection", e.target.value)}>
          <option value="">As on the nameplate</option>
          <option value="star">star</option>
          <option value="delta">delta</option>
        </Select>
      )}
    </Field>
  );
}

function ClearModel({ motor, onCancel, onDone }: { motor: AssetDetail; onCancel: () => void; onDone: (note: string) => void }) {
  const clear = useClearMotorModel(motor.id);
  const stored = motor.storedCaptureCount ?? 0;
  const [reanalyse, setReanalyse] = useState(true);
  const [error, setError] = useState<string | null>(null);
  return (
    <div className="flex flex-col gap-3">
      <p>The measured values are removed and the motor model is estimated from the nameplate again.</p>
      <ReanalyseOffer stored={stored} checked={reanalyse} onChange={setReanalyse} what="the nameplate estimate" />
      <FormError message={error} />
      <div className="flex gap-2">
        <Button
          variant="primary"
          disabled={clear.isPending}
          onClick={async () => {
            try {
              const r = await clear.mutateAsync({ reanalyse: stored > 0 && reanalyse });
              onDone(modelSavedNote({ cleared: true, queued: r.queued ?? 0, storedCaptures: stored }));
            } catch (err) {
              setError(errorMessage(err));
            }
          }}
        >
          Remove the measured values
        </Button>
        <Button onClick={onCancel}>Cancel</Button>
      </div>
    </div>
  );
}
