import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { Section } from "../../components/Page.tsx";
import { DataTable, type Column } from "../../components/DataTable.tsx";
import { Field, FormError, Select, TextInput, useZodForm } from "../../components/Form.tsx";
import { Button } from "../../components/Button.tsx";
import { Alert, ErrorNote } from "../../components/Alert.tsx";
import { EmptyState } from "../../components/EmptyState.tsx";
import type { Gateway } from "../../lib/contracts.ts";
import { formatDateTime } from "../../lib/format.ts";
import { gatewaySchema } from "./schemas.ts";
import { gatewaysQueryOptions, useCreateGateway, useRevokeGateway } from "./api/admin.ts";
import { sitesQueryOptions } from "../../lib/sites.ts";
import { SiteOptions } from "../../components/SiteOptions.tsx";

export function GatewaysPanel() {
  const gateways = useQuery(gatewaysQueryOptions());
  const sites = useQuery(sitesQueryOptions());
  const revoke = useRevokeGateway();
  const siteName = (id: number) => sites.data?.find((s) => s.id === id)?.name ?? `#${id}`;
  const revoked = (g: Gateway) => !!g.revokedAt || g.active === false;
  const columns: Column<Gateway>[] = [
    { id: "name", header: "Gateway", cell: (g) => <span className="font-medium">{g.name}</span> },
    { id: "site", header: "Site", cell: (g) => g.siteName ?? siteName(g.siteId) },
    { id: "created", header: "Created", cell: (g) => <span className="num text-caption">{formatDateTime(g.createdAt)}</span>, hideBelow: "md" },
    { id: "seen", header: "Last seen", cell: (g) => <span className="num text-caption">{formatDateTime(g.lastSeenAt)}</span> },
    { id: "state", header: "State", cell: (g) => (revoked(g) ? <span className="text-ink-faint">Revoked</span> : <span>Active</span>) },
    {
      id: "act",
      header: <span className="sr-only">Actions</span>,
      cell: (g) =>
        !revoked(g) && (
          <Button size="sm" variant="danger" disabled={revoke.isPending} onClick={() => confirm(`Revoke ${g.name}? It can no longer send captures.`) && revoke.mutate(g.id)}>
            Revoke
          </Button>
        ),
    },
  ];
  return (
    <div className="grid gap-5 xl:grid-cols-[minmax(0,1fr)_22rem]">
      <div className="flex flex-col gap-3">
        <ErrorNote error={revoke.error} />
        <DataTable
          caption="Gateways"
          columns={columns}
          rows={gateways.data}
          rowKey={(g) => g.id}
          loading={gateways.isPending}
          error={gateways.error}
          empty={<EmptyState title="No gateways">A gateway streams captures from a site. Create one to get its token.</EmptyState>}
        />
      </div>
      <NewGateway />
    </div>
  );
}

function NewGateway() {
  const sites = useQuery(sitesQueryOptions());
  const create = useCreateGateway();
  const form = useZodForm(gatewaySchema, { name: "", siteId: "" });
  const [token, setToken] = useState<string | null>(null);
  const [copied, setCopied] = useState(false);
  const onSubmit = form.submit(async (data) => {
    const r = await create.mutateAsync(data);
    setToken(r.token);
    setCopied(false);
    form.reset();
  });
  return (
    <Section title="New gateway" className="h-fit">
      {token && (
        <div className="mb-4 flex flex-col gap-2">
          <Alert tone="caution" title="Copy the token now">It is shown only this once. Put it in the gateway's configuration.</Alert>
          <code className="num block break-all rounded-md border border-line bg-sunken p-2 text-caption" data-testid="gateway-token">{token}</code>
          <div className="flex gap-2">
            <Button
              size="sm"
              onClick={async () => {
                await navigator.clipboard?.writeText(token).catch(() => undefined);
                setCopied(true);
              }}
            >
              {copied ? "Copied" : "Copy"}
            </Button>
            <Button size="sm" variant="ghost" onClick={() => setToken(null)}>I have stored it</Button>
          </div>
        </div>
      )}
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3">
        <Field label="Name" error={form.errors.name}>
          {(p) => <TextInput {...p} value={form.values.name} onChange={(e) => form.set("name", e.target.value)} placeholder="e.g. Pump house panel" />}
        </Field>
        <Field label="Site" error={form.errors.siteId}>
          {(p) => (
            <Select {...p} value={form.values.siteId} onChange={(e) => form.set("siteId", e.target.value)}>
              <option value="">Pick a site</option>
              <SiteOptions sites={sites.data} />
            </Select>
          )}
        </Field>
        <FormError message={form.formError} />
        <Button type="submit" variant="primary" disabled={form.submitting}>Create gateway</Button>
      </form>
    </Section>
  );
}
