import { useEffect, useRef, useState } from "react";
import { Link, useSearchParams } from "react-router-dom";
import { useQuery } from "@tanstack/react-query";
import { Page, Section } from "../../components/Page.tsx";
import { DataTable, type Column } from "../../components/DataTable.tsx";
import { Button, ButtonLink } from "../../components/Button.tsx";
import { EmptyState } from "../../components/EmptyState.tsx";
import { ErrorNote } from "../../components/Alert.tsx";
import { InspectionStatusPill, PriorityTag } from "../../components/InspectionBits.tsx";
import { PageLoading, Spinner } from "../../components/Spinner.tsx";
import { AttachmentList } from "../../components/InspectionAttachments.tsx";
import { SafetyCaution } from "../../components/SafetyCaution.tsx";
import { CalendarFeedPanel } from "../../components/CalendarFeedPanel.tsx";
import type { Capture, Inspection } from "../../lib/contracts.ts";
import { formatDate, formatDateTime } from "../../lib/format.ts";
import { inspectionParam, isOverdue, outcomeLabel } from "../../lib/inspections.ts";
import { useSession } from "../../lib/session.ts";
import { myCapturesQueryOptions, myInspectionsQueryOptions, useMoveInspection } from "./api/my-work.ts";
import { CompleteDialog } from "./CompleteDialog.tsx";
import { InspectionDetailDialog } from "./InspectionDetailDialog.tsx";

const CAPTURE_STATUS: Record<string, string> = { received: "Received", queued: "Queued", analysing: "Analysing", analysed: "Analysed", failed: "Failed" };

