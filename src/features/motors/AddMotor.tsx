// "Add motor" on the register (admins): the motor form in a dialog; a saved motor opens on its own page, where its
// bearings and measurement points are added.
import { useState } from "react";
import { useNavigate } from "react-router-dom";
import { Button } from "../../components/Button.tsx";
import { Dialog } from "../../components/Dialog.tsx";
import { MotorForm } from "../../components/MotorForm.tsx";
import { motorFormValues } from "../../lib/motor-form.ts";
import { useCreateMotor } from "./api/create-motor.ts";

/** `place`: the register's site and area filter, preselected in the form. */
export function AddMotorButton({ place }: { place: { siteId?: string; areaId?: string } }) {
  const [open, setOpen] = useState(false);
  const create = useCreateMotor();
  const navigate = useNavigate();
  return (
    <>
      <Button variant="primary" onClick={() => setOpen(true)}>
        Add motor
      </Button>
      <Dialog open={open} onClose={() => setOpen(false)} title="Add a motor" wide>
        {open && (
          <>
            <p className="mb-4 text-ink-muted">
              From the motor's nameplate. Poles, frequency and full-load speed set the slip and load of every analysis. Bearings and measurement points are added on the motor's
              page.
            </p>
            <MotorForm
              label="Add a motor"
              initial={motorFormValues(null, place)}
              submitLabel="Add motor"
              onCancel={() => setOpen(false)}
              onSave={async (data) => {
                const motor = await create.mutateAsync(data);
                setOpen(false);
                navigate(`/motors/${motor.id}`);
              }}
            />
          </>
        )}
      </Dialog>
    </>
  );
}
