// Fleet (/fleet, the manager's landing): how many motors sit in each grade per site and area, the worst first,
// what changed this week, motors far under or over rated load, overdue inspections; drill-down to each motor.
import { useState } from "react";
import { Link } from "react-router-dom";
import { ErrorNote } from "../../components/Alert.tsx";
import { buttonClass } from "../../components/Button.tsx";
import { EmptyState } from "../../components/EmptyState.tsx";
import { Figure } from "../../components/Figure.tsx";
import { Select } from "../../components/Form.tsx";
import { GradeBadge } from "../../components/GradeBadge.tsx";
import { Page, Section } from "../../components/Page.tsx";
import { PageLoading } from "../../components/Spinner.tsx";
import { ZoneBadge } from "../../components/ZoneBadge.tsx";
import { formatDate, formatDateTime } from "../../lib/format.ts";
import { useSession } from "../../lib/session.ts";
import { useFleet, type FleetHealth, type FleetMotor, type GradeCounts } from "./api/get-fleet.ts";
import { GRADE_KEYS, GradeBar, GradeBarLabels, GradePatterns, GradeSwatch, LONG, SHORT } from "./components/GradeBar.tsx";
import { LoadHistogram } from "./components/LoadHistogram.tsx";
import { useSites } from "../../lib/sites.ts";
import { CalendarFeedPanel } from "../../components/CalendarFeedPanel.tsx";

export default function FleetPage() {
  const [siteId, setSiteId] = useState<number | null>(null);
  const fleet = useFleet(siteId);
  const sites = useSites();
  const { can } = useSession();
  const reports = can("reports.read");
  const f = fleet.data;
  if (fleet.isPending) return <PageLoading />;
  if (fleet.isError || !f)
    return (
      <Page title="Fleet">
        <ErrorNote error={fleet.error} />
      </Page>
    );
  const csvHref = `/api/fleet.csv${siteId ? `?siteId=${siteId}` : ""}`;

  return (
    <Page
      wide
      title="Fleet"
      description={
        <>
          <span className="num">{f.totals.motors}</span> motors · as of {formatDateTime(f.generatedAt)}
        </>
      }
      actions={
        <>
          <label className="flex items-center gap-2 text-caption text-ink-muted">
            Site
            <Select className="!w-auto" value={siteId ?? ""} onChange={(e) => setSiteId(e.target.value ? Number(e.target.value) : null)}>
              <option value="">All sites</option>
              {(sites.data ?? f.sites).map((s) => (
                <option key={s.id} value={s.id}>
                  {s.name}
                </option>
              ))}
            </Select>
          </label>
          {reports && (
            <a className={buttonClass("secondary", "sm")} href={csvHref} download>
              Export CSV
            </a>
          )}
        </>
      }
    >
      <GradePatterns />
      <div className="flex flex-col gap-4">
        <Section title="Rotor grades across the fleet">
          <Totals counts={f.totals.grades} />
          <p className="mt-2 text-caption text-ink-muted">
            Vibration zones: {(["A", "B", "C", "D"] as const).map((z) => (
              <span key={z} className="mr-3 inline-flex items-center gap-1">
                <ZoneBadge zone={z} /> <span className="num">{f.totals.zones[z]}</span>
              </span>
            ))}
            <span className="num">{f.totals.zones.none}</span> without a vibration reading
          </p>
        </Section>

        <div className="grid gap-4 xl:grid-cols-2">
          <Section title="Worst first">
            <WorstList motors={f.worst} />
          </Section>
          <Section title="Changed in the last 7 days">
            <Changes changes={f.changes} />
          </Section>
        </div>

        <Section title="By site and area">
          <div className="flex flex-col gap-6">
            {f.sites.map((s) => (
              <div key={s.id}>
                <div className="mb-2 flex flex-wrap items-baseline gap-x-3 gap-y-1">
                  <h3 className="text-heading font-semibold">{s.name}</h3>
                  <span className="num text-caption text-ink-muted">{s.code}</span>
                  <span className="text-caption text-ink-muted">
                    <span className="num">{s.motors}</span> motors
                    {s.overdueInspections > 0 && (
                      <>
                        {" "}· <span className="font-semibold text-danger"><span className="num">{s.overdueInspections}</span> overdue inspections</span>
                      </>
                    )}
                  </span>
                  <span className="ml-auto flex gap-3 text-caption">
                    <Link to={`/motors?siteId=${s.id}`}>Motors of this site</Link>
                    {reports && (
                      <a href={`/api/sites/${s.id}/report`} target="_blank" rel="noreferrer">
                        Printable site report ↗
                      </a>
                    )}
                  </span>
                </div>
                <AreaTable site={s} />
              </div>
            ))}
            {f.sites.length === 0 && <EmptyState title="No sites yet" />}
          </div>
        </Section>

        <div className="grid gap-4 xl:grid-cols-2">
          <Section title="Load across the fleet">
            <LoadHistogram load={f.load} />
            <p className="text-caption text-ink-muted">
              <span className="num">{f.load.withoutLoad}</span> motors without a load estimate are not counted.
            </p>
            <div className="mt-3 grid gap-4 sm:grid-cols-2">
              <LoadList title={`Far under rated load (< ${f.load.underPct} %)`} motors={f.load.under} />
              <LoadList title={`Over rated load (> ${f.load.overPct} %)`} motors={f.load.over} />
            </div>
          </Section>
          <Section title="Overdue inspections">
            <Overdue overdue={f.overdue} />
          </Section>
        </div>
        {/* Planners have the plan's own screen (and this panel there); managers and admins follow it from here. */}
        {can("calendar.subscribe") && !can("inspections.plan") && <CalendarFeedPanel className="max-w-2xl" />}
      </div>
    </Page>
  );
}

