// One motor (/motors/:id): nameplate and measurement points, the current grade and why, trends with grade
// boundaries and the sideband projection, capture history, findings and inspections, and the motor-model curves.
import { useEffect, useState, type ReactNode } from "react";
import { Link, useParams } from "react-router-dom";
import { Alert, ErrorNote } from "../../components/Alert.tsx";
import { DataTable, type Column } from "../../components/DataTable.tsx";
import { Figure } from "../../components/Figure.tsx";
import { GradeBadge } from "../../components/GradeBadge.tsx";
import { Page, Section } from "../../components/Page.tsx";
import { PageLoading, Spinner } from "../../components/Spinner.tsx";
import { ZoneBadge } from "../../components/ZoneBadge.tsx";
import { errorMessage } from "../../lib/api.ts";
import type { AssetDetail, Capture, Finding, Inspection } from "../../lib/contracts.ts";
import { formatDate, formatDateTime } from "../../lib/format.ts";
import { outcomeLabel } from "../../lib/inspections.ts";
import { useCaptureDetail, useMotor, useMotorCaptureHistory, useMotorFindings, useMotorInspections, useMotorModel, useTrend } from "./api/get-motor.ts";
import { LoadComparison, ModelCurves } from "./components/ModelCurves.tsx";
import { CircuitTable, MeasuredModelActions } from "./components/MotorModelCircuit.tsx";
import { ProjectionNote, Trends, TrendTruncationNote } from "./components/Trends.tsx";
import { MoveMotorButton } from "./components/MoveMotor.tsx";
import { Bearings } from "./components/Bearings.tsx";
import { EditMotorButton } from "./components/EditMotor.tsx";
import { DeleteMotorButton } from "./components/DeleteMotor.tsx";
import { MeasurementPoints } from "./components/MeasurementPoints.tsx";
import { Button } from "../../components/Button.tsx";
import { useSession } from "../../lib/session.ts";

export default function MotorPage() {
  const id = Number(useParams().id);
  const motor = useMotor(id);
  const trend = useTrend(id);
  const model = useMotorModel(id);
  const { can } = useSession();
  // What the last admin action on this page came to: an edit saved (and captures queued), a deletion refused.
  const [notice, setNotice] = useState<{ tone: "success" | "error"; text: string } | null>(null);
  useEffect(() => setNotice(null), [id]);
  const m = motor.data;
  if (motor.isPending) return <PageLoading />;
  if (motor.isError || !m)
    return (
      <Page title="Motor">
        <ErrorNote error={motor.error} />
      </Page>
    );
  const points = trend.data?.points ?? [];

  return (
    <Page
      wide
      title={`${m.tag} · ${m.name}`}
      actions={
        can("assets.write") ? (
          <>
            <EditMotorButton motor={m} onSaved={(text) => setNotice({ tone: "success", text })} />
            <MoveMotorButton motor={m} />
            <DeleteMotorButton motor={m} onRefused={(text) => setNotice({ tone: "error", text })} />
          </>
        ) : undefined
      }
      eyebrow={
        <>
          <Link to="/motors">Motors</Link> · {m.siteName} · {m.areaName}
        </>
      }
      description={
        <>
          {cap(m.drivenEquipment ?? "driven equipment not given")} · criticality {m.criticality ?? "—"}
          {m.driveFed ? " · fed by a variable-frequency drive" : ""}
        </>
      }
    >
      {notice && (
        <div className="mb-4" data-testid="motor-notice">
          <Alert tone={notice.tone}>
            <div className="flex items-start justify-between gap-3">
              <p>{notice.text}</p>
              <Button size="sm" variant="ghost" onClick={() => setNotice(null)}>
                Dismiss
              </Button>
            </div>
          </Alert>
        </div>
      )}
      <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_26rem]">
        <div className="flex min-w-0 flex-col gap-4">
          <CurrentState m={m} />
          <Section title="Trends">
            <TrendTruncationNote answer={trend.data} />
            {trend.isPending ? <Spinner /> : trend.isError ? <ErrorNote error={trend.error} /> : <Trends asset={m} points={points} />}
            {points.length > 0 && (
              <div className="mt-4">
                <ProjectionNote points={points} />
              </div>
            )}
          </Section>
          <Section
            title="Motor model"
            actions={can("assets.write") ? <MeasuredModelActions motor={m} model={model.data} onDone={(text) => setNotice({ tone: "success", text })} /> : undefined}
          >
            {model.isPending ? (
              <Spinner label="Computing the model…" />
            ) : model.isError ? (
              <Alert tone="info">{errorMessage(model.error)}</Alert>
            ) : (
              <>
                <ModelCurves model={model.data} />
                <h3 className="mt-4 mb-1 font-semibold">Equivalent circuit</h3>
                <CircuitTable model={model.data} />
                {model.data.assumptions.length > 0 && (
                  <details className="mt-3 text-caption text-ink-muted">
                    <summary className="cursor-pointer">The circuit is an estimate from the nameplate: {model.data.assumptions.length} assumptions</summary>
                    <ul className="mt-1 list-disc pl-5">
                      {model.data.assumptions.map((a) => (
                        <li key={a}>{a}</li>
                      ))}
                    </ul>
                  </details>
                )}
                <h3 className="mt-4 mb-1 font-semibold">Load: model-based against slip method</h3>
                <LoadComparison model={model.data} ratedKw={m.ratedKw} />
              </>
            )}
          </Section>
          <CaptureHistory assetId={m.id} />
        </div>
        <aside className="flex flex-col gap-4">
          <Section title="Nameplate">
            <Nameplate m={m} />
          </Section>
          <Section title="Bearings">
            <Bearings m={m} canEdit={can("assets.write")} />
          </Section>
          <Section title="Measurement points">
            <MeasurementPoints m={m} canEdit={can("assets.write")} />
          </Section>
          <Findings assetId={m.id} />
          <Inspections assetId={m.id} />
        </aside>
      </div>
    </Page>
  );
}

