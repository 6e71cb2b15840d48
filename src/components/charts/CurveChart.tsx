// A plain x–y chart of one or more curves on a shared x array, with annotated points (operating points, key
// points) and horizontal guide lines (grade boundaries, zone limits) drawn on top. Used by the motor page trends,
// the motor-model curves and the calculator.
import { useMemo, useRef } from "react";
import type uPlot from "uplot";
import { axis, MONO_FONT, UPlotChart } from "./UPlotChart.tsx";

export interface CurveSeries {
  label: string;
  values: (number | null)[];
  color: string;
  width?: number;
  dash?: number[];
  /** Draw the samples as dots (measured points) rather than only a line. */
  points?: boolean;
  /** Join over nulls (measured series on a merged x grid). */
  spanGaps?: boolean;
}

export interface AnnotatedPoint {
  x: number;
  /** null: an event without a value (e.g. a capture that could not be graded), drawn on the x axis. */
  y: number | null;
  label?: string;
  color: string;
  /** 0..1: older history points are drawn fainter. */
  alpha?: number;
  /** "ring" is hollow (e.g. a reading that could not be graded). */
  shape?: "dot" | "ring" | "diamond";
  size?: number;
  /** Tooltip when the pointer is over the point. */
  hint?: string;
}

export interface GuideLine {
  y: number;
  label: string;
  /** Drawn instead of `label` when the plot is too narrow for it. */
  shortLabel?: string;
  color?: string;
  dash?: number[];
}

export interface RegionLabel {
  from: number;
  to: number;
  label: string;
}

export interface CurveChartProps {
  x: number[];
  series: CurveSeries[];
  /** Pairs of series indexes (1-based in uPlot terms: series[0] is 1) filled between. */
  bands?: { upper: number; lower: number; fill: string }[];
  xLabel: string;
  yLabel: string;
  xTime?: boolean;
  height?: number;
  points?: AnnotatedPoint[];
  guides?: GuideLine[];
  regions?: RegionLabel[];
  yRange?: [number, number];
  xRange?: [number, number];
  label: string;
  yDigits?: number;
  /**
   * Charts with the same key share the pointer: a vertical line at the same x in each (the motor page's trends,
   * by capture date). Each shows the nearest measured value of its first dotted series through `readout`.
   */
  syncKey?: string;
  /** Text of the value under the pointer (x, y of the nearest measured point), e.g. "12 Oct · 88 %". */
  readout?: (x: number, y: number) => string;
}

export function CurveChart(props: CurveChartProps) {
  const { x, series, bands, xLabel, yLabel, xTime, height = 260, label, yDigits } = props;
  const overlay = useRef(props);
  overlay.current = props;
  const key = `${series.map((s) => s.label).join("|")}|${xLabel}|${yLabel}|${xTime}|${bands?.length}|${props.yRange}|${props.xRange}|${props.syncKey}`;
  const options = useMemo<Omit<uPlot.Options, "width" | "height">>(
    () => ({
      legend: { show: false },
      scales: {
        x: { time: !!xTime, ...(props.xRange ? { range: () => props.xRange! } : {}) },
        y: props.yRange ? { range: () => props.yRange! } : { range: (_u, lo, hi) => padRange(lo, hi, overlay.current.guides) },
      },
      series: [
        {},
        ...series.map<uPlot.Series>((s) => ({
          label: s.label,
          stroke: s.color,
          width: s.width ?? 1.5,
          dash: s.dash,
          spanGaps: s.spanGaps,
          points: s.points ? { show: true, size: 6, fill: s.color, stroke: s.color } : { show: false },
        })),
      ],
      bands: bands?.map((b) => ({ series: [b.upper, b.lower] as [number, number], fill: b.fill })),
      axes: [
        axis(xLabel, xTime ? { space: 72, values: (_u, splits, _i, _space, incr) => dateTicks(splits, incr) } : {}),
        axis(yLabel, { size: 60, values: yDigits === undefined ? undefined : (_u, splits) => splits.map((v) => (v == null ? "" : v.toFixed(yDigits).replace("-", "\u2212"))) }),
      ],
      cursor: {
        drag: { x: false, y: false },
        points: { show: false },
        // synced by date only: a horizontal crosshair would stand at a meaningless height in the other charts
        ...(props.syncKey ? { y: false, sync: { key: props.syncKey, scales: ["x", null] as [string, null] } } : {}),
      },
      hooks: {
        draw: [(u) => drawAnnotations(u, overlay.current)],
        setCursor: [
          (u) => {
            showHint(u, overlay.current);
            showReadout(u, overlay.current);
          },
        ],
      },
    }),
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [key],
  );
  const data = useMemo(() => [x, ...series.map((s) => s.values)] as uPlot.AlignedData, [x, series]);
  return <UPlotChart options={options} optionsKey={key} data={data} height={height} label={label} redrawKey={`${props.points?.length}|${props.guides?.length}`} />;
}

