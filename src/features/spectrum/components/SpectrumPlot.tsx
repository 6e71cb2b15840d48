// The spectrum chart: a min/max band (so decimated data keeps its peaks and notches), an optional overlay of an
// earlier capture, the engine's markers drawn at their exact frequencies, and the analyst's cursor. The x range is
// driven by the viewer (zoom/pan refetch at full resolution); uPlot's own drag-zoom is turned into a callback.
import { useEffect, useMemo, useRef } from "react";
import type uPlot from "uplot";
import { axis, MONO_FONT, themeColor, UPlotChart } from "../chart/UPlotChart.tsx";
import { familyStyle } from "../lib/marker-style.ts";
import { nearestIndex, placeMarkers, type MarkerLike, type Range } from "../lib/viewer-math.ts";

/** The compared capture's line: a blue no marker family uses, dashed. */
export const OVERLAY_COLOR = "rgba(52, 84, 150, 0.9)";

export interface SpectrumPlotProps {
  hz: ArrayLike<number>;
  min: ArrayLike<number>;
  max: ArrayLike<number>;
  /** Another capture of the motor on the same x grid (nulls outside its range). */
  overlay?: (number | null)[] | null;
  overlayLabel?: string;
  view: Range;
  markers: readonly MarkerLike[];
  families: ReadonlySet<string>;
  cursorHz: number | null;
  yLabel: string;
  /** Axis tick formatter for y values. */
  yDigits?: number;
  height?: number;
  label: string;
  onSelectRange: (r: Range) => void;
  onPick: (hz: number) => void;
  onHover: (hz: number | null, idx: number | null) => void;
  onWheelZoom: (centerHz: number, factor: number) => void;
}

export function SpectrumPlot(props: SpectrumPlotProps) {
  const { hz, min, max, overlay, view, markers, families, cursorHz, yLabel, yDigits = 0, height = 360, label } = props;
  const cb = useRef(props);
  cb.current = props;
  const drawState = useRef({ markers, families, cursorHz });
  drawState.current = { markers, families, cursorHz };
  const plotRef = useRef<uPlot | null>(null);
  const hasOverlay = !!overlay;

  const data = useMemo<uPlot.AlignedData>(() => {
    const x = hz as number[];
    const cols: (ArrayLike<number> | (number | null)[])[] = [x, max, min];
    if (overlay) cols.push(overlay);
    return cols as uPlot.AlignedData;
  }, [hz, min, max, overlay]);

  const options = useMemo<Omit<uPlot.Options, "width" | "height">>(() => {
    const line = themeColor("brand-strong", "#084c4e");
    const band = "rgba(13, 106, 108, 0.18)";
    const series: uPlot.Series[] = [
      {},
      { label: "max", stroke: line, width: 1, points: { show: false } },
      { label: "min", stroke: "rgba(13, 106, 108, 0.45)", width: 1, points: { show: false } },
    ];
    if (hasOverlay) series.push({ label: "compared", stroke: OVERLAY_COLOR, width: 1, dash: [4, 2], points: { show: false }, spanGaps: false });
    return {
      pxAlign: false,
      legend: { show: false },
      scales: {
        x: { time: false },
        y: {
          range: (_u, lo, hi) => {
            if (!Number.isFinite(lo) || !Number.isFinite(hi)) return [0, 1];
            const pad = Math.max((hi - lo) * 0.06, yDigits ? 0.05 : 2);
            return [lo - pad, hi + pad];
          },
        },
      },
      series,
      bands: [{ series: [1, 2], fill: band }],
      axes: [
        axis("Frequency (Hz)", { values: (_u, splits) => tickLabels(splits) }),
        axis(yLabel, { size: 64, values: (_u, splits) => splits.map((v) => v.toFixed(yDigits).replace("-", "\u2212")) }),
      ],
      cursor: {
        drag: { x: true, y: false, setScale: false },
        points: { show: false },
        y: false,
      },
      hooks: {
        setSelect: [
          (u) => {
            if (u.select.width > 4) {
              const a = u.posToVal(u.select.left, "x");
              const b = u.posToVal(u.select.left + u.select.width, "x");
              cb.current.onSelectRange({ min: Math.min(a, b), max: Math.max(a, b) });
            }
            u.setSelect({ left: 0, top: 0, width: 0, height: 0 }, false);
          },
        ],
        setCursor: [
          (u) => {
            const left = u.cursor.left;
            if (left == null || left < 0) cb.current.onHover(null, null);
            else cb.current.onHover(u.posToVal(left, "x"), u.cursor.idx ?? null);
          },
        ],
        draw: [(u) => drawOverlays(u, drawState.current)],
        ready: [
          (u) => {
            let downX = 0;
            u.over.addEventListener("mousedown", (e) => (downX = e.offsetX));
            u.over.addEventListener("click", (e) => {
              if (Math.abs(e.offsetX - downX) > 3) return; // that was a drag-zoom
              cb.current.onPick(snapToPeak(u, e.offsetX));
            });
            u.over.addEventListener(
              "wheel",
              (e) => {
                e.preventDefault();
                cb.current.onWheelZoom(u.posToVal(e.offsetX, "x"), e.deltaY > 0 ? 1.25 : 0.8);
              },
              { passive: false },
            );
          },
        ],
      },
    };
  }, [hasOverlay, yLabel, yDigits]);

  // Drive the x scale from the viewer. Re-apply it after every setData too: data set without resetting scales
  // keeps uPlot's visible index window of the old arrays until the x scale is set again.
  useEffect(() => {
    plotRef.current?.setScale("x", { min: view.min, max: view.max });
  }, [view.min, view.max, data]);

  return (
    <UPlotChart
      options={options}
      optionsKey={`${hasOverlay}|${yLabel}|${yDigits}`}
      data={data}
      height={height}
      keepScales
      redrawKey={`${cursorHz}|${[...families].join()}|${markers.length}`}
      onReady={(u) => {
        plotRef.current = u;
        u.setScale("x", { min: cb.current.view.min, max: cb.current.view.max });
      }}
      label={label}
    />
  );
}