function CurrentState({ m }: { m: AssetDetail }) {
  const l = m.latest;
  const latest = useCaptureDetail(l && l.rotorAssessable === false ? l.captureId : null);
  const reason = latest.data?.analysis?.brokenBar?.reason ?? null;
  return (
    <Section title="Current state">
      {!l ? (
        <p className="text-ink-muted">No analysed capture yet.</p>
      ) : (
        <div className="flex flex-wrap items-start gap-x-8 gap-y-3">
          <div>
            <p className="text-caption text-ink-muted">Rotor grade</p>
            <GradeBadge grade={l.rotorGrade} assessable={l.rotorAssessable} />
            <p className="mt-1 max-w-sm text-caption text-ink-muted">
              {l.rotorAssessable === false ? (
                <>Not assessable on the latest capture{reason ? <>: {reason}</> : "."}</>
              ) : l.sidebandDb !== null ? (
                <>
                  Lower sideband <span className="num text-ink">{l.sidebandDb.toFixed(1)} dB</span> below the supply line (bands: ≥ 54 R1, 48–54 R2, 42–48 R3, 36–42 R4,
                  &lt; 36 R5)
                </>
              ) : null}
            </p>
          </div>
          <Stat label="Load (estimate)">
            <Figure value={l.loadPct} unit="%" estimate="slip method" />
          </Stat>
          <Stat label="Slip">
            <Figure value={l.slip === null ? null : l.slip * 100} unit="%" digits={2} />
          </Stat>
          <Stat label="Speed">
            <Figure value={l.rpm} unit="rpm" digits={0} />
          </Stat>
          <Stat label="Supply">
            <Figure value={l.supplyHz} unit="Hz" digits={2} />
          </Stat>
          <Stat label="Vibration">
            <span className="inline-flex items-center gap-2">
              <Figure value={l.vibrationRms} unit="mm/s" digits={2} />
              <ZoneBadge zone={l.vibrationZone} />
            </span>
          </Stat>
          <Stat label="Latest capture">
            <Link to={`/captures/${l.captureId}`}>{formatDateTime(l.takenAt)}</Link>
          </Stat>
        </div>
      )}
    </Section>
  );
}

function Stat({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div>
      <p className="text-caption text-ink-muted">{label}</p>
      <div className="text-lead">{children}</div>
    </div>
  );
}

function Nameplate({ m }: { m: AssetDetail }) {
  const rows: [string, ReactNode][] = [
    ["Rated power", <Figure value={m.ratedKw} unit="kW" digits={1} />],
    ["Rated voltage", <Figure value={m.ratedVoltage} unit="V" />],
    ["Rated current", <Figure value={m.ratedCurrent} unit="A" digits={1} />],
    ["Rated frequency", <Figure value={m.ratedHz} unit="Hz" />],
    ["Full-load speed", <Figure value={m.ratedRpm} unit="rpm" />],
    ["Poles", <Figure value={m.poles} />],
    ["Rotor bars", <Figure value={m.rotorBars} />],
    ["Stator slots", <Figure value={m.statorSlots} />],
    ["Design letter", m.designLetter ?? "—"],
    ["Efficiency", <>{m.efficiencyClass ?? ""} <Figure value={m.efficiencyPct} unit="%" digits={1} /></>],
    ["Power factor", <Figure value={m.powerFactor} digits={2} />],
    ["Connection", m.connection ?? "—"],
    ["Machine group", m.machineGroup ? `group ${m.machineGroup}, ${m.support ?? "support not given"}` : "—"],
  ];
  return (
    <dl>
      {rows.map(([k, v]) => (
        <div key={k} className="flex items-baseline justify-between gap-3 border-b border-line py-1 last:border-b-0">
          <dt className="text-caption text-ink-muted">{k}</dt>
          <dd className="text-right">{v}</dd>
        </div>
      ))}
      <p className="mt-1 text-caption text-ink-faint">nameplate version {m.nameplateVersion}</p>
    </dl>
  );
}

const STATUS: Record<string, string> = { received: "received", queued: "queued", analysing: "analysing", analysed: "analysed", failed: "failed" };