function Totals({ counts }: { counts: GradeCounts }) {
  return (
    <div>
      <GradeBar counts={counts} height={28} label="Motors per rotor grade" />
      <GradeBarLabels counts={counts} />
      <ul className="mt-3 flex flex-wrap gap-x-5 gap-y-2">
        {GRADE_KEYS.map((k) => (
          <li key={k} className="flex items-center gap-2">
            <GradeSwatch k={k} />
            {k.startsWith("R") ? <GradeBadge grade={k} compact /> : <span className="text-caption">{LONG[k]}</span>}
            <span className="num font-semibold">{counts[k]}</span>
          </li>
        ))}
      </ul>
    </div>
  );
}

function AreaTable({ site }: { site: FleetHealth["sites"][number] }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full min-w-[720px] table-fixed text-body">
        <colgroup>
          <col className="w-[20%]" />
          <col className="w-[8%]" />
          {GRADE_KEYS.map((k) => (
            <col key={k} className="w-[6.5%]" />
          ))}
          <col />
        </colgroup>
        <thead>
          <tr className="border-b border-line text-caption text-ink-muted">
            <th className="py-1 pr-3 text-left font-medium">Area</th>
            <th className="py-1 pr-3 text-right font-medium">Motors</th>
            {GRADE_KEYS.map((k) => (
              <th key={k} className="px-1 py-1 text-right font-medium" title={LONG[k]}>
                <span className="inline-flex items-center gap-1">
                  <GradeSwatch k={k} /> {SHORT[k]}
                </span>
              </th>
            ))}
            <th className="w-[30%] py-1 pl-3 text-left font-medium">Spread</th>
          </tr>
        </thead>
        <tbody>
          {site.areas.map((a) => (
            <tr key={a.id} className="border-b border-line last:border-b-0">
              <td className="py-1.5 pr-3">
                <Link to={`/motors?siteId=${site.id}&areaId=${a.id}`}>{a.name}</Link>
              </td>
              <td className="num py-1.5 pr-3 text-right">{a.motors}</td>
              {GRADE_KEYS.map((k) => (
                <td key={k} className={`num px-1 py-1.5 text-right ${a.grades[k] ? (k === "R4" || k === "R5" ? "font-semibold" : "") : "text-ink-faint"}`}>
                  {a.grades[k] ? (
                    <Link to={`/motors?siteId=${site.id}&areaId=${a.id}&grade=${k === "notAssessable" ? "na" : k === "noData" ? "none" : k}`} className="text-inherit">
                      {a.grades[k]}
                    </Link>
                  ) : (
                    "0"
                  )}
                </td>
              ))}
              <td className="py-1.5 pl-3">
                <GradeBar counts={a.grades} height={14} label={`${a.name}`} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function WorstList({ motors }: { motors: FleetMotor[] }) {
  if (!motors.length) return <p className="text-ink-muted">No graded motors yet.</p>;
  return (
    <table className="w-full text-body">
      <thead>
        <tr className="border-b border-line text-caption text-ink-muted">
          <th className="py-1 pr-2 text-left font-medium">Motor</th>
          <th className="px-2 py-1 text-left font-medium">Grade</th>
          <th className="px-2 py-1 text-right font-medium">Sideband</th>
          <th className="px-2 py-1 text-right font-medium">Load</th>
          <th className="px-2 py-1 text-center font-medium">Zone</th>
          <th className="hidden py-1 pl-2 text-right font-medium sm:table-cell">Measured</th>
        </tr>
      </thead>
      <tbody>
        {motors.slice(0, 10).map((m) => (
          <tr key={m.assetId} className="border-b border-line last:border-b-0">
            <td className="py-1.5 pr-2">
              <Link to={`/motors/${m.assetId}`} className="num font-medium">{m.tag}</Link>
              <span className="block text-caption text-ink-muted">{m.name} · {m.siteName}</span>
            </td>
            <td className="px-2 py-1.5">
              <GradeBadge grade={m.rotorGrade} assessable={m.gradeKey === "noData" ? undefined : m.rotorAssessable} compact />
            </td>
            <td className="px-2 py-1.5 text-right"><Figure value={m.sidebandDb} unit="dB" digits={1} /></td>
            <td className="px-2 py-1.5 text-right"><Figure value={m.loadPct} unit="%" estimate="slip method" /></td>
            <td className="px-2 py-1.5 text-center"><ZoneBadge zone={m.vibrationZone} /></td>
            <td className="hidden whitespace-nowrap py-1.5 pl-2 text-right text-caption text-ink-muted sm:table-cell">{formatDate(m.takenAt)}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function Changes({ changes }: { changes: FleetHealth["changes"] }) {
  if (!changes.length) return <p className="text-ink-muted">No rotor grade or vibration zone changed this week.</p>;
  return (
    <ul className="flex flex-col divide-y divide-line" aria-label="Rotor grade and vibration zone changes, worst first">
      {changes.map((c) => (
        <li key={`${c.kind}-${c.analysisId}`} className="flex flex-wrap items-center gap-x-2 gap-y-1 py-1.5" data-change-kind={c.kind}>
          <span className={`w-14 text-caption font-semibold ${c.direction === "worse" ? "text-danger" : "text-ok"}`}>{c.direction === "worse" ? "▼ worse" : "▲ better"}</span>
          <Link to={`/motors/${c.assetId}`} className="num font-medium">{c.tag}</Link>
          <span className="text-caption text-ink-muted">{c.name}</span>
          <span className="ml-auto inline-flex items-center gap-1.5">
            <span className="w-16 text-right text-caption text-ink-muted">{c.kind === "vibration" ? "vibration" : "rotor"}</span>
            {c.kind === "vibration" ? (
              <>
                <ZoneBadge zone={c.from} withWord /> → <ZoneBadge zone={c.to} withWord />
              </>
            ) : (
              <>
                <GradeBadge grade={c.from} compact /> → <GradeBadge grade={c.to} compact />
              </>
            )}
          </span>
          <Link to={`/captures/${c.captureId}`} className="w-28 whitespace-nowrap text-right text-caption" title={`The capture of ${formatDateTime(c.at)}`}>
            <span className="sr-only">Capture of </span>
            {formatDate(c.at)} →
          </Link>
        </li>
      ))}
    </ul>
  );
}

function LoadList({ title, motors }: { title: string; motors: FleetMotor[] }) {
  return (
    <div>
      <h3 className="mb-1 text-caption font-semibold text-ink-muted">{title}</h3>
      {motors.length === 0 ? (
        <p className="text-caption text-ink-faint">None.</p>
      ) : (
        <ul className="text-body">
          {motors.slice(0, 8).map((m) => (
            <li key={m.assetId} className="flex justify-between gap-2 border-b border-line py-1 last:border-b-0">
              <span>
                <Link to={`/motors/${m.assetId}`} className="num">{m.tag}</Link> <span className="text-caption text-ink-muted">{m.name}</span>
              </span>
              <Figure value={m.loadPct} unit="%" estimate="slip method" />
            </li>
          ))}
          {motors.length > 8 && <li className="pt-1 text-caption text-ink-muted">and {motors.length - 8} more</li>}
        </ul>
      )}
    </div>
  );
}

function Overdue({ overdue }: { overdue: FleetHealth["overdue"] }) {
  if (!overdue.count) return <p className="text-ok">No inspection is overdue.</p>;
  return (
    <table className="w-full text-body">
      <thead>
        <tr className="border-b border-line text-caption text-ink-muted">
          <th className="py-1 text-left font-medium">Inspection</th>
          <th className="py-1 pl-2 text-left font-medium">Motor</th>
          <th className="px-2 py-1 text-right font-medium">Due</th>
          <th className="py-1 pl-2 text-right font-medium">Overdue</th>
        </tr>
      </thead>
      <tbody>
        {overdue.items.map((i) => (
          <tr key={i.id} className="border-b border-line last:border-b-0">
            <td className="py-1.5">
              {i.title}
              <span className="block text-caption text-ink-muted">
                {i.priority} priority · {i.assigneeName ?? "unassigned"}
              </span>
            </td>
            <td className="py-1.5 pl-2">
              <Link to={`/motors/${i.assetId}`} className="num">{i.assetTag}</Link>
              <span className="block text-caption text-ink-muted">{i.siteName}</span>
            </td>
            <td className="whitespace-nowrap px-2 py-1.5 text-right text-caption">{formatDate(i.dueDate)}</td>
            <td className="num whitespace-nowrap py-1.5 pl-2 text-right font-semibold text-danger">{i.daysOverdue} d</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
