// The motor's rolling bearings under its nameplate: designation and geometry per end (or "not given"), the defect
// frequencies as multiples of the shaft speed, and for admins the form to edit them.
import { useState } from "react";
import { Button } from "../../../components/Button.tsx";
import { Dialog } from "../../../components/Dialog.tsx";
import { Figure } from "../../../components/Figure.tsx";
import { Field, FormError, TextInput, useZodForm } from "../../../components/Form.tsx";
import type { AssetBearing, AssetDetail } from "../../../lib/contracts.ts";
import { bearingGeometryProblem, defectOrders, BEARING_DEFECTS } from "../../../engine/bearings.ts";
import { BEARING_ENDS, bearingFormSchema, bearingFormValues, usePatchBearings, type BearingEnd, type BearingFormValues } from "../api/patch-bearings.ts";

const END_NAME: Record<BearingEnd, string> = { de: "Drive end", nde: "Non-drive end" };

export function Bearings({ m, canEdit }: { m: AssetDetail; canEdit: boolean }) {
  const [open, setOpen] = useState(false);
  return (
    <div className="flex flex-col gap-3" data-testid="motor-bearings">
      {BEARING_ENDS.map((end) => (
        <BearingRows key={end} end={end} b={m.bearings?.[end] ?? null} />
      ))}
      {canEdit && (
        <div>
          <Button size="sm" onClick={() => setOpen(true)}>
            Edit bearings
          </Button>
          <Dialog open={open} onClose={() => setOpen(false)} title={`Bearings of ${m.tag}`} wide>
            {open && <BearingForm m={m} onDone={() => setOpen(false)} />}
          </Dialog>
        </div>
      )}
    </div>
  );
}

function BearingRows({ end, b }: { end: BearingEnd; b: AssetBearing | null }) {
  const geometry =
    b && b.rollingElements !== null && b.elementDiameterMm !== null && b.pitchDiameterMm !== null
      ? { position: end === "de" ? ("DE" as const) : ("NDE" as const), rollingElements: b.rollingElements, elementDiameterMm: b.elementDiameterMm, pitchDiameterMm: b.pitchDiameterMm, contactAngleDeg: b.contactAngleDeg ?? 0 }
      : null;
  const orders = geometry && !bearingGeometryProblem(geometry) ? defectOrders(geometry) : null;
  return (
    <div>
      <div className="flex items-baseline justify-between gap-3 border-b border-line py-1">
        <span className="text-caption font-semibold text-ink-muted">{END_NAME[end]}</span>
        <span className="text-right">{b ? (b.designation ?? "designation not given") : <span className="text-ink-muted">not given</span>}</span>
      </div>
      {b && (
        <dl>
          {(
            [
              ["Rolling elements Nb", <Figure value={b.rollingElements} />],
              ["Element diameter d", <Figure value={b.elementDiameterMm} unit="mm" digits={3} />],
              ["Pitch diameter D", <Figure value={b.pitchDiameterMm} unit="mm" digits={2} />],
              ["Contact angle φ", <Figure value={b.contactAngleDeg ?? (geometry ? 0 : null)} unit="°" digits={1} />],
            ] as const
          ).map(([k, v]) => (
            <div key={k} className="flex items-baseline justify-between gap-3 border-b border-line py-1 last:border-b-0">
              <dt className="text-caption text-ink-muted">{k}</dt>
              <dd className="text-right">{v}</dd>
            </div>
          ))}
        </dl>
      )}
      {orders ? (
        <p className="mt-1 text-caption text-ink-muted">
          Per shaft turn:{" "}
          {BEARING_DEFECTS.map((d, i) => (
            <span key={d}>
              {i > 0 && " · "}
              {d} <span className="num text-ink">{orders[d].toFixed(3)}× fr</span>
            </span>
          ))}
        </p>
      ) : b ? (
        <p className="mt-1 text-caption text-ink-faint">Nb, d and D are needed for the defect frequencies.</p>
      ) : null}
    </div>
  );
}

function BearingForm({ m, onDone }: { m: AssetDetail; onDone: () => void }) {
  const patch = usePatchBearings(m.id);
  const form = useZodForm(bearingFormSchema, bearingFormValues(m.bearings));
  const [reanalyse, setReanalyse] = useState(true);
  const onSubmit = form.submit(async (body) => {
    await patch.mutateAsync({ body, reanalyse });
    onDone();
  });
  const input = (name: keyof BearingFormValues, label: string, hint?: string, mono = true) => (
    <Field label={label} error={form.errors[name]} hint={hint} optional>
      {(p) => <TextInput {...p} className={mono ? "num" : ""} inputMode={mono ? "decimal" : undefined} value={form.values[name]} onChange={(e) => form.set(name, e.target.value)} />}
    </Field>
  );
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      <p className="text-ink-muted">
        From the bearing maker's data or the motor's documentation. Nb, d and D go together; a deep-groove ball bearing under radial load has a contact angle of 0°.
        Leave an end empty when it is not known. A change starts nameplate version {m.nameplateVersion + 1}.
      </p>
      <div className="grid gap-4 sm:grid-cols-2">
        {BEARING_ENDS.map((end) => (
          <fieldset key={end} className="flex flex-col gap-2">
            <legend className="mb-1 font-semibold">{END_NAME[end]}</legend>
            {input(`${end}.designation`, "Designation", "e.g. 6316 C3", false)}
            {input(`${end}.rollingElements`, "Rolling elements Nb")}
            {input(`${end}.elementDiameterMm`, "Element diameter d (mm)")}
            {input(`${end}.pitchDiameterMm`, "Pitch diameter D (mm)")}
            {input(`${end}.contactAngleDeg`, "Contact angle φ (°)", "0 when left empty")}
          </fieldset>
        ))}
      </div>
      <label className="inline-flex items-center gap-2">
        <input type="checkbox" checked={reanalyse} onChange={(e) => setReanalyse(e.target.checked)} />
        Analyse this motor's stored captures again with the new bearings
      </label>
      <FormError message={form.formError} />
      <div className="flex gap-2">
        <Button type="submit" variant="primary" disabled={form.submitting}>
          Save bearings
        </Button>
        <Button onClick={onDone}>Cancel</Button>
      </div>
    </form>
  );
}
