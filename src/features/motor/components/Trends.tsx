// Trends over time of load, slip, sideband depth and vibration RMS, with the grade boundaries (54/48/42/36 dB,
// R1..R5) and the ISO zone limits drawn, and the projection of the sideband trend to the next boundary.
import { useMemo } from "react";
import { EmptyState } from "../../../components/EmptyState.tsx";
import type { AssetDetail } from "../../../lib/contracts.ts";
import { formatDate } from "../../../lib/format.ts";
import { ROTOR_GRADE_NAMES, type RotorGrade } from "../../../engine/types.ts";
import { ZONE_LIMITS_MM_S } from "../../../engine/vibration.ts";
import { LIGHT_LOAD_PCT } from "../../../engine/rotor.ts";
import { CurveChart, type CurveSeries, type GuideLine, type RegionLabel } from "../../../components/charts/CurveChart.tsx";
import type { TrendAnswer, TrendPoint } from "../api/get-motor.ts";
import { bandHalfWidth, GRADE_BOUNDARIES_DB, type ProjectionOutcome } from "../lib/projection.ts";
import { machineClass, sidebandProjection, truncationNote } from "../lib/trend.ts";

const DAY_MS = 86_400_000;
const LINE = "#084c4e";
const PROJ = "#ad5228";
const NA_COLOR = "#85888c";

const GRADE_GUIDES: GuideLine[] = GRADE_BOUNDARIES_DB.map((db, i) => ({ y: db, label: `${db} dB  R${i + 1} | R${i + 2}`, color: "rgba(94,27,23,0.75)" }));
const GRADE_REGIONS: RegionLabel[] = [
  { from: 54, to: 200, label: "R1 Sound" },
  { from: 48, to: 54, label: "R2 Watch" },
  { from: 42, to: 48, label: "R3 Developing" },
  { from: 36, to: 42, label: "R4 Serious" },
  { from: -100, to: 36, label: "R5 Severe" },
];

/** "12 Oct 2026 · 88 %": the trends' shared pointer readout (x in seconds). */
const readoutOf = (unit: string, digits: number) => (x: number, y: number) => `${formatDate(new Date(x * 1000).toISOString())} · ${y.toFixed(digits)} ${unit}`;

