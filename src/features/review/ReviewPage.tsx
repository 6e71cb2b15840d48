// Review (/review): captures whose analysis raised or changed a finding that waits for a verdict, worst first,
// with the motor, the grade or zone, the load and how long it has waited. A row opens the capture's spectrum.
// "All, with verdicts" adds each finding's verdict (in words, who and when); the waiting clock runs only while a
// finding of the capture still has none (the server's raisedAt, server/reports/review-counts.ts).
import { Link, useNavigate } from "react-router-dom";
import { DataTable, pagedTableProps, useListParams, type Column } from "../../components/DataTable.tsx";
import { EmptyState } from "../../components/EmptyState.tsx";
import { Figure } from "../../components/Figure.tsx";
import { Select } from "../../components/Form.tsx";
import { GradeBadge } from "../../components/GradeBadge.tsx";
import { Page } from "../../components/Page.tsx";
import { ZoneBadge } from "../../components/ZoneBadge.tsx";
import { formatDateTime } from "../../lib/format.ts";
import { useSites } from "../../lib/sites.ts";
import { useReview, type ReviewItem } from "./api/get-review.ts";
import { ageLabel, verdictState } from "./lib.ts";

export default function ReviewPage() {
  const list = useListParams({ pageSize: 25, filters: ["status", "siteId"] });
  const status = list.filters.status || "open";
  const review = useReview({ ...list.query, status });
  const sites = useSites();
  const navigate = useNavigate();

  const columns: Column<ReviewItem>[] = [
    {
      id: "level",
      header: "Finding",
      sortKey: "severity",
      cell: (r) => (
        <span className="flex flex-wrap items-center gap-1.5">
          {r.findings.map((f) => (f.kind === "vibration" ? <ZoneBadge key={f.id} zone={f.level} withWord /> : <GradeBadge key={f.id} grade={f.level} compact />))}
        </span>
      ),
    },
    {
      id: "motor",
      header: "Motor",
      sortKey: "assetTag",
      cell: (r) => (
        <span>
          <Link to={`/motors/${r.assetId}`} className="num font-medium" onClick={(e) => e.stopPropagation()}>
            {r.assetTag}
          </Link>{" "}
          <span className="text-ink-muted">{r.assetName}</span>
          <span className="block text-caption text-ink-faint">{r.findings[0]?.siteName}</span>
        </span>
      ),
    },
    {
      id: "change",
      header: "What changed",
      cell: (r) => (
        <span className="block max-w-md text-caption">
          {r.findings.map((f) => (
            <span key={f.id} className="block">
              {f.summary}
            </span>
          ))}
        </span>
      ),
      hideBelow: "lg",
    },
    ...(status === "all"
      ? [
          {
            id: "verdict",
            header: "Verdict",
            cell: (r: ReviewItem) => (
              <span className="flex flex-col gap-0.5 text-caption">
                {r.findings.map((f) => (
                  <VerdictLine key={f.id} finding={f} withLevel={r.findings.length > 1} />
                ))}
              </span>
            ),
          } satisfies Column<ReviewItem>,
        ]
      : []),
    { id: "load", header: "Load", numeric: true, cell: (r) => <Figure value={r.findings[0]?.loadPct} unit="%" estimate="slip method" /> },
    { id: "criticality", header: "Criticality", sortKey: "criticality", cell: (r) => <span className="text-ink-muted">{String(r.findings[0]?.criticality ?? "—")}</span>, hideBelow: "md" },
    { id: "taken", header: "Captured", sortKey: "takenAt", cell: (r) => <span className="text-caption">{formatDateTime(r.takenAt)}</span>, hideBelow: "md" },
    {
      id: "age",
      header: "Waiting",
      sortKey: "raisedAt",
      numeric: true,
      cell: (r) =>
        r.raisedAt ? (
          <span title={`Waiting since ${formatDateTime(r.raisedAt)}`}>{ageLabel(r.raisedAt)}</span>
        ) : (
          <span className="text-ink-faint" title="Every finding of this capture has a verdict">
            —<span className="sr-only">every finding has a verdict</span>
          </span>
        ),
    },
    {
      id: "open",
      header: <span className="sr-only">Open</span>,
      cell: (r) => (
        <Link to={`/captures/${r.captureId}`} onClick={(e) => e.stopPropagation()} className="whitespace-nowrap">
          Review spectrum →
        </Link>
      ),
    },
  ];

  return (
    <Page wide title="Review" description="Captures whose analysis raised or worsened a finding, worst first. Open one to check the spectrum and record a verdict.">
      <DataTable
        caption={status === "all" ? "Captures with findings, with their verdicts" : "Captures waiting for a verdict"}
        {...pagedTableProps(list, review)}
        columns={columns}
        rowKey={(r) => r.captureId}
        onRowClick={(r) => navigate(`/captures/${r.captureId}`)}
        empty={<EmptyState title="Nothing waits for a verdict">New findings appear here as captures are analysed.</EmptyState>}
        toolbar={
          <>
            <label className="flex flex-col gap-1 text-caption font-medium text-ink-muted">
              Show
              <Select value={status} onChange={(e) => list.setFilter("status", e.target.value === "open" ? "" : e.target.value)}>
                <option value="open">Waiting for a verdict</option>
                <option value="all">All, with verdicts</option>
              </Select>
            </label>
            <label className="flex flex-col gap-1 text-caption font-medium text-ink-muted">
              Site
              <Select value={list.filters.siteId} onChange={(e) => list.setFilter("siteId", e.target.value)}>
                <option value="">All sites</option>
                {sites.data?.map((s) => (
                  <option key={s.id} value={s.id}>
                    {s.name}
                  </option>
                ))}
              </Select>
            </label>
            {review.data && (
              <p className="ml-auto self-center text-caption text-ink-muted">
                <span className="num">{review.data.total}</span> captures
              </p>
            )}
          </>
        }
      />
    </Page>
  );
}

/** One finding's verdict in words with who and when, or that it still waits; its grade or zone first when the capture has more than one. */
function VerdictLine({ finding: f, withLevel }: { finding: ReviewItem["findings"][number]; withLevel: boolean }) {
  const v = verdictState(f);
  return (
    <span className="flex flex-wrap items-center gap-x-1.5" data-verdict={v.waiting ? "open" : v.verdict}>
      {withLevel && (f.kind === "vibration" ? <ZoneBadge zone={f.level} /> : <GradeBadge grade={f.level} compact />)}
      {v.waiting ? (
        <span className="font-semibold text-caution">waiting for a verdict</span>
      ) : (
        <span>
          <span className="font-semibold">{v.word}</span>
          {v.by && <> by {v.by}</>}
          {v.at && <span className="text-ink-muted"> · {formatDateTime(v.at)}</span>}
        </span>
      )}
    </span>
  );
}
