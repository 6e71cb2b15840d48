// The motor model's torque–speed and current–speed curves with starting, pull-up and breakdown points and the
// measured operating points (history fainter, latest labelled); and the model-based load beside the slip method's.
import { useMemo } from "react";
import { loadFromSlip } from "../../../engine/motor-model/index.ts";
import { formatDate } from "../../../lib/format.ts";
import { CurveChart, type AnnotatedPoint } from "../../../components/charts/CurveChart.tsx";
import type { MotorModelResponse, TrendPoint } from "../api/get-motor.ts";

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

export function ModelCurves({ model }: { model: MotorModelResponse }) {
  const { curves, keyPoints: k, operatingPoints } = model;
  const ops = operatingPoints.slice(-30);
  const opMarks = (y: "torqueNm" | "currentA", unit: string): AnnotatedPoint[] =>
    ops
      .filter((o) => o[y] !== null)
      .map((o, i) => ({
        x: o.rpm,
        y: o[y] as number,
        color: OP,
        alpha: i === ops.length - 1 ? 1 : 0.25 + (0.5 * i) / Math.max(1, ops.length - 1),
        size: i === ops.length - 1 ? 5 : 3,
        label: i === ops.length - 1 ? `now ${(o[y] as number).toFixed(y === "currentA" ? 1 : 0)} ${unit}` : undefined,
      }));
  const rpmMax = curves.rpm[curves.rpm.length - 1];
  return (
    <div className="grid gap-4 lg:grid-cols-2">
      <div className="min-w-0">
        <h3 className="font-semibold">Torque–speed</h3>
        <p className="mb-1 text-caption text-ink-muted">induced torque of the equivalent circuit; dots: operating points of the analysed captures (latest solid)</p>
        <CurveChart
          x={curves.rpm}
          series={[{ label: "torque", values: curves.torqueNm, color: CURVE, width: 2 }]}
          xLabel="Speed (rpm)"
          yLabel="Torque (N·m)"
          yDigits={0}
          xRange={[0, rpmMax]}
          points={[...keyPointMarks(k, "torqueNm", "N·m"), ...opMarks("torqueNm", "N·m")]}
          height={260}
          label="Torque against speed from the motor model"
        />
      </div>
      <div className="min-w-0">
        <h3 className="font-semibold">Current–speed</h3>
        <p className="mb-1 text-caption text-ink-muted">line current of the equivalent circuit</p>
        <CurveChart
          x={curves.rpm}
          series={[{ label: "current", values: curves.currentA, color: CURVE, width: 2 }]}
          xLabel="Speed (rpm)"
          yLabel="Line current (A)"
          yDigits={0}
          xRange={[0, rpmMax]}
          points={[...keyPointMarks(k, "currentA", "A"), ...opMarks("currentA", "A")]}
          height={260}
          label="Current against speed from the motor model"
        />
      </div>
    </div>
  );
}

/** Model-based load (equivalent circuit at the measured slip) beside the slip method's load, per capture. */
export function LoadComparison({ model, points, ratedKw }: { model: MotorModelResponse; points: TrendPoint[]; ratedKw: number | null }) {
  const rows = useMemo(() => {
    if (!ratedKw) return [];
    return points
      .filter((p) => p.slip !== null && p.slip > 0 && p.slip < 1)
      .slice(-8)
      .map((p) => {
        const m = loadFromSlip(model.input, p.slip!, ratedKw * 1000);
        return { p, model: m.loadPct, diff: p.loadPct === null ? null : m.loadPct - p.loadPct };
      })
      .reverse();
  }, [model, points, ratedKw]);
  if (!ratedKw) return <p className="text-ink-muted">Rated kW is missing from the nameplate, so the model-based load cannot be given.</p>;
  if (!rows.length) return <p className="text-ink-muted">No capture with a measured slip yet.</p>;
  const diffs = rows.map((r) => r.diff).filter((d): d is number => d !== null);
  const meanAbs = diffs.length ? diffs.reduce((a, b) => a + Math.abs(b), 0) / diffs.length : null;
  return (
    <div>
      <p className="mb-2 text-caption text-ink-muted">
        Both are estimates. Slip method: load ∝ slip (from the capture's analysis). Model-based: the equivalent circuit's shaft output at the measured slip,
        as a share of rated output.
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
          </tr>
        </thead>
        <tbody>
          {rows.map(({ p, model: m, diff }) => (
            <tr key={p.analysisId} className="border-b border-line last:border-b-0">
              <td className="py-1">{formatDate(p.takenAt)}</td>
              <td className="num py-1 text-right">{(p.slip! * 100).toFixed(2)} %</td>
              <td className="num py-1 text-right">{p.loadPct === null ? "—" : `≈ ${p.loadPct.toFixed(0)} %`}</td>
              <td className="num py-1 text-right">≈ {m.toFixed(0)} %</td>
              <td className="num py-1 text-right">{diff === null ? "—" : `${diff >= 0 ? "+" : "\u2212"}${Math.abs(diff).toFixed(1)} pp`}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
