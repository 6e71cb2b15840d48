import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { Section } from "../../components/Page.tsx";
import { Field, FormError, TextInput, useZodForm } from "../../components/Form.tsx";
import { Button } from "../../components/Button.tsx";
import { EmptyState } from "../../components/EmptyState.tsx";
import { ErrorNote } from "../../components/Alert.tsx";
import { PageLoading } from "../../components/Spinner.tsx";
import type { Site } from "../../lib/contracts.ts";
import { areaSchema, siteSchema } from "./schemas.ts";
import { useAddArea, useCreateSite } from "./api/admin.ts";
import { sitesQueryOptions } from "../../lib/sites.ts";

export function SitesPanel() {
  const sites = useQuery(sitesQueryOptions());
  return (
    <div className="grid gap-5 xl:grid-cols-[minmax(0,1fr)_22rem]">
      <div className="flex flex-col gap-3">
        {sites.isPending ? (
          <PageLoading />
        ) : sites.isError ? (
          <ErrorNote error={sites.error} />
        ) : sites.data.length === 0 ? (
          <EmptyState title="No sites yet">Add the first site on the right; then its areas; then import the motor register.</EmptyState>
        ) : (
          sites.data.map((s) => <SiteCard key={s.id} site={s} />)
        )}
      </div>
      <NewSiteForm />
    </div>
  );
}

function SiteCard({ site }: { site: Site }) {
  const add = useAddArea();
  const form = useZodForm(areaSchema, { name: "" });
  const [adding, setAdding] = useState(false);
  const onSubmit = form.submit(async ({ name }) => {
    await add.mutateAsync({ siteId: site.id, name });
    form.reset();
    setAdding(false);
  });
  return (
    <Section
      title={
        <span className="flex items-baseline gap-2">
          <span className="num rounded-sm bg-sunken px-1.5 text-caption">{site.code}</span>
          {site.name}
        </span>
      }
      actions={<span className="text-caption text-ink-muted">{site.timezone}</span>}
    >
      {site.areas.length ? (
        <ul className="flex flex-wrap gap-2" aria-label={`Areas of ${site.name}`}>
          {site.areas.map((a) => (
            <li key={a.id} className="rounded-full border border-line bg-canvas px-2.5 py-0.5">{a.name}</li>
          ))}
        </ul>
      ) : (
        <p className="text-ink-muted">No areas yet.</p>
      )}
      {adding ? (
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
      )}
    </Section>
  );
}

function NewSiteForm() {
  const create = useCreateSite();
  const form = useZodForm(siteSchema, { code: "", name: "", timezone: Intl.DateTimeFormat().resolvedOptions().timeZone || "UTC" });
  const onSubmit = form.submit(async (data) => {
    await create.mutateAsync(data);
    form.reset();
  });
  return (
    <Section title="New site" className="h-fit">
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3">
        <Field label="Code" error={form.errors.code} hint="Short, used in motor tags and reports.">
          {(p) => <TextInput {...p} className="num" value={form.values.code} onChange={(e) => form.set("code", e.target.value)} />}
        </Field>
        <Field label="Name" error={form.errors.name}>
          {(p) => <TextInput {...p} value={form.values.name} onChange={(e) => form.set("name", e.target.value)} />}
        </Field>
        <Field label="Time zone" error={form.errors.timezone}>
          {(p) => <TextInput {...p} value={form.values.timezone} onChange={(e) => form.set("timezone", e.target.value)} />}
        </Field>
        <FormError message={form.formError} />
        <Button type="submit" variant="primary" disabled={form.submitting}>Add site</Button>
      </form>
    </Section>
  );
}