/** The highest sample within ±5 CSS px of a click: clicks land on the line, not beside it. */
function snapToPeak(u: uPlot, offsetX: number): number {
  const xs = u.data[0] as ArrayLike<number>;
  const ys = u.data[1] as ArrayLike<number | null>;
  const lo = nearestIndex(xs, u.posToVal(offsetX - 5, "x"));
  const hi = nearestIndex(xs, u.posToVal(offsetX + 5, "x"));
  let best = nearestIndex(xs, u.posToVal(offsetX, "x"));
  if (best < 0) return u.posToVal(offsetX, "x");
  for (let i = lo; i <= hi; i++) if ((ys[i] ?? -Infinity) > (ys[best] ?? -Infinity)) best = i;
  return xs[best];
}

function drawOverlays(u: uPlot, s: { markers: readonly MarkerLike[]; families: ReadonlySet<string>; cursorHz: number | null }) {
  const { ctx, bbox } = u;
  const xMin = u.scales.x.min;
  const xMax = u.scales.x.max;
  if (xMin == null || xMax == null) return;
  const pr = bbox.width / Math.max(1, u.over.clientWidth || bbox.width);
  ctx.save();
  ctx.font = MONO_FONT.replace("12px", `${Math.round(11 * pr)}px`);
  ctx.textBaseline = "top";
  ctx.textAlign = "left"; // uPlot leaves the axis alignment on the context
  const placed = placeMarkers(s.markers, { min: xMin, max: xMax }, { left: bbox.left, width: bbox.width }, {
    families: s.families,
    labelWidth: (m) => ctx.measureText(m.name).width + 8 * pr,
  });
  const rowH = 14 * pr;
  for (const { marker, x, row } of placed) {
    const st = familyStyle(marker.family);
    ctx.strokeStyle = st.color;
    ctx.lineWidth = 1.25 * pr;
    ctx.setLineDash(st.dash.map((d) => d * pr));
    ctx.beginPath();
    ctx.moveTo(x, bbox.top + (row + 1) * rowH);
    ctx.lineTo(x, bbox.top + bbox.height);
    ctx.stroke();
    ctx.setLineDash([]);
    const w = ctx.measureText(marker.name).width;
    const lx = Math.min(Math.max(x - w / 2, bbox.left + 1), bbox.left + bbox.width - w - 1);
    ctx.fillStyle = "rgba(255,255,255,0.85)";
    ctx.fillRect(lx - 2 * pr, bbox.top + row * rowH + pr, w + 4 * pr, rowH - 2 * pr);
    ctx.fillStyle = st.color;
    ctx.fillText(marker.name, lx, bbox.top + row * rowH + 2 * pr);
  }
  if (s.cursorHz !== null && s.cursorHz >= xMin && s.cursorHz <= xMax) {
    const x = u.valToPos(s.cursorHz, "x", true);
    ctx.strokeStyle = themeColor("brand", "#0d6a6c");
    ctx.lineWidth = 2 * pr;
    ctx.beginPath();
    ctx.moveTo(x, bbox.top);
    ctx.lineTo(x, bbox.top + bbox.height);
    ctx.stroke();
    const xs = u.data[0] as ArrayLike<number>;
    const i = nearestIndex(xs, s.cursorHz);
    const y = i >= 0 ? (u.data[1][i] as number | null) : null;
    if (y != null) {
      const py = u.valToPos(y, "y", true);
      ctx.fillStyle = themeColor("brand", "#0d6a6c");
      ctx.beginPath();
      ctx.arc(x, py, 4 * pr, 0, Math.PI * 2);
      ctx.fill();
    }
  }
  ctx.restore();
}

/** Tick labels with as many decimals as the tick spacing needs. */
function tickLabels(splits: number[]): string[] {
  const step = splits.length > 1 ? Math.abs(splits[1] - splits[0]) : 1;
  const digits = Math.max(0, Math.min(4, Math.ceil(-Math.log10(step) - 1e-9)));
  return splits.map((v) => (v == null ? "" : v.toFixed(digits).replace("-", "\u2212")));
}
