// The areas of one site on Admin → Sites and areas: rename inline, delete after a confirmation (only an empty area
// goes; the server's 409 says how many motors it holds and is shown under the list), and add a new one.
import { useState } from "react";
import { Field, FormError, TextInput, useZodForm } from "../../components/Form.tsx";
import { Button } from "../../components/Button.tsx";
import { ErrorNote } from "../../components/Alert.tsx";
import type { Area, Site } from "../../lib/contracts.ts";
import { areaSchema } from "./schemas.ts";
import { useAddArea, useDeleteArea, useRenameArea } from "./api/admin.ts";

export function AreaList({ site }: { site: Site }) {
  const del = useDeleteArea();
  const onDelete = (a: Area) => {
    if (confirm(`Delete area ${a.name} of ${site.name}? Only an area without motors can be deleted.`)) del.mutate(a.id);
  };
  return (
    <>
      {site.areas.length ? (
        <ul className="flex flex-col divide-y divide-line" aria-label={`Areas of ${site.name}`}>
          {site.areas.map((a) => (
            <AreaRow key={a.id} area={a} onDelete={() => onDelete(a)} deleting={del.isPending && del.variables === a.id} />
          ))}
        </ul>
      ) : (
        <p className="text-ink-muted">No areas yet.</p>
      )}
      {del.isError && (
        <div className="mt-2">
          <ErrorNote error={del.error} />
        </div>
      )}
      <AddArea siteId={site.id} />
    </>
  );
}

function AreaRow({ area, onDelete, deleting }: { area: Area; onDelete: () => void; deleting: boolean }) {
  const rename = useRenameArea();
  const form = useZodForm(areaSchema, { name: area.name });
  const [editing, setEditing] = useState(false);
  const onSubmit = form.submit(async ({ name }) => {
    if (name !== area.name) await rename.mutateAsync({ id: area.id, name });
    setEditing(false);
  });
  if (editing)
    return (
      <li className="py-2">
        <form onSubmit={onSubmit} noValidate className="flex flex-wrap items-end gap-2">
          <Field label={`New name for ${area.name}`} error={form.errors.name} className="min-w-56 flex-1">
            {(p) => <TextInput {...p} autoFocus value={form.values.name} onChange={(e) => form.set("name", e.target.value)} />}
          </Field>
          <Button type="submit" variant="primary" size="sm" disabled={form.submitting}>Save</Button>
          <Button size="sm" onClick={() => { form.reset({ name: area.name }); setEditing(false); }}>Cancel</Button>
          <div className="w-full"><FormError message={form.formError} /></div>
        </form>
      </li>
    );
  return (
    <li className="flex items-center justify-between gap-2 py-1.5">
      <span>{area.name}</span>
      <span className="flex gap-1">
        <Button size="sm" variant="ghost" aria-label={`Rename area ${area.name}`} onClick={() => { form.reset({ name: area.name }); setEditing(true); }}>
          Rename
        </Button>
        <Button size="sm" variant="danger" aria-label={`Delete area ${area.name}`} disabled={deleting} onClick={onDelete}>
          Delete
        </Button>
      </span>
    </li>
  );
}

function AddArea({ siteId }: { siteId: number }) {
  const add = useAddArea();
  const form = useZodForm(areaSchema, { name: "" });
  const [adding, setAdding] = useState(false);
  const onSubmit = form.submit(async ({ name }) => {
    await add.mutateAsync({ siteId, name });
    form.reset();
    setAdding(false);
  });
  return adding ? (
    <form onSubmit={onSubmit} noValidate className="mt-3 flex flex-wrap items-end gap-2">
      <Field label="New area" error={form.errors.name} className="min-w-56 flex-1">
        {(p) => <TextInput {...p} autoFocus value={form.values.name} onChange={(e) => form.set("name", e.target.value)} />}
      </Field>
      <Button type="submit" variant="primary" size="sm" disabled={form.submitting}>Add</Button>
      <Button size="sm" onClick={() => setAdding(false)}>Cancel</Button>
      <div className="w-full"><FormError message={form.formError} /></div>
    </form>
  ) : (
    <Button size="sm" className="mt-3" onClick={() => setAdding(true)}>Add an area</Button>
  );
}
