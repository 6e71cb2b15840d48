import { useState } from "react";
import { Link, useSearchParams } from "react-router-dom";
import { useQuery } from "@tanstack/react-query";
import { Page, Section } from "../../components/Page.tsx";
import { DataTable, pagedTableProps, useListParams, type Column } from "../../components/DataTable.tsx";
import { Button } from "../../components/Button.tsx";
import { Select } from "../../components/Form.tsx";
import { GradeBadge } from "../../components/GradeBadge.tsx";
import { ZoneBadge } from "../../components/ZoneBadge.tsx";
import { InspectionStatusPill, PriorityTag } from "../../components/InspectionBits.tsx";
import { EmptyState } from "../../components/EmptyState.tsx";
import { CalendarFeedPanel } from "../../components/CalendarFeedPanel.tsx";
import { apiUrl } from "../../lib/api.ts";
import type { Finding, Inspection, InspectionCandidate } from "../../lib/contracts.ts";
import { formatDate, formatDateTime } from "../../lib/format.ts";
import { parseGrade } from "../../lib/grades.ts";
import { inspectionParam, isOverdue, outcomeLabel, STATUS_LABEL } from "../../lib/inspections.ts";
import { useSession } from "../../lib/session.ts";
import { candidatesQueryOptions, inspectionsQueryOptions, techniciansQueryOptions } from "./api/inspections.ts";
import { ScheduleDialog } from "./ScheduleDialog.tsx";
import { InspectionDialog } from "./InspectionDialog.tsx";
import { MonthView } from "./MonthView.tsx";
import { formatMonthParam, parseMonth } from "./calendar.ts";

export default function PlanPage() {
  const [scheduling, setScheduling] = useState<{ finding: Finding | null } | null>(null);
  // The row clicked, shown at once while the dialog loads the detail.
  const [seed, setSeed] = useState<Inspection | null>(null);
  const list = useListParams({ pageSize: 25, sort: "dueDate", filters: ["status", "assigneeId"] });
  const [sp, setSp] = useSearchParams();
  // `?inspection=<id>` (a row, the month view, or the link in a mail or calendar entry) opens that inspection's dialog.
  const openedId = inspectionParam(sp);
  const setOpened = (i: Inspection | null) => {
    setSeed(i);
    setSp((prev) => {
      const n = new URLSearchParams(prev);
      if (i) n.set("inspection", String(i.id));
      else n.delete("inspection");
      return n;
    }, { replace: true });
  };
  const view = sp.get("view") === "month" ? "month" : "list";
  const { year, month } = parseMonth(sp.get("month"));
  const technicians = useQuery(techniciansQueryOptions());
  const { can } = useSession();

  const setView = (v: "list" | "month") =>
    setSp((prev) => {
      const n = new URLSearchParams(prev);
      if (v === "list") n.delete("view");
      else n.set("view", v);
      return n;
    }, { replace: true });
  const shiftMonth = (delta: number) =>
    setSp((prev) => {
      const n = new URLSearchParams(prev);
      n.set("month", formatMonthParam(year, month + delta));
      return n;
    }, { replace: true });

  const exportFilters = { status: list.filters.status, assigneeId: list.filters.assigneeId };
  return (
    <Page
      title="Plan"
      description="Open findings that need someone on site, and the inspections planned for them."
      wide
      actions={
        <>
          <a className="rounded-md border border-line-strong bg-surface px-3 py-1.5 font-medium text-ink no-underline hover:bg-sunken" href={apiUrl("/inspections.csv", exportFilters)} download>
            Export CSV
          </a>
          <a className="rounded-md border border-line-strong bg-surface px-3 py-1.5 font-medium text-ink no-underline hover:bg-sunken" href={apiUrl("/inspections.ics", exportFilters)} download>
            Calendar file (.ics)
          </a>
          <Button variant="primary" onClick={() => setScheduling({ finding: null })}>
            Schedule inspection
          </Button>
        </>
      }
    >
      <div className="flex flex-col gap-6">
        <NeedsAction onSchedule={(f) => setScheduling({ finding: f })} />

        <Section
          title="Inspections"
          actions={
            <div role="group" aria-label="View" className="inline-flex overflow-hidden rounded-md border border-line-strong">
              {(["list", "month"] as const).map((v) => (
                <button key={v} type="button" aria-pressed={view === v} onClick={() => setView(v)} className={`px-3 py-1 text-caption font-medium ${view === v ? "bg-brand text-brand-ink" : "bg-surface text-ink-muted hover:bg-sunken"}`}>
                  {v === "list" ? "List" : "Month"}
                </button>
              ))}
            </div>
          }
        >
          <div className="mb-3 flex flex-wrap items-end gap-3">
            <label className="flex flex-col gap-1 text-caption text-ink-muted">
              Status
              <Select value={list.filters.status} onChange={(e) => list.setFilter("status", e.target.value)} className="w-40">
                <option value="">All</option>
                {Object.entries(STATUS_LABEL).map(([v, l]) => (
                  <option key={v} value={v}>{l}</option>
                ))}
              </Select>
            </label>
            <label className="flex flex-col gap-1 text-caption text-ink-muted">
              Technician
              <Select value={list.filters.assigneeId} onChange={(e) => list.setFilter("assigneeId", e.target.value)} className="w-48">
                <option value="">Everyone</option>
                {technicians.data?.map((t) => (
                  <option key={t.id} value={t.id}>{t.name}</option>
                ))}
              </Select>
            </label>
          </div>
          {view === "list" ? (
            <InspectionList list={list} onOpen={setOpened} />
          ) : (
            <MonthView year={year} month={month} filters={list.filters} onMonth={shiftMonth} onOpen={setOpened} />
          )}
        </Section>

        {can("calendar.subscribe") && <CalendarFeedPanel className="max-w-2xl" />}
      </div>

      <ScheduleDialog open={!!scheduling} finding={scheduling?.finding} onClose={() => setScheduling(null)} />
      <InspectionDialog inspectionId={openedId} initial={seed} onClose={() => setOpened(null)} />
    </Page>
  );
}

