// The motor model's torque–speed and current–speed curves with starting, pull-up and breakdown points and the
// measured operating points (history fainter, latest labelled): on the current curve at their MEASURED current, so a
// point that does not fit the model stands off the curve; a flagged point (current far from the model's, slip beyond
// breakdown) is a diamond with a text label, never marked by colour alone. And the model-based load beside the slip
// method's, per capture.
import { Link } from "react-router-dom";
import { formatDate } from "../../../lib/format.ts";
import { CurveChart, type AnnotatedPoint } from "../../../components/charts/CurveChart.tsx";
import type { ModelOperatingPoint, MotorModelResponse } from "../api/get-motor.ts";
import { flagLabel } from "../lib/motor-model-form.ts";

const CURVE = "#084c4e";
const OP = "#ad5228";
const KEY = "#1c1e20";

export function keyPointMarks(k: MotorModelResponse["keyPoints"], y: "torqueNm" | "currentA", unit: string, digits = 0): AnnotatedPoint[] {
  const pts: AnnotatedPoint[] = [
    { x: k.start.rpm, y: k.start[y], color: KEY, shape: "ring", label: `start ${k.start[y].toFixed(digits)} ${unit}` },
    { x: k.breakdown.rpm, y: k.breakdown[y], color: KEY, shape: "ring", label: `breakdown ${k.breakdown[y].toFixed(digits)} ${unit}` },
  ];
  // Without a dip on the way up (always for a single cage) the pull-up is the start point; draw it only where it differs.
  if (Math.abs(k.pullUp.rpm - k.start.rpm) > 1) pts.push({ x: k.pullUp.rpm, y: k.pullUp[y], color: KEY, shape: "ring", label: `pull-up ${k.pullUp[y].toFixed(digits)} ${unit}` });
  return pts;
}

/** How many flagged points get a text label on the chart (the newest); all of them are listed under the charts. */
const LABELLED_FLAGS = 5;

/** The operating points on one chart: dots that fit, diamonds with a label that do not, the latest labelled "now". */
export function operatingPointMarks(ops: ModelOperatingPoint[], y: "torqueNm" | "currentA", unit: string): AnnotatedPoint[] {
  const digits = y === "currentA" ? 1 : 0;
  const shown = ops.filter((o) => o[y] !== null);
  const flagged = shown.filter((o) => o.flags.length > 0);
  const labelled = new Set(flagged.slice(-LABELLED_FLAGS));
  return shown.map((o, i) => {
    const last = i === shown.length - 1;
    const words = o.flags.map((f) => flagLabel(f, o.currentRatio)).join(", ");
    const value = `${(o[y] as number).toFixed(digits)} ${unit}`;
    const label = last ? `now ${value}${words ? ` · ${words}` : ""}` : labelled.has(o) ? `${formatDate(o.takenAt)} · ${words}` : undefined;
    return {
      x: o.rpm,
      y: o[y] as number,
      color: OP,
      alpha: last || o.flags.length ? 1 : 0.25 + (0.5 * i) / Math.max(1, shown.length - 1),
      shape: o.flags.length ? ("diamond" as const) : ("dot" as const),
      size: last || o.flags.length ? 5 : 3,
      label,
      hint: `${formatDate(o.takenAt)}: ${value}${o.flags.length ? ` · ${o.flags.map((f) => f.message).join(" ")}` : ""}`,
    };
  });
}