export function Trends({ asset, points }: { asset: AssetDetail; points: TrendPoint[] }) {
  const sync = `trends-${asset.id}`;
  const ts = useMemo(() => points.map((p) => Date.parse(p.takenAt) / 1000), [points]);
  const { outcome } = useMemo(() => sidebandProjection(points), [points]);
  if (points.length === 0) return <EmptyState title="No analysed captures yet">Trends appear after the first analysed capture.</EmptyState>;

  const ns = asset.ratedHz && asset.poles ? (120 * asset.ratedHz) / asset.poles : null;
  const ratedSlip = ns && asset.ratedRpm ? (ns - asset.ratedRpm) / ns : null;
  const cls = machineClass(asset);
  const limits = ZONE_LIMITS_MM_S[cls.group][cls.support];
  const vib = points.map((p) => p.vibrationRms);
  const vibMax = Math.max(0, ...vib.filter((v): v is number => v !== null));
  const hasVib = vib.some((v) => v !== null);
  const loadMax = Math.max(0, ...points.map((p) => p.loadPct ?? 0));

  return (
    <div className="grid gap-4 lg:grid-cols-2">
      <TrendBox title="Lower sideband depth below supply" note="higher is healthier; lines are the grade boundaries" wide>
        <SidebandChart points={points} outcome={outcome} syncKey={sync} />
        {points.some((p) => p.rotorAssessable === false) && (
          <p className="flex items-start gap-1.5 text-caption text-ink-muted" data-testid="not-assessable-legend">
            <svg width="12" height="12" aria-hidden="true" className="mt-0.5 shrink-0">
              <circle cx="6" cy="6" r="4" fill="#fff" stroke={NA_COLOR} strokeWidth="2" />
            </svg>
            <span>
              Not assessable (e.g. light load): not graded and not used in the projection; on the date axis when the capture has no depth. Point at a
              ring for its date.
            </span>
          </p>
        )}
        {!points.some((p) => p.sidebandDb !== null) && (
          <p className="text-caption text-ink-muted">
            None of the <span className="num">{points.length}</span> captures could be graded (not assessable, e.g. light load); open a capture for its reason.
          </p>
        )}
      </TrendBox>
      <TrendBox title="Load" note="estimate from slip (see each capture for the method)">
        <CurveChart
          x={ts}
          xTime
          series={[{ label: "load", values: points.map((p) => p.loadPct), color: LINE, points: true, spanGaps: true }]}
          xLabel="Capture date"
          yLabel="Load (% of rated)"
          yDigits={0}
          yRange={[0, Math.max(115, loadMax * 1.08)]}
          guides={[
            { y: 100, label: "100 % rated" },
            { y: LIGHT_LOAD_PCT, label: `${LIGHT_LOAD_PCT} % light load: rotor grade not assessable below`, shortLabel: `${LIGHT_LOAD_PCT} % light load`, color: "rgba(107,77,0,0.8)" },
          ]}
          height={220}
          label="Load percentage over time"
          syncKey={sync}
          readout={readoutOf("%", 0)}
        />
      </TrendBox>
      <TrendBox title="Slip" note={ratedSlip !== null ? `rated slip ${(ratedSlip * 100).toFixed(2)} % from the nameplate` : undefined}>
        <CurveChart
          x={ts}
          xTime
          series={[{ label: "slip", values: points.map((p) => (p.slip === null ? null : p.slip * 100)), color: LINE, points: true, spanGaps: true }]}
          xLabel="Capture date"
          yLabel="Slip (%)"
          yDigits={2}
          guides={ratedSlip !== null ? [{ y: ratedSlip * 100, label: `rated ${(ratedSlip * 100).toFixed(2)} %` }] : []}
          height={220}
          label="Slip over time"
          syncKey={sync}
          readout={readoutOf("%", 2)}
        />
      </TrendBox>
      <TrendBox
        title="Vibration velocity RMS"
        note={`ISO 20816-3 zone limits for group ${cls.group}, ${cls.support} support${cls.assumed ? " (assumed from the nameplate)" : ""}`}
      >
        {hasVib ? (
          <CurveChart
            x={ts}
            xTime
            series={[{ label: "vibration", values: vib, color: LINE, points: true, spanGaps: true }]}
            xLabel="Capture date"
            yLabel="Velocity RMS (mm/s)"
            yDigits={1}
            yRange={[0, Math.max(limits[2] * 1.35, vibMax * 1.15)]}
            guides={[
              { y: limits[0], label: `A | B ${limits[0]} mm/s`, color: "rgba(45,106,59,0.9)" },
              { y: limits[1], label: `B | C ${limits[1]} mm/s`, color: "rgba(107,77,0,0.9)" },
              { y: limits[2], label: `C | D ${limits[2]} mm/s`, color: "rgba(158,31,71,0.9)" },
            ]}
            regions={[
              { from: 0, to: limits[0], label: "zone A" },
              { from: limits[0], to: limits[1], label: "zone B" },
              { from: limits[1], to: limits[2], label: "zone C" },
              { from: limits[2], to: 1000, label: "zone D" },
            ]}
            height={220}
            label="Vibration RMS over time with ISO zone limits"
            syncKey={sync}
            readout={readoutOf("mm/s", 2)}
          />
        ) : (
          <p className="text-ink-muted">No vibration readings for this motor.</p>
        )}
      </TrendBox>
    </div>
  );
}

/** One line above the charts when the server sent only the newest readings (its cap); nothing otherwise. */
export function TrendTruncationNote({ answer }: { answer: TrendAnswer | undefined }) {
  const note = truncationNote(answer);
  if (!note) return null;
  return (
    <p className="mb-2 text-caption text-ink-muted" data-testid="trend-truncated">
      {note}
    </p>
  );
}

