// Analysis versions of one capture (a re-analysis after a nameplate fix keeps the older results): one line per
// version with its headline readings, the current one marked, and what changed between the current analysis and
// a chosen earlier one (the readings that differ, old → new, and what each was computed from).
import { useState } from "react";
import { ErrorNote } from "../../../components/Alert.tsx";
import { Button } from "../../../components/Button.tsx";
import { Figure } from "../../../components/Figure.tsx";
import { GradeBadge } from "../../../components/GradeBadge.tsx";
import { ZoneBadge } from "../../../components/ZoneBadge.tsx";
import { formatDateTime } from "../../../lib/format.ts";
import { useAnalysisVersion, useAnalysisVersions, type AnalysisVersion } from "../api/get-analyses.ts";
import { compareAnalyses, gradeSide, pickComparison, type ReadingChange } from "../lib/analysis-diff.ts";
import { Readings } from "./Readings.tsx";

const CURRENT_TAG = "rounded-sm border border-brand/30 bg-brand-soft px-1.5 py-px text-caption font-medium text-brand-strong";

function VersionGrade({ v }: { v: AnalysisVersion }) {
  const g = gradeSide(v);
  return <GradeBadge compact grade={g.grade} assessable={g.assessable} reason={g.reason} />;
}

export function AnalysisVersions({ captureId }: { captureId: number }) {
  const list = useAnalysisVersions(captureId);
  const [chosenId, setChosenId] = useState<number | null>(null);
  const [showAll, setShowAll] = useState(false);
  const versions = list.data?.items ?? [];
  const pick = pickComparison(versions, chosenId);
  const chosenFull = useAnalysisVersion(captureId, pick?.chosen.id ?? null, showAll);

  if (list.isPending) return <p className="text-ink-muted">Loading the analysis versions…</p>;
  if (list.isError) return <ErrorNote error={list.error} />;

  return (
    <div className="flex flex-col gap-4" data-testid="analysis-versions">
      <p className="text-caption text-ink-muted">
        This capture was analysed {versions.length} times: a re-analysis (after a nameplate change or a new engine) keeps the earlier results. The current
        analysis is the one this page shows and the motor's readings, trend and findings use.
      </p>
      <div className="overflow-x-auto">
        <table className="w-full text-body">
          <caption className="sr-only">Analysis versions of this capture, newest first</caption>
          <thead>
            <tr className="text-caption text-ink-muted">
              <th className="py-1 pr-2 text-left font-medium">Compare</th>
              <th className="py-1 pr-2 text-left font-medium">Version</th>
              <th className="py-1 pr-2 text-left font-medium">Analysed</th>
              <th className="py-1 pr-2 text-left font-medium">Engine</th>
              <th className="py-1 pr-2 text-left font-medium">Rotor grade</th>
              <th className="py-1 pl-2 text-right font-medium">Load</th>
              <th className="py-1 pl-2 text-right font-medium">Slip</th>
              <th className="py-1 pl-2 text-right font-medium">Sideband depth</th>
            </tr>
          </thead>
          <tbody>
            {versions.map((v) => (
              <tr key={v.id} className={`border-t border-line ${v.isCurrent ? "bg-sunken/60" : ""}`} data-version={v.version} data-current={v.isCurrent || undefined}>
                <td className="py-1 pr-2">
                  {!v.isCurrent && (
                    <input
                      type="radio"
                      name={`compare-${captureId}`}
                      checked={pick?.chosen.id === v.id}
                      onChange={() => setChosenId(v.id)}
                      aria-label={`Compare analysis v${v.version} with the current one`}
                    />
                  )}
                </td>
                <td className="whitespace-nowrap py-1 pr-2">
                  <span className="num">v{v.version}</span>
                  {v.isCurrent && <span className={`ml-1.5 ${CURRENT_TAG}`}>Current</span>}
                </td>
                <td className="whitespace-nowrap py-1 pr-2">{formatDateTime(v.createdAt)}</td>
                <td className="num py-1 pr-2" title={v.nameplateVersion !== null ? `Nameplate v${v.nameplateVersion}` : undefined}>
                  {v.engineVersion}
                </td>
                <td className="py-1 pr-2">
                  <VersionGrade v={v} />
                </td>
                <td className="py-1 pl-2 text-right">
                  <Figure value={v.loadPct} unit="%" digits={0} estimate />
                </td>
                <td className="py-1 pl-2 text-right">
                  <Figure value={v.slip === null ? null : v.slip * 100} unit="%" digits={2} />
                </td>
                <td className="py-1 pl-2 text-right">
                  <Figure value={v.sidebandDb} unit="dB" digits={1} />
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>

      {pick && <WhatChanged from={pick.chosen} to={pick.current} />}

      {pick && (
        <div>
          <Button variant="ghost" size="sm" aria-expanded={showAll} onClick={() => setShowAll((x) => !x)}>
            {showAll ? "Hide" : "Show"} every reading of v{pick.chosen.version}
          </Button>
          {showAll && (
            <div className="mt-2 max-w-xl rounded-md border border-line p-3">
              {chosenFull.isPending ? <p className="text-ink-muted">Loading v{pick.chosen.version}…</p> : chosenFull.isError ? <ErrorNote error={chosenFull.error} /> : <Readings a={chosenFull.data} />}
            </div>
          )}
        </div>
      )}
    </div>
  );
}

function Side({ c, side }: { c: ReadingChange; side: "from" | "to" }) {
  if (c.kind === "grade") {
    const g = c[side];
    return <GradeBadge compact grade={g.grade} assessable={g.assessable} reason={g.reason} />;
  }
  if (c.kind === "zone") return <ZoneBadge zone={c[side]} />;
  return <Figure value={c[side]} unit={c.unit} digits={c.digits} estimate={c.estimate} />;
}

function ChangeNote({ c }: { c: ReadingChange }) {
  if (c.kind === "number") return c.delta === null ? <span className="text-ink-faint">—</span> : <Figure value={c.delta} unit={c.unit} digits={c.digits} signed />;
  if (c.direction === null) return <span className="text-ink-faint">—</span>;
  return <span className={c.direction === "worse" ? "font-medium text-danger" : "text-ok"}>{c.direction}</span>;
}

/** Side by side: the readings that differ between an earlier analysis and the current one, old → new. */
function WhatChanged({ from, to }: { from: AnalysisVersion; to: AnalysisVersion }) {
  const d = compareAnalyses(from, to);
  return (
    <div data-testid="what-changed">
      <h3 className="mb-1 font-semibold">
        What changed: <span className="num">v{from.version}</span> → <span className="num">v{to.version}</span> <span className="font-normal text-ink-muted">(current)</span>
      </h3>
      {d.basis.length > 0 ? (
        <p className="mb-2 text-caption text-ink-muted">
          Computed from:{" "}
          {d.basis.map((b, i) => (
            <span key={b.key}>
              {i > 0 && " · "}
              {b.label} <span className="num text-ink">{b.from}</span> → <span className="num text-ink">{b.to}</span>
            </span>
          ))}
        </p>
      ) : (
        <p className="mb-2 text-caption text-ink-muted">Both were computed by the same engine from the same nameplate.</p>
      )}
      {d.readings.length === 0 ? (
        <p className="text-ink-muted">No reading changed at the precision shown.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full max-w-2xl text-body">
            <caption className="sr-only">
              Readings that differ between analysis v{from.version} and the current v{to.version}
            </caption>
            <thead>
              <tr className="text-caption text-ink-muted">
                <th className="py-1 pr-2 text-left font-medium">Reading</th>
                <th className="py-1 pl-2 text-right font-medium">
                  v{from.version} <span className="font-normal">{formatDateTime(from.createdAt)}</span>
                </th>
                <th className="py-1 pl-2 text-right font-medium">
                  v{to.version} <span className="font-normal">current</span>
                </th>
                <th className="py-1 pl-2 text-right font-medium">Change</th>
              </tr>
            </thead>
            <tbody>
              {d.readings.map((c) => (
                <tr key={c.key} className="border-t border-line" data-reading={c.key}>
                  <td className="py-1 pr-2">{c.label}</td>
                  <td className="py-1 pl-2 text-right">
                    <Side c={c} side="from" />
                  </td>
                  <td className="py-1 pl-2 text-right">
                    <Side c={c} side="to" />
                  </td>
                  <td className="py-1 pl-2 text-right">
                    <ChangeNote c={c} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      {d.unchanged.length > 0 && d.readings.length > 0 && <p className="mt-1 text-caption text-ink-faint">Unchanged: {d.unchanged.join(", ").toLowerCase()}.</p>}
    </div>
  );
}