export default function MyWorkPage() {
  const { user, can } = useSession();
  const open = useQuery(myInspectionsQueryOptions("open"));
  const done = useQuery(myInspectionsQueryOptions("done"));
  const [completing, setCompleting] = useState<Inspection | null>(null);
  // `?inspection=<id>` (a done row's Details, or the link in a mail or calendar entry) opens that inspection.
  const [sp, setSp] = useSearchParams();
  const openedId = inspectionParam(sp);
  // The last one opened stays marked in the lists after its dialog closes.
  const [marked, setMarked] = useState<number | null>(openedId);
  useEffect(() => {
    if (openedId) setMarked(openedId);
  }, [openedId]);
  const setOpened = (id: number | null) =>
    setSp((prev) => {
      const n = new URLSearchParams(prev);
      if (id) n.set("inspection", String(id));
      else n.delete("inspection");
      return n;
    }, { replace: true });
  return (
    <Page
      title="My work"
      description={user ? `Inspections assigned to ${user.name}, and the captures you sent.` : undefined}
      actions={<ButtonLink to="/upload" variant="primary">Upload captures</ButtonLink>}
    >
      <div className="grid gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="flex flex-col gap-4">
          <Section title="To do">
            {open.isPending ? (
              <PageLoading />
            ) : open.isError ? (
              <ErrorNote error={open.error} />
            ) : open.data.length === 0 ? (
              <EmptyState title="Nothing assigned to you">When a planner schedules an inspection for you, it appears here.</EmptyState>
            ) : (
              <div className="flex flex-col gap-3">
              <SafetyCaution compact />
              <ul className="flex flex-col gap-3" aria-label="Open inspections">
                {open.data.map((i) => (
                  <InspectionCard key={i.id} inspection={i} highlighted={i.id === marked} onOpen={() => setOpened(i.id)} onComplete={() => setCompleting(i)} />
                ))}
              </ul>
              </div>
            )}
          </Section>
          <Section title="Recently done">
            {done.isPending ? (
              <Spinner label="Loading finished inspections…" />
            ) : done.isError ? (
              <ErrorNote error={done.error} />
            ) : done.data.length === 0 ? (
              <EmptyState title="No finished inspections yet">Inspections you mark done appear here, with their outcome and files.</EmptyState>
            ) : (
              <ul className="flex flex-col divide-y divide-line" aria-label="Finished inspections">
                {done.data.map((i) => (
                  <li key={i.id} className={`flex flex-col gap-1.5 py-2 ${i.id === marked ? "rounded-sm bg-brand-soft/60 px-2" : ""}`} data-testid="done-inspection">
                    <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
                      <span className="num font-medium">{i.assetTag ?? `#${i.assetId}`}</span>
                      <span className="min-w-0 flex-1 truncate">{i.title}</span>
                      {i.outcome && <span className="text-caption text-ink-muted">{outcomeLabel(i.outcome)}</span>}
                      <InspectionStatusPill status={i.status} />
                      <Button size="sm" onClick={() => setOpened(i.id)} aria-label={`Details of ${i.assetTag ?? `#${i.assetId}`} ${i.title}`}>
                        Details
                      </Button>
                    </div>
                    <AttachmentList attachments={i.attachments} compact label={`Files of ${i.assetTag ?? `#${i.assetId}`} ${i.title}`} />
                  </li>
                ))}
              </ul>
            )}
          </Section>
        </div>
        <div className="flex flex-col gap-4">
          <MyCaptures />
          {can("calendar.subscribe") && <CalendarFeedPanel />}
        </div>
      </div>
      <InspectionDetailDialog
        inspectionId={completing ? null : openedId}
        userId={user?.id}
        onClose={() => setOpened(null)}
        onComplete={(i) => {
          setOpened(null);
          setCompleting(i);
        }}
      />
      <CompleteDialog inspection={completing} onClose={() => setCompleting(null)} />
    </Page>
  );
}

function InspectionCard({ inspection: i, highlighted, onOpen, onComplete }: { inspection: Inspection; highlighted: boolean; onOpen: () => void; onComplete: () => void }) {
  const move = useMoveInspection();
  const overdue = isOverdue(i);
  const ref = useRef<HTMLLIElement>(null);
  // The card a link pointed at is brought into view and marked, so it is found again after the dialog closes.
  useEffect(() => {
    if (highlighted) ref.current?.scrollIntoView?.({ block: "nearest" });
  }, [highlighted]);
  return (
    <li ref={ref} className={`rounded-md border p-3 ${overdue ? "border-danger/40" : "border-line"} ${highlighted ? "ring-2 ring-brand/60" : ""}`} data-testid="my-inspection" data-highlighted={highlighted || undefined}>
      <div className="flex flex-wrap items-start justify-between gap-2">
        <div className="min-w-0">
          <p className="flex flex-wrap items-center gap-2">
            <Link to={`/motors/${i.assetId}`} className="num font-semibold">{i.assetTag ?? `#${i.assetId}`}</Link>
            <span className="text-ink-muted">{i.assetName}</span>
            {i.siteName && <span className="text-caption text-ink-faint">{i.siteName}</span>}
          </p>
          <p className="font-medium">
            <button type="button" onClick={onOpen} className="text-left hover:underline">{i.title}</button>
          </p>
        </div>
        <div className="flex flex-col items-end gap-1">
          <InspectionStatusPill status={i.status} />
          <PriorityTag priority={String(i.priority)} />
        </div>
      </div>
      {i.instructions && <p className="mt-2 whitespace-pre-wrap text-ink-muted">{i.instructions}</p>}
      <div className="mt-3 flex flex-wrap items-center gap-2">
        <span className={`num mr-auto text-caption ${overdue ? "font-semibold text-danger" : "text-ink-muted"}`}>
          Due {formatDate(i.dueDate)}
          {overdue && " · overdue"}
        </span>
        {i.status === "planned" && (
          <Button size="sm" disabled={move.isPending} onClick={() => move.mutate({ id: i.id, status: "in_progress" })}>
            Start
          </Button>
        )}
        <ButtonLink size="sm" to={`/upload?assetId=${i.assetId}`}>Upload a capture</ButtonLink>
        <Button size="sm" variant="primary" onClick={onComplete}>Complete…</Button>
      </div>
      <ErrorNote error={move.error} />
    </li>
  );
}

function MyCaptures() {
  const q = useQuery(myCapturesQueryOptions());
  const columns: Column<Capture>[] = [
    { id: "motor", header: "Motor", cell: (c) => <span className="num whitespace-nowrap font-medium">{c.assetTag}</span> },
    { id: "when", header: "Taken", cell: (c) => <span className="num text-caption">{formatDateTime(c.takenAt ?? c.createdAt)}</span> },
    {
      id: "status",
      header: "Status",
      cell: (c) => (
        <span className={c.status === "failed" ? "text-danger" : c.status === "analysed" ? "" : "text-ink-muted"} title={c.error ?? undefined}>
          {CAPTURE_STATUS[c.status] ?? c.status}
        </span>
      ),
    },
    { id: "open", header: <span className="sr-only">Open</span>, cell: (c) => <Link to={`/captures/${c.id}`}>Open</Link> },
  ];
  return (
    <Section title="My recent captures" className="h-fit">
      <DataTable
        caption="My recent captures"
        columns={columns}
        rows={q.data?.items}
        rowKey={(c) => c.id}
        loading={q.isPending}
        error={q.error}
        empty={<EmptyState title="No captures yet" action={<ButtonLink size="sm" to="/upload">Upload</ButtonLink>} />}
      />
    </Section>
  );
}