function CaptureHistory({ assetId }: { assetId: number }) {
  const [page, setPage] = useState(1);
  const q = useMotorCaptureHistory(assetId, page);
  const columns: Column<Capture>[] = [
    { id: "taken", header: "Taken", cell: (c) => <Link className="whitespace-nowrap" to={`/captures/${c.id}`} title={c.channels.map((ch) => ch.name).join(", ")}>{formatDateTime(c.takenAt ?? c.createdAt)}</Link> },
    {
      id: "rotor",
      header: "Rotor",
      cell: (c) => (c.readings ? <GradeBadge compact grade={c.readings.rotorGrade} assessable={c.readings.rotorAssessable} /> : <span className="text-ink-faint">—</span>),
    },
    { id: "sideband", header: "Sideband", numeric: true, cell: (c) => <Figure value={c.readings?.sidebandDb ?? null} unit="dB" digits={1} />, hideBelow: "md" },
    { id: "load", header: "Load", numeric: true, cell: (c) => (c.readings?.loadPct != null ? <Figure value={c.readings.loadPct} unit="%" digits={0} /> : <span className="text-ink-faint">—</span>), hideBelow: "md" },
    { id: "zone", header: "Zone", cell: (c) => <ZoneBadge zone={c.readings?.vibrationZone ?? null} />, hideBelow: "md" },
    { id: "file", header: "File", cell: (c) => <span className="break-all text-caption text-ink-muted">{c.fileName ?? c.source}</span>, hideBelow: "lg" },
    { id: "duration", header: "Duration", numeric: true, cell: (c) => <Figure value={c.durationS} unit="s" digits={1} /> },
    { id: "status", header: "Status", cell: (c) => <span className={c.status === "failed" ? "text-danger" : ""}>{STATUS[c.status] ?? c.status}</span> },
  ];
  return (
    <section>
      <h2 className="mb-2 text-heading font-semibold">Capture history</h2>
      <DataTable
        columns={columns}
        rows={q.data?.items}
        rowKey={(c) => c.id}
        total={q.data?.total}
        page={page}
        pageSize={10}
        onPageChange={setPage}
        loading={q.isPending}
        error={q.error}
        caption="Captures of this motor, newest first"
      />
    </section>
  );
}

function Findings({ assetId }: { assetId: number }) {
  const q = useMotorFindings(assetId);
  const items = q.data?.items ?? [];
  return (
    <Section title="Findings">
      {q.isPending ? (
        <Spinner />
      ) : q.isError ? (
        <ErrorNote error={q.error} />
      ) : items.length === 0 ? (
        <p className="text-ink-muted">No findings.</p>
      ) : (
        <ul className="flex flex-col divide-y divide-line">
          {items.map((f: Finding) => (
            <li key={f.id} className="py-2">
              <div className="flex flex-wrap items-center gap-2">
                {f.kind === "vibration" ? <ZoneBadge zone={f.level} withWord /> : <GradeBadge grade={f.level} compact />}
                <span className={`text-caption ${f.status === "open" ? "font-semibold text-caution" : "text-ink-muted"}`}>{f.status === "open" ? "waiting for a verdict" : f.status}</span>
                <span className="ml-auto text-caption text-ink-muted">{formatDate(f.createdAt)}</span>
              </div>
              <p className="mt-0.5 text-caption">{f.summary}</p>
              {f.captureId && (
                <Link className="text-caption" to={`/captures/${f.captureId}`}>
                  Open the capture
                </Link>
              )}
            </li>
          ))}
        </ul>
      )}
    </Section>
  );
}

const INSPECTION_STATUS: Record<string, string> = { planned: "planned", in_progress: "in progress", done: "done", cancelled: "cancelled" };

function Inspections({ assetId }: { assetId: number }) {
  const q = useMotorInspections(assetId);
  const items = q.data?.items ?? [];
  const today = new Date().toISOString().slice(0, 10);
  return (
    <Section title="Inspections">
      {q.isPending ? (
        <Spinner />
      ) : q.isError ? (
        <ErrorNote error={q.error} />
      ) : items.length === 0 ? (
        <p className="text-ink-muted">No inspections planned or done.</p>
      ) : (
        <ul className="flex flex-col divide-y divide-line">
          {items.map((i: Inspection) => {
            const overdue = (i.status === "planned" || i.status === "in_progress") && i.dueDate < today;
            return (
              <li key={i.id} className="py-2">
                <div className="flex items-baseline justify-between gap-2">
                  <span className="font-medium">{i.title}</span>
                  <span className={`text-caption ${overdue ? "font-semibold text-danger" : "text-ink-muted"}`}>
                    {overdue ? "overdue · " : ""}due {formatDate(i.dueDate)}
                  </span>
                </div>
                <p className="text-caption text-ink-muted">
                  {INSPECTION_STATUS[i.status] ?? i.status} · {i.priority} priority{i.assigneeName ? ` · ${i.assigneeName}` : ""}
                  {i.outcome ? ` · ${outcomeLabel(i.outcome)}` : ""}
                </p>
              </li>
            );
          })}
        </ul>
      )}
    </Section>
  );
}

const cap = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);