/** The finding behind a candidate, in the shape the schedule form takes. */
function candidateFinding(c: InspectionCandidate): Finding {
  return {
    id: c.findingId,
    assetId: c.assetId,
    assetTag: c.assetTag,
    assetName: c.assetName,
    siteId: c.siteId,
    siteName: c.siteName,
    kind: c.kind,
    level: c.level,
    previousLevel: null,
    summary: c.summary,
    status: c.status,
    createdAt: c.createdAt,
    takenAt: null,
    captureId: null,
    analysisId: null,
    loadPct: null,
    criticality: c.criticality,
    verdicts: [],
  };
}

const VERDICT_STATE: Record<string, string> = { open: "waiting for a verdict", confirmed: "confirmed", remeasure: "re-measure asked" };

function NeedsAction({ onSchedule }: { onSchedule: (f: Finding) => void }) {
  const [page, setPage] = useState(1);
  const q = useQuery(candidatesQueryOptions());
  const pageSize = 10;
  const rows = q.data?.slice((page - 1) * pageSize, page * pageSize);
  const level = (c: InspectionCandidate) => (parseGrade(c.level) ? <GradeBadge compact grade={c.level} /> : <ZoneBadge zone={c.level} withWord />);
  const schedule = (c: InspectionCandidate) => <Button size="sm" variant="primary" onClick={() => onSchedule(candidateFinding(c))}>Schedule</Button>;
  // On a phone (below sm) the row stacks into its Finding cell: motor, condition, suggestion and Schedule with it,
  // so nothing needs a sideways scroll to be reached.
  const columns: Column<InspectionCandidate>[] = [
    { id: "motor", header: "Motor", cell: (c) => (<span><Link to={`/motors/${c.assetId}`} className="num font-medium">{c.assetTag}</Link> <span className="text-ink-muted">{c.assetName}</span></span>), hideBelow: "sm" },
    { id: "site", header: "Site", cell: (c) => c.siteName, hideBelow: "md" },
    { id: "level", header: "Now", cell: level, hideBelow: "sm" },
    {
      id: "summary",
      header: "Finding",
      cell: (c) => (
        <div className="flex flex-col gap-1 sm:block">
          <p className="flex flex-wrap items-center gap-x-2 gap-y-1 sm:hidden">
            <Link to={`/motors/${c.assetId}`} className="num font-medium">{c.assetTag}</Link>
            <span className="text-ink-muted">{c.assetName}</span>
            {level(c)}
          </p>
          <span className="line-clamp-2">{c.summary}</span>
          {c.earlierFindings.length > 0 && (
            <p className="text-caption text-ink-muted">
              Also covers {c.earlierFindings.length === 1 ? "an earlier finding" : `${c.earlierFindings.length} earlier findings`}:{" "}
              {c.earlierFindings.map((e) => `${e.level} (${formatDate(e.createdAt)})`).join(", ")}
            </p>
          )}
          {c.openInspections.map((i) => (
            <p key={i.id} className="text-caption text-ink-muted">
              Already open on this motor: {i.title} ({i.status === "in_progress" ? "in progress" : i.status}, due <span className="num">{formatDate(i.dueDate)}</span>)
            </p>
          ))}
          <div className="flex flex-wrap items-center justify-between gap-2 sm:hidden">
            <span className="text-caption text-ink-muted">
              Suggested: <PriorityTag priority={c.suggestedPriority} />
            </span>
            {schedule(c)}
          </div>
        </div>
      ),
    },
    { id: "state", header: "Verdict", cell: (c) => <span className="text-caption text-ink-muted">{VERDICT_STATE[c.status] ?? c.status}</span>, hideBelow: "lg" },
    { id: "raised", header: "Raised", cell: (c) => <span className="num text-caption text-ink-muted">{formatDateTime(c.createdAt)}</span>, hideBelow: "md" },
    { id: "suggest", header: "Suggested", cell: (c) => <PriorityTag priority={c.suggestedPriority} />, hideBelow: "sm" },
    { id: "act", header: <span className="sr-only">Action</span>, cell: schedule, hideBelow: "sm" },
  ];
  return (
    <Section title="Needs action">
      <DataTable
        caption="Findings without an open inspection"
        columns={columns}
        rows={rows}
        rowKey={(c) => c.findingId}
        total={q.data?.length}
        page={page}
        pageSize={pageSize}
        onPageChange={setPage}
        loading={q.isPending}
        error={q.error}
        empty={<EmptyState title="Nothing needs action">A finding appears here when a motor's rotor grade or vibration zone gets worse, until an inspection is planned for it.</EmptyState>}
      />
    </Section>
  );
}

function InspectionList({ list, onOpen }: { list: ReturnType<typeof useListParams>; onOpen: (i: Inspection) => void }) {
  const q = useQuery(inspectionsQueryOptions(list.query));
  const columns: Column<Inspection>[] = [
    { id: "due", header: "Due", sortKey: "dueDate", cell: (i) => <span className={`num ${isOverdue(i) ? "font-semibold text-danger" : ""}`}>{formatDate(i.dueDate)}{isOverdue(i) && <span className="ml-1 font-sans text-caption">overdue</span>}</span> },
    { id: "motor", header: "Motor", sortKey: "assetTag", cell: (i) => <span className="num font-medium">{i.assetTag ?? `#${i.assetId}`}</span>, hideBelow: "sm" },
    {
      id: "title",
      header: "Inspection",
      sortKey: "title",
      cell: (i) => (
        <span className="flex flex-col gap-0.5">
          {/* on a phone the motor and priority come with the title (their columns are hidden there) */}
          <span className="num text-caption font-medium sm:hidden">{i.assetTag ?? `#${i.assetId}`}</span>
          <span>{i.title}</span>
          <span className="sm:hidden"><PriorityTag priority={String(i.priority)} /></span>
        </span>
      ),
    },
    { id: "assignee", header: "Technician", sortKey: "assigneeName", cell: (i) => i.assigneeName ?? <span className="text-ink-faint">Nobody</span>, hideBelow: "md" },
    { id: "priority", header: "Priority", sortKey: "priority", cell: (i) => <PriorityTag priority={String(i.priority)} />, hideBelow: "sm" },
    {
      id: "status",
      header: "Status",
      sortKey: "status",
      cell: (i) => (
        <span className="flex flex-col items-start gap-0.5">
          <InspectionStatusPill status={i.status} />
          {i.outcome && <span className="text-caption text-ink-muted">{outcomeLabel(i.outcome)}</span>}
          {i.attachments?.length ? <span className="text-caption text-ink-muted">{i.attachments.length === 1 ? "1 file" : `${i.attachments.length} files`}</span> : null}
        </span>
      ),
    },
  ];
  return (
    <DataTable
      caption="Inspections"
      {...pagedTableProps(list, q)}
      columns={columns}
      rowKey={(i) => i.id}
      onRowClick={onOpen}
      empty={<EmptyState title="No inspections match">Schedule one from a finding above, or change the filters.</EmptyState>}
    />
  );
}