function TrendBox({ title, note, children, wide }: { title: string; note?: string; children: React.ReactNode; wide?: boolean }) {
  return (
    <div className={`min-w-0 ${wide ? "lg:col-span-2" : ""}`}>
      <h3 className="font-semibold">{title}</h3>
      {note && <p className="mb-1 text-caption text-ink-muted">{note}</p>}
      {children}
    </div>
  );
}

function SidebandChart({ points, outcome, syncKey }: { points: TrendPoint[]; outcome: ProjectionOutcome; syncKey: string }) {
  const chart = useMemo(() => {
    // Graded captures make the line; not-assessable ones with a depth are hollow rings off the line.
    const measured = points.filter((p) => p.sidebandDb !== null && p.rotorAssessable !== false).map((p) => ({ t: Date.parse(p.takenAt), db: p.sidebandDb! }));
    const notAssessable = points.filter((p) => p.rotorAssessable === false).map((p) => ({ t: Date.parse(p.takenAt), db: p.sidebandDb }));
    const grid: number[] = [];
    const proj = outcome.kind === "projection" ? outcome.projection : null;
    if (proj) {
      // From a little before the last capture to the far end of the crossing interval (at most a year on).
      const last = measured.length ? measured[measured.length - 1].t : proj.crossingMs;
      const end = Math.min(proj.hiMs ?? proj.crossingMs + 3 * proj.seDays * DAY_MS, proj.crossingMs + 365 * DAY_MS);
      const start = last - 30 * DAY_MS;
      for (let i = 0; i <= 40; i++) grid.push(start + ((Math.max(end, proj.crossingMs + DAY_MS) - start) * i) / 40);
    }
    const xsMs = [...new Set([...measured.map((m) => m.t), ...notAssessable.map((m) => m.t), ...grid])].sort((a, b) => a - b);
    const byT = new Map(measured.map((m) => [m.t, m.db]));
    const vals = xsMs.map((t) => byT.get(t) ?? null);
    const series: CurveSeries[] = [{ label: "measured", values: vals, color: LINE, points: true, spanGaps: true }];
    let bands: { upper: number; lower: number; fill: string }[] | undefined;
    if (proj) {
      // The fit's x is days since the first fitted point (projectSideband), recovered from the crossing.
      const tFirst = proj.crossingMs - ((proj.boundaryDb - proj.fit.intercept) / proj.fit.slope) * DAY_MS;
      const inGrid = new Set(grid);
      const fitAt = (t: number) => (inGrid.has(t) ? proj.fit.intercept + proj.fit.slope * ((t - tFirst) / DAY_MS) : null);
      const half = (t: number) => bandHalfWidth(proj.fit, (t - tFirst) / DAY_MS);
      series.push({ label: "projection (estimate)", values: xsMs.map(fitAt), color: PROJ, points: false, spanGaps: true, dash: [6, 4] });
      series.push({ label: "95 % band upper", values: xsMs.map((t) => (inGrid.has(t) ? fitAt(t)! + half(t) : null)), color: "rgba(173,82,40,0.35)", points: false, spanGaps: true });
      series.push({ label: "95 % band lower", values: xsMs.map((t) => (inGrid.has(t) ? fitAt(t)! - half(t) : null)), color: "rgba(173,82,40,0.35)", points: false, spanGaps: true });
      bands = [{ upper: 3, lower: 4, fill: "rgba(173,82,40,0.12)" }];
    }
    const all = [...measured.map((m) => m.db), ...notAssessable.flatMap((m) => (m.db === null ? [] : [m.db]))];
    const lo = Math.min(30, ...all.map((v) => v - 3));
    const hi = Math.max(60, ...all.map((v) => v + 3));
    // A little room at both ends, so the first and last markers are not cut by the plot's edge.
    const pad = xsMs.length > 1 ? (xsMs[xsMs.length - 1] - xsMs[0]) * 0.015 : DAY_MS;
    const xRange = xsMs.length ? ([(xsMs[0] - pad) / 1000, (xsMs[xsMs.length - 1] + pad) / 1000] as [number, number]) : undefined;
    return { x: xsMs.map((t) => t / 1000), series, bands, yRange: [lo, hi] as [number, number], xRange, proj, notAssessable };
  }, [points, outcome]);

  return (
    <CurveChart
      x={chart.x}
      xTime
      series={chart.series}
      bands={chart.bands}
      xLabel="Capture date"
      yLabel="Depth below supply (dB)"
      yDigits={0}
      yRange={chart.yRange}
      xRange={chart.xRange}
      guides={GRADE_GUIDES}
      regions={GRADE_REGIONS}
      syncKey={syncKey}
      readout={readoutOf("dB", 1)}
      points={[
        ...chart.notAssessable.map((m) => ({
          x: m.t / 1000,
          y: m.db,
          color: NA_COLOR,
          shape: "ring" as const,
          size: 4,
          hint: `Not assessable · ${formatDate(new Date(m.t).toISOString())}${m.db === null ? "" : ` · ${m.db.toFixed(1)} dB, not graded`}`,
        })),
        ...(chart.proj
          ? [{ x: chart.proj.crossingMs / 1000, y: chart.proj.boundaryDb, color: PROJ, shape: "diamond" as const, label: `≈ ${formatDate(new Date(chart.proj.crossingMs).toISOString())} (estimate)` }]
          : []),
      ]}
      height={300}
      label="Sideband depth over time with grade boundaries and projection"
    />
  );
}

