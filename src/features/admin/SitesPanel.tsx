// Admin → Sites and areas: every site with its areas (edit, rename, delete after a confirmation; a site or area that
// still holds motors is refused by the server and its message shown in the card), and the new-site form.
import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { Section } from "../../components/Page.tsx";
import { Field, FormError, TextInput, useZodForm } from "../../components/Form.tsx";
import { Button } from "../../components/Button.tsx";
import { EmptyState } from "../../components/EmptyState.tsx";
import { ErrorNote } from "../../components/Alert.tsx";
import { PageLoading } from "../../components/Spinner.tsx";
import type { Site } from "../../lib/contracts.ts";
import { siteSchema } from "./schemas.ts";
import { useCreateSite, useDeleteSite, useUpdateSite } from "./api/admin.ts";
import { AreaList } from "./AreaList.tsx";
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
  const del = useDeleteSite();
  const [editing, setEditing] = useState(false);
  const onDelete = () => {
    const areas = site.areas.length ? ` and its ${site.areas.length === 1 ? "area" : `${site.areas.length} areas`}` : "";
    if (confirm(`Delete site ${site.code} · ${site.name}${areas}? Only a site without motors can be deleted.`)) del.mutate(site.id);
  };
  return (
    <Section
      title={
        <span className="flex items-baseline gap-2">
          <span className="num rounded-sm bg-sunken px-1.5 text-caption">{site.code}</span>
          {site.name}
        </span>
      }
      actions={
        <span className="flex items-center gap-2">
          <span className="text-caption text-ink-muted">{site.timezone}</span>
          {!editing && (
            <Button size="sm" variant="ghost" aria-label={`Edit site ${site.name}`} onClick={() => setEditing(true)}>
              Edit
            </Button>
          )}
          <Button size="sm" variant="danger" aria-label={`Delete site ${site.name}`} disabled={del.isPending} onClick={onDelete}>
            Delete
          </Button>
        </span>
      }
    >
      {del.isError && (
        <div className="mb-3">
          <ErrorNote error={del.error} />
        </div>
      )}
      {editing && <EditSiteForm site={site} onDone={() => setEditing(false)} />}
      <AreaList site={site} />
    </Section>
  );
}

function EditSiteForm({ site, onDone }: { site: Site; onDone: () => void }) {
  const update = useUpdateSite();
  const form = useZodForm(siteSchema, { code: site.code, name: site.name, timezone: site.timezone });
  const onSubmit = form.submit(async (data) => {
    await update.mutateAsync({ id: site.id, ...data });
    onDone();
  });
  return (
    <form onSubmit={onSubmit} noValidate className="mb-4 grid gap-3 rounded-md border border-line bg-canvas p-3 sm:grid-cols-[8rem_minmax(0,1fr)_12rem]" aria-label={`Edit site ${site.name}`}>
      <Field label="Code" error={form.errors.code}>
        {(p) => <TextInput {...p} className="num" value={form.values.code} onChange={(e) => form.set("code", e.target.value)} />}
      </Field>
      <Field label="Name" error={form.errors.name}>
        {(p) => <TextInput {...p} autoFocus value={form.values.name} onChange={(e) => form.set("name", e.target.value)} />}
      </Field>
      <Field label="Time zone" error={form.errors.timezone}>
        {(p) => <TextInput {...p} value={form.values.timezone} onChange={(e) => form.set("timezone", e.target.value)} />}
      </Field>
      <div className="flex flex-wrap items-center gap-2 sm:col-span-3">
        <Button type="submit" variant="primary" size="sm" disabled={form.submitting}>Save site</Button>
        <Button size="sm" onClick={onDone}>Cancel</Button>
      </div>
      <div className="sm:col-span-3"><FormError message={form.formError} /></div>
    </form>
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
