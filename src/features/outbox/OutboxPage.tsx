import { useState } from "react";
import { Link } from "react-router-dom";
import { queryOptions, useQuery } from "@tanstack/react-query";
import { Page } from "../../components/Page.tsx";
import { Button } from "../../components/Button.tsx";
import { EmptyState } from "../../components/EmptyState.tsx";
import { ErrorNote } from "../../components/Alert.tsx";
import { PageLoading } from "../../components/Spinner.tsx";
import { apiGet, apiUrl } from "../../lib/api.ts";
import type { CaughtMail } from "../../lib/contracts.ts";
import { formatBytes, formatDateTime } from "../../lib/format.ts";
import { rootKeys } from "../../lib/query.ts";
import { linkify } from "./linkify.ts";

const outboxKeys = { list: () => [...rootKeys.outbox, "list"] as const };
const outboxQueryOptions = () =>
  queryOptions({
    queryKey: outboxKeys.list(),
    queryFn: ({ signal }) => apiGet<{ items: CaughtMail[] }>("/outbox", undefined, signal).then((r) => r.items),
    refetchInterval: 10_000,
  });

export default function OutboxPage() {
  const q = useQuery(outboxQueryOptions());
  const [selected, setSelected] = useState<number | null>(null);
  const mail = q.data?.find((m) => m.id === selected) ?? q.data?.[0] ?? null;
  return (
    <Page
      title="Outbox"
      description="Development only: e-mail the server sent, caught by the local mail fake instead of being delivered."
      wide
      actions={<Button onClick={() => q.refetch()} disabled={q.isFetching}>{q.isFetching ? "Refreshing…" : "Refresh"}</Button>}
    >
      {q.isPending ? (
        <PageLoading />
      ) : q.isError ? (
        <ErrorNote error={q.error} />
      ) : q.data.length === 0 ? (
        <EmptyState title="No mail caught yet">Invitations and password resets appear here.</EmptyState>
      ) : (
        <div className="grid min-h-[60vh] overflow-hidden rounded-md border border-line bg-surface shadow-card md:grid-cols-[22rem_minmax(0,1fr)]">
          <ul className="max-h-[75vh] divide-y divide-line overflow-y-auto border-b border-line md:border-b-0 md:border-r" aria-label="Caught mail">
            {q.data.map((m) => (
              <li key={m.id}>
                <button
                  type="button"
                  onClick={() => setSelected(m.id)}
                  aria-current={mail?.id === m.id ? "true" : undefined}
                  className={`flex w-full flex-col gap-0.5 px-3 py-2.5 text-left ${mail?.id === m.id ? "bg-brand-soft" : "hover:bg-sunken"}`}
                >
                  <span className="truncate font-medium">{m.subject || "(no subject)"}</span>
                  <span className="truncate text-caption text-ink-muted">To {m.to}</span>
                  <span className="num text-caption text-ink-faint">{formatDateTime(m.receivedAt)}</span>
                </button>
              </li>
            ))}
          </ul>
          {mail && <MailView mail={mail} />}
        </div>
      )}
    </Page>
  );
}

function MailView({ mail }: { mail: CaughtMail }) {
  const parts = linkify(mail.text ?? "", window.location.origin);
  return (
    <article className="flex min-w-0 flex-col" aria-label="Message" data-testid="mail-view">
      <header className="border-b border-line px-5 py-4">
        <h2 className="text-heading font-semibold">{mail.subject || "(no subject)"}</h2>
        <dl className="mt-2 grid grid-cols-[4rem_1fr] gap-x-2 text-caption">
          <dt className="text-ink-muted">From</dt>
          <dd>{mail.from}</dd>
          <dt className="text-ink-muted">To</dt>
          <dd>{mail.to}</dd>
          <dt className="text-ink-muted">Caught</dt>
          <dd className="num">{formatDateTime(mail.receivedAt)}</dd>
        </dl>
      </header>
      <div className="whitespace-pre-wrap break-words px-5 py-4 leading-relaxed">
        {parts.map((p, i) =>
          p.kind === "text" ? (
            <span key={i}>{p.text}</span>
          ) : p.internal ? (
            <Link key={i} to={p.href} className="break-all">{p.text}</Link>
          ) : (
            <a key={i} href={p.href} target="_blank" rel="noreferrer noopener" className="break-all">{p.text}</a>
          ),
        )}
      </div>
      {mail.attachments.length > 0 && (
        <footer className="border-t border-line px-5 py-3">
          <h3 className="mb-2 text-caption font-semibold uppercase tracking-wide text-ink-muted">Attachments</h3>
          <ul className="flex flex-wrap gap-2">
            {mail.attachments.map((a, i) => (
              <li key={i}>
                <a href={apiUrl(`/outbox/${mail.id}/attachments/${i}`)} download={a.filename} className="inline-flex items-center gap-2 rounded-md border border-line px-2.5 py-1 no-underline hover:bg-sunken">
                  <span className="font-medium text-ink">{a.filename}</span>
                  <span className="num text-caption text-ink-muted">{formatBytes(a.size)}</span>
                </a>
              </li>
            ))}
          </ul>
        </footer>
      )}
    </article>
  );
}