export function ModelCurves({ model }: { model: MotorModelResponse }) {
  const { curves, keyPoints: k, operatingPoints } = model;
  const ops = operatingPoints.slice(-30);
  const withoutCurrent = ops.filter((o) => o.currentA === null).length;
  const flagged = ops.filter((o) => o.flags.length > 0);
  const rpmMax = curves.rpm[curves.rpm.length - 1];
  return (
    <div>
      <div className="grid gap-4 lg:grid-cols-2">
        <div className="min-w-0">
          <h3 className="font-semibold">Torque–speed</h3>
          <p className="mb-1 text-caption text-ink-muted">induced torque of the equivalent circuit; dots: the model's torque at the measured slip of each analysed capture (latest solid)</p>
          <CurveChart
            x={curves.rpm}
            series={[{ label: "torque", values: curves.torqueNm, color: CURVE, width: 2 }]}
            xLabel="Speed (rpm)"
            yLabel="Torque (N·m)"
            yDigits={0}
            xRange={[0, rpmMax]}
            points={[...keyPointMarks(k, "torqueNm", "N·m"), ...operatingPointMarks(ops, "torqueNm", "N·m")]}
            height={260}
            label="Torque against speed from the motor model"
          />
        </div>
        <div className="min-w-0">
          <h3 className="font-semibold">Current–speed</h3>
          <p className="mb-1 text-caption text-ink-muted">
            line current of the equivalent circuit; dots: the measured current at the measured speed, on the curve when the capture fits the model
            {withoutCurrent > 0 && ` (${withoutCurrent} capture${withoutCurrent === 1 ? "" : "s"} without a current channel left out)`}
          </p>
          <CurveChart
            x={curves.rpm}
            series={[{ label: "current", values: curves.currentA, color: CURVE, width: 2 }]}
            xLabel="Speed (rpm)"
            yLabel="Line current (A)"
            yDigits={0}
            xRange={[0, rpmMax]}
            points={[...keyPointMarks(k, "currentA", "A"), ...operatingPointMarks(ops, "currentA", "A")]}
            height={260}
            label="Current against speed from the motor model, with the measured current of the analysed captures"
          />
        </div>
      </div>
      <p className="mt-2 text-caption text-ink-muted">
        ● fits the model · ◆ does not fit (labelled): measured current more than ±{model.currentTolerancePct} % from the model's at that slip, or slip beyond the
        model's breakdown slip. That often means wrong nameplate data behind the model.
      </p>
      {flagged.length > 0 && (
        <ul className="mt-1 flex flex-col gap-1 text-caption" data-testid="model-flags">
          {flagged
            .slice()
            .reverse()
            .map((o) => (
              <li key={o.analysisId} className="rounded-md border border-caution/40 bg-caution-soft px-2 py-1 text-caution">
                <span aria-hidden="true">◆ </span>
                <Link to={`/captures/${o.captureId}`}>{formatDate(o.takenAt)}</Link>: {o.flags.map((f) => f.message).join(" ")}
              </li>
            ))}
        </ul>
      )}
    </div>
  );
}

/** Model-based load (equivalent circuit at the measured slip) beside the slip method's load, per capture. */
export function LoadComparison({ model, ratedKw }: { model: MotorModelResponse; ratedKw: number | null }) {
  const rows = model.operatingPoints
    .filter((o) => o.loadPct !== null)
    .slice(-8)
    .map((o) => ({ o, diff: o.slipMethodLoadPct === null ? null : (o.loadPct as number) - o.slipMethodLoadPct }))
    .reverse();
  if (!ratedKw) return <p className="text-ink-muted">Rated kW is missing from the nameplate, so the model-based load cannot be given.</p>;
  if (!rows.length) return <p className="text-ink-muted">No capture with a measured slip yet.</p>;
  const diffs = rows.map((r) => r.diff).filter((d): d is number => d !== null);
  const meanAbs = diffs.length ? diffs.reduce((a, b) => a + Math.abs(b), 0) / diffs.length : null;
  return (
    <div>
      <p className="mb-2 text-caption text-ink-muted">
        Both are estimates. Slip method: load ∝ slip (from the capture's analysis). Model-based: the equivalent circuit's shaft output at the measured slip
        ({model.origin === "measured" ? "measured circuit values" : "circuit estimated from the nameplate"}), as a share of rated output.
        {meanAbs !== null && (
          <>
            {" "}They differ by <span className="num text-ink">{meanAbs.toFixed(1)} percentage points</span> on average
            {meanAbs > 10 ? ": check the nameplate data behind the model." : "."}
          </>
        )}
      </p>
      <table className="w-full text-body">
        <thead>
          <tr className="border-b border-line text-caption text-ink-muted">
            <th className="py-1 text-left font-medium">Capture</th>
            <th className="py-1 text-right font-medium">Slip</th>
            <th className="py-1 text-right font-medium">Slip-method load</th>
            <th className="py-1 text-right font-medium">Model-based load</th>
            <th className="py-1 text-right font-medium">Apart</th>
            <th className="py-1 text-right font-medium">Current, measured / model</th>
          </tr>
        </thead>
        <tbody>
          {rows.map(({ o, diff }) => (
            <tr key={o.analysisId} className="border-b border-line last:border-b-0">
              <td className="py-1">
                <Link to={`/captures/${o.captureId}`}>{formatDate(o.takenAt)}</Link>
                {o.flags.length > 0 && <span className="ml-1 text-caption text-caution">◆ {o.flags.map((f) => flagLabel(f, o.currentRatio)).join(", ")}</span>}
              </td>
              <td className="num py-1 text-right">{(o.slip * 100).toFixed(2)} %</td>
              <td className="num py-1 text-right">{o.slipMethodLoadPct === null ? "—" : `≈ ${o.slipMethodLoadPct.toFixed(0)} %`}</td>
              <td className="num py-1 text-right">≈ {(o.loadPct as number).toFixed(0)} %</td>
              <td className="num py-1 text-right">{diff === null ? "—" : `${diff >= 0 ? "+" : "\u2212"}${Math.abs(diff).toFixed(1)} pp`}</td>
              <td className="num py-1 text-right">
                {o.currentA === null ? "—" : o.currentA.toFixed(1)} / {o.modelCurrentA === null ? "—" : `${o.modelCurrentA.toFixed(1)} A`}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