function padRange(lo: number, hi: number, guides?: GuideLine[]): [number, number] {
  let a = Number.isFinite(lo) ? lo : 0;
  let b = Number.isFinite(hi) ? hi : 1;
  // keep nearby guides in view so boundaries are visible next to the data
  for (const g of guides ?? []) {
    if (g.y < a && a - g.y < Math.max(8, (b - a) * 0.6)) a = g.y;
    if (g.y > b && g.y - b < Math.max(8, (b - a) * 0.6)) b = g.y;
  }
  const pad = Math.max((b - a) * 0.08, Math.abs(b) * 0.02, 0.01);
  return [a - pad, b + pad];
}

/** The hint of the annotated point under the pointer, as the plot's native tooltip. */
function showHint(u: uPlot, p: CurveChartProps) {
  const { left, top } = u.cursor;
  let hint = "";
  if (left != null && top != null && left >= 0) {
    let best = 8; // CSS px
    for (const pt of p.points ?? []) {
      if (!pt.hint) continue;
      const py = pt.y === null ? u.over.clientHeight - (pt.size ?? 4) - 1 : u.valToPos(pt.y, "y");
      const d = Math.hypot(u.valToPos(pt.x, "x") - left, py - top);
      if (d < best) {
        best = d;
        hint = pt.hint;
      }
    }
  }
  if (u.over.title !== hint) u.over.title = hint;
}

/** The nearest measured point (within 24 px) of the first dotted series, in a small box at the top of the plot. */
function showReadout(u: uPlot, p: CurveChartProps) {
  if (!p.readout) return;
  let el = u.over.querySelector<HTMLDivElement>("[data-readout]");
  if (!el) {
    el = document.createElement("div");
    el.dataset.readout = "";
    el.setAttribute("aria-hidden", "true");
    Object.assign(el.style, {
      position: "absolute",
      top: "2px",
      pointerEvents: "none",
      whiteSpace: "nowrap",
      font: MONO_FONT.replace("12px", "11px"),
      background: "rgba(255,255,255,0.92)",
      border: "1px solid rgba(89,92,97,0.35)",
      borderRadius: "2px",
      padding: "0 4px",
      color: "#1c1e20",
    });
    u.over.appendChild(el);
  }
  const left = u.cursor.left;
  const si = p.series.findIndex((s) => s.points);
  let best = -1;
  if (left != null && left >= 0 && si >= 0) {
    const xs = u.data[0] as ArrayLike<number>;
    const vals = u.data[si + 1] as ArrayLike<number | null>;
    let bestD = 24;
    for (let i = 0; i < xs.length; i++) {
      if (vals[i] == null) continue;
      const d = Math.abs(u.valToPos(xs[i], "x") - left);
      if (d < bestD) (bestD = d), (best = i);
    }
    if (best >= 0) {
      el.textContent = p.readout((u.data[0] as ArrayLike<number>)[best], vals[best] as number);
      const w = el.offsetWidth;
      const x = u.valToPos(xs[best], "x");
      el.style.left = `${Math.max(0, Math.min(u.over.clientWidth - w, x - w / 2))}px`;
    }
  }
  el.style.display = best >= 0 ? "" : "none";
}