export function ProjectionNote({ points }: { points: TrendPoint[] }) {
  const { outcome, used } = useMemo(() => sidebandProjection(points), [points]);
  const method = `Linear least-squares fit of the last ${used.length} graded captures`;
  return (
    <div className="rounded-md border border-dashed border-line-strong bg-sunken/40 p-3" data-testid="projection">
      <p className="mb-1 text-caption font-semibold uppercase tracking-wide text-ink-muted">Projection · estimate</p>
      {outcome.kind === "too-few" ? (
        <p>
          Not enough graded captures to project the sideband trend: <span className="num">{outcome.have}</span> of the{" "}
          <span className="num">{outcome.needed}</span> needed.
        </p>
      ) : outcome.kind === "not-worsening" ? (
        <p>
          The sideband trend is not worsening (<span className="num">{fmtRate(outcome.slopeDbPerDay)}</span>), so no crossing of the next grade boundary is
          projected. <span className="text-ink-muted">{method}.</span>
        </p>
      ) : outcome.kind === "past-last-boundary" ? (
        <p>The sideband depth is already below the last boundary (36 dB, R5 Severe).</p>
      ) : (
        (() => {
          const p = outcome.projection;
          const grade = p.nextGrade as RotorGrade;
          return (
            <>
              <p>
                The lower sideband depth is falling by <span className="num">{Math.abs(p.fit.slope).toFixed(3)} dB/day</span> (± <span className="num">{p.fit.seSlope.toFixed(3)} dB/day</span> standard
                error). At this rate it reaches <span className="num">{p.boundaryDb} dB</span> ({grade} {ROTOR_GRADE_NAMES[grade]}) around{" "}
                <strong className="num">{formatDate(new Date(p.crossingMs).toISOString())}</strong>, ± <span className="num">{p.seDays.toFixed(0)} days</span> (standard
                error of the crossing time).
              </p>
              <p className="mt-1 text-ink-muted">
                95 % interval from the fit's confidence band: <span className="num">{formatDate(new Date(p.loMs).toISOString())}</span> to{" "}
                <span className="num">{p.hiMs === null ? "not bounded (the trend is too uncertain)" : formatDate(new Date(p.hiMs).toISOString())}</span>. {method}; R² ={" "}
                <span className="num">{p.fit.r2.toFixed(2)}</span>. A projection assumes the trend continues at similar load; it is not a prediction of failure.
              </p>
            </>
          );
        })()
      )}
    </div>
  );
}

function fmtRate(dbPerDay: number): string {
  return `${dbPerDay < 0 ? "\u2212" : "+"}${Math.abs(dbPerDay).toFixed(3)} dB/day`;
}
