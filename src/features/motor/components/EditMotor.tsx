// "Edit motor" on the motor page (admins): the motor form in a dialog, starting from the stored motor. Only what
// changed is sent. When the nameplate changes and the motor has stored captures, it offers to analyse them again
// with the corrected nameplate (checked unless the admin unticks it); the page then says how many were queued.
import { useState } from "react";
import { Button } from "../../../components/Button.tsx";
import { Dialog } from "../../../components/Dialog.tsx";
import { MotorForm } from "../../../components/MotorForm.tsx";
import type { AssetDetail } from "../../../lib/contracts.ts";
import { fieldList, motorFormValues, motorPatchBody, nameplateEdits, savedNote, type MotorFormValues } from "../../../lib/motor-form.ts";
import { NAMEPLATE_FIELDS } from "../../../shared/schemas/assets.ts";
import { useUpdateMotor } from "../api/update-motor.ts";

export function EditMotorButton({ motor, onSaved }: { motor: AssetDetail; onSaved: (note: string) => void }) {
  const [open, setOpen] = useState(false);
  const [reanalyse, setReanalyse] = useState(true);
  const update = useUpdateMotor(motor.id);
  const stored = motor.storedCaptureCount ?? 0;

  const offer = (values: MotorFormValues) => {
    const edits = nameplateEdits(motor, values);
    if (!edits.length) return null;
    return (
      <div className="rounded-md border border-brand/25 bg-brand-soft px-3 py-2" data-testid="nameplate-change">
        <p>
          You changed {fieldList(edits)}: saving starts nameplate version <span className="num">{motor.nameplateVersion + 1}</span>.
          {stored === 0 && " Captures from now on are analysed with it."}
        </p>
        {stored > 0 && (
          <label className="mt-1 inline-flex items-center gap-2">
            <input type="checkbox" checked={reanalyse} onChange={(e) => setReanalyse(e.target.checked)} />
            Analyse the {stored} stored capture{stored === 1 ? "" : "s"} again with the corrected nameplate
          </label>
        )}
      </div>
    );
  };

  return (
    <>
      <Button
        onClick={() => {
          setReanalyse(true);
          setOpen(true);
        }}
      >
        Edit motor
      </Button>
      <Dialog open={open} onClose={() => setOpen(false)} title={`Edit ${motor.tag}`} wide>
        {open && (
          <MotorForm
            label={`Edit ${motor.tag}`}
            initial={motorFormValues(motor)}
            submitLabel="Save motor"
            onCancel={() => setOpen(false)}
            footer={offer}
            onSave={async (data) => {
              const body = motorPatchBody(motor, data);
              if (Object.keys(body).length === 0) return setOpen(false);
              const nameplateChanged = NAMEPLATE_FIELDS.some((f) => f in body);
              const saved = await update.mutateAsync({ body, reanalyse: nameplateChanged && stored > 0 && reanalyse });
              setOpen(false);
              onSaved(savedNote({ nameplateChanged, nameplateVersion: saved.nameplateVersion, queued: saved.queued ?? 0, storedCaptures: stored }));
            }}
          />
        )}
      </Dialog>
    </>
  );
}