interface Box {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}
const overlaps = (a: Box, b: Box, pad: number) => a.x0 < b.x1 + pad && b.x0 < a.x1 + pad && a.y0 < b.y1 + pad && b.y0 < a.y1 + pad;

function drawAnnotations(u: uPlot, p: CurveChartProps) {
  const { ctx, bbox } = u;
  const pr = bbox.width / Math.max(1, u.over.clientWidth || bbox.width);
  ctx.save();
  ctx.font = MONO_FONT.replace("12px", `${Math.round(11 * pr)}px`);
  const yMin = u.scales.y.min ?? 0;
  const yMax = u.scales.y.max ?? 1;
  // Where text went, so point labels can keep clear of region names and guide labels.
  const taken: Box[] = [];
  const textH = 11 * pr;
  for (const r of p.regions ?? []) {
    const lo = Math.max(Math.min(r.from, r.to), yMin);
    const hi = Math.min(Math.max(r.from, r.to), yMax);
    if (hi - lo < (yMax - yMin) * 0.04) continue;
    const y = u.valToPos((lo + hi) / 2, "y", true);
    ctx.fillStyle = "rgba(89,92,97,0.75)";
    ctx.textAlign = "right";
    ctx.textBaseline = "middle";
    ctx.fillText(r.label, bbox.left + bbox.width - 6 * pr, y);
    const w = ctx.measureText(r.label).width;
    taken.push({ x0: bbox.left + bbox.width - 6 * pr - w, x1: bbox.left + bbox.width - 6 * pr, y0: y - textH / 2, y1: y + textH / 2 });
  }
  for (const g of p.guides ?? []) {
    if (g.y < yMin || g.y > yMax) continue;
    const y = u.valToPos(g.y, "y", true);
    ctx.strokeStyle = g.color ?? "rgba(89,92,97,0.7)";
    ctx.lineWidth = 1 * pr;
    ctx.setLineDash((g.dash ?? [4, 3]).map((d) => d * pr));
    ctx.beginPath();
    ctx.moveTo(bbox.left, y);
    ctx.lineTo(bbox.left + bbox.width, y);
    ctx.stroke();
    ctx.setLineDash([]);
    ctx.fillStyle = g.color ?? "rgba(89,92,97,0.95)";
    ctx.textAlign = "left";
    ctx.textBaseline = "bottom";
    const text = fitLabel(ctx, bbox.width - 8 * pr, g.label, g.shortLabel);
    ctx.fillText(text, bbox.left + 4 * pr, y - 2 * pr);
    taken.push({ x0: bbox.left + 4 * pr, x1: bbox.left + 4 * pr + ctx.measureText(text).width, y0: y - 2 * pr - textH, y1: y - 2 * pr });
  }
  // Measured dots of the series are kept clear of labels too.
  const xs0 = u.data[0] as ArrayLike<number>;
  p.series.forEach((sr, si) => {
    if (!sr.points) return;
    const vals = u.data[si + 1] as ArrayLike<number | null>;
    for (let i = 0; i < xs0.length; i++) {
      const v = vals[i];
      if (v == null) continue;
      const x = u.valToPos(xs0[i], "x", true);
      const y = u.valToPos(v, "y", true);
      taken.push({ x0: x - 4 * pr, x1: x + 4 * pr, y0: y - 4 * pr, y1: y + 4 * pr });
    }
  });
  for (const pt of p.points ?? []) {
    const xMin = u.scales.x.min ?? -Infinity;
    const xMax = u.scales.x.max ?? Infinity;
    const xv = p.xTime ? pt.x : pt.x;
    if (xv < xMin || xv > xMax || (pt.y !== null && (pt.y < yMin || pt.y > yMax))) continue;
    const r = (pt.size ?? 4) * pr;
    const cx = u.valToPos(xv, "x", true);
    const cy = pt.y === null ? bbox.top + bbox.height - r - pr : u.valToPos(pt.y, "y", true);
    ctx.globalAlpha = pt.alpha ?? 1;
    ctx.fillStyle = pt.color;
    ctx.strokeStyle = pt.color;
    ctx.lineWidth = 2 * pr;
    ctx.beginPath();
    if (pt.shape === "diamond") {
      ctx.moveTo(cx, cy - r * 1.3);
      ctx.lineTo(cx + r * 1.3, cy);
      ctx.lineTo(cx, cy + r * 1.3);
      ctx.lineTo(cx - r * 1.3, cy);
      ctx.closePath();
      ctx.fill();
    } else {
      ctx.arc(cx, cy, r, 0, Math.PI * 2);
      if (pt.shape === "ring") {
        ctx.fillStyle = "#ffffff"; // hollow: the line behind does not show through
        ctx.fill();
        ctx.stroke();
      } else ctx.fill();
    }
    ctx.globalAlpha = 1;
    if (pt.label) {
      // Above or below the point, to its right, to its left, or further left (region names sit at the right
      // edge): the first place inside the plot that clears the other text.
      const w = ctx.measureText(pt.label).width;
      const gap = 7 * pr;
      const xs = [cx + gap, cx - gap - w, ...Array.from({ length: 12 }, (_, k) => cx - gap - w - (k + 1) * 12 * pr)];
      const candidates: Box[] = xs
        .flatMap((x0) => [cy - 4 * pr - textH, cy + 4 * pr].map((y0) => ({ x0, x1: x0 + w, y0, y1: y0 + textH })))
        .filter((b) => b.x0 >= bbox.left && b.x1 <= bbox.left + bbox.width && b.y0 >= bbox.top && b.y1 <= bbox.top + bbox.height);
      const box = candidates.find((b) => !taken.some((t) => overlaps(b, t, 2 * pr))) ?? candidates[0];
      if (box) {
        taken.push(box);
        // A light backing keeps the label legible where it crosses a curve or a band.
        ctx.fillStyle = "rgba(255,255,255,0.85)";
        ctx.fillRect(box.x0 - 2 * pr, box.y0 - pr, box.x1 - box.x0 + 4 * pr, box.y1 - box.y0 + 2 * pr);
        ctx.fillStyle = "#1c1e20";
        ctx.textAlign = "left";
        ctx.textBaseline = "bottom";
        ctx.fillText(pt.label, box.x0, box.y1);
      }
    }
  }
  ctx.restore();
}

