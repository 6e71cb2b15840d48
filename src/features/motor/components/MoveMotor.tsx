// "Move to another area" on the motor page (admins): pick a site, then one of its areas.
import { useState } from "react";
import { Button } from "../../../components/Button.tsx";
import { Dialog } from "../../../components/Dialog.tsx";
import { Field, FormError, Select, useZodForm } from "../../../components/Form.tsx";
import type { AssetDetail } from "../../../lib/contracts.ts";
import { useSites } from "../../../lib/sites.ts";
import { SiteOptions } from "../../../components/SiteOptions.tsx";
import { moveMotorSchema, useMoveMotor } from "../api/move-motor.ts";

export function MoveMotorButton({ motor }: { motor: AssetDetail }) {
  const [open, setOpen] = useState(false);
  return (
    <>
      <Button onClick={() => setOpen(true)}>Move to another area</Button>
      <Dialog open={open} onClose={() => setOpen(false)} title={`Move ${motor.tag}`}>
        {open && <MoveForm motor={motor} onDone={() => setOpen(false)} />}
      </Dialog>
    </>
  );
}

function MoveForm({ motor, onDone }: { motor: AssetDetail; onDone: () => void }) {
  const sites = useSites();
  const move = useMoveMotor(motor.id);
  const form = useZodForm(moveMotorSchema, { siteId: String(motor.siteId), areaId: "" });
  const [from] = useState(`${motor.siteName} · ${motor.areaName}`); // not the new place while the dialog closes
  const site = sites.data?.find((s) => String(s.id) === form.values.siteId);
  const areas = site?.areas.filter((a) => a.id !== motor.areaId) ?? [];
  const onSubmit = form.submit(async (data) => {
    await move.mutateAsync(data);
    onDone();
  });
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3">
      <p className="text-ink-muted">
        Now in {from}. Its captures, analyses, findings and inspections go with it.
      </p>
      <Field label="Site">
        {(p) => (
          <Select
            {...p}
            value={form.values.siteId}
            onChange={(e) => {
              form.set("siteId", e.target.value);
              form.set("areaId", "");
            }}
          >
            <SiteOptions sites={sites.data} />
          </Select>
        )}
      </Field>
      <Field label="Area" error={form.errors.areaId} hint={site && areas.length === 0 ? "This site has no other area: add one under Admin → Sites and areas." : undefined}>
        {(p) => (
          <Select {...p} value={form.values.areaId} onChange={(e) => form.set("areaId", e.target.value)} disabled={areas.length === 0}>
            <option value="">Pick an area</option>
            {areas.map((a) => (
              <option key={a.id} value={a.id}>
                {a.name}
              </option>
            ))}
          </Select>
        )}
      </Field>
      <FormError message={form.formError} />
      <div className="flex gap-2">
        <Button type="submit" variant="primary" disabled={form.submitting}>Move</Button>
        <Button onClick={onDone}>Cancel</Button>
      </div>
    </form>
  );
}