const DAY_S = 86_400;
const dayMonth = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short" });
const monthYear = new Intl.DateTimeFormat("en-GB", { month: "short", year: "numeric" });
const monthOnly = new Intl.DateTimeFormat("en-GB", { month: "short" });
const dayMonthTime = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", hour: "2-digit", minute: "2-digit" });

/** Date tick labels in the app's day-month style; months once the ticks are a month or more apart. */
function dateTicks(splits: number[], incrS: number): string[] {
  return splits.map((s, i) => {
    if (s == null) return "";
    const d = new Date(s * 1000);
    if (incrS >= 28 * DAY_S) return i === 0 || d.getMonth() === 0 ? monthYear.format(d) : monthOnly.format(d);
    if (incrS >= DAY_S) return dayMonth.format(d);
    return dayMonthTime.format(d);
  });
}

/** The longest of the label, its short form, or the label cut with an ellipsis that fits in `width` pixels. */
function fitLabel(ctx: CanvasRenderingContext2D, width: number, label: string, shortLabel?: string): string {
  for (const t of [label, shortLabel]) if (t && ctx.measureText(t).width <= width) return t;
  const base = shortLabel ?? label;
  for (let n = base.length - 1; n > 0; n--) {
    const t = `${base.slice(0, n).trimEnd()}…`;
    if (ctx.measureText(t).width <= width) return t;
  }
  return "";
}
