// The spectrum chart: a min/max band (so decimated data keeps its peaks and notches; each max and each min drawn
// at its own bin, as the server's answer gives them), an optional overlay of an earlier capture, the engine's
// markers drawn at their exact frequencies, and the analyst's cursor. The x range is
// driven by the viewer (zoom/pan refetch at full resolution); uPlot's own drag-zoom is turned into a callback,
// and a drag with Shift (or the middle button) pans instead. Every draw leaves a `bh:spectrum-drawn` performance
// mark ({ fmin, fmax, points }) and the drawn point count in the host's data-drawn-points.
import { useEffect, useMemo, useRef } from "react";
import type uPlot from "uplot";
import { axis, MONO_FONT, themeColor, UPlotChart } from "../../../components/charts/UPlotChart.tsx";
import { familyStyle } from "../lib/marker-style.ts";
import { envelopeColumns, nearestIndex, placeMarkers, type MarkerLike, type PlacedMarker, type Range } from "../lib/viewer-math.ts";

/** The compared capture's line: a blue no marker family uses, dashed. */
export const OVERLAY_COLOR = "rgba(52, 84, 150, 0.9)";

export interface SpectrumPlotProps {
  /** Where each max is (a bin's frequency). */
  hz: ArrayLike<number>;
  min: ArrayLike<number>;
  max: ArrayLike<number>;
  /** Where each min is, when it is not at hz (a decimated answer). */
  minHz?: ArrayLike<number> | null;
  /** Another capture of the motor on the hz grid (nulls outside its range). */
  overlay?: (number | null)[] | null;
  overlayLabel?: string;
  view: Range;
  markers: readonly MarkerLike[];
  families: ReadonlySet<string>;
  cursorHz: number | null;
  /** The level the cursor reads (its dot); null draws the line only. */
  cursorLevel?: number | null;
  yLabel: string;
  /** Axis tick formatter for y values. */
  yDigits?: number;
  height?: number;
  label: string;
  onSelectRange: (r: Range) => void;
  /** A click, snapped to the highest max within ±5 px: the frequency of that max's bin. */
  onPick: (hz: number) => void;
  onHover: (hz: number | null) => void;
  onWheelZoom: (centerHz: number, factor: number) => void;
  /** Shift-drag or middle-drag: the view when the drag began and how far it moved, as a fraction of its width. */
  onPan: (from: Range, fraction: number) => void;
}

interface DrawState {
  markers: readonly MarkerLike[];
  families: ReadonlySet<string>;
  cursorHz: number | null;
  cursorLevel: number | null;
  /** Pointer x over the plot, CSS px from the plot's left edge; null when away. */
  pointerX: number | null;
  /** What the last draw placed (canvas px), to tell which hidden labels are under the pointer. */
  placed: PlacedMarker[];
  /** The hidden labels shown for the pointer in the last draw, to redraw only when they change. */
  hoverKey: string;
}

/** Lines closer than this (CSS px) look like one: only the strongest keeps its label. */
const MERGE_PX = 8;
/** How near (CSS px) the pointer must be to a line for its hidden label to show. */
const HOVER_PX = 6;

export function SpectrumPlot(props: SpectrumPlotProps) {
  const { hz, min, max, minHz, overlay, view, markers, families, cursorHz, yLabel, yDigits = 0, height = 360, label } = props;
  const cursorLevel = props.cursorLevel ?? null;
  const cb = useRef(props);
  cb.current = props;
  const drawState = useRef<DrawState>({ markers, families, cursorHz, cursorLevel, pointerX: null, placed: [], hoverKey: "" });
  Object.assign(drawState.current, { markers, families, cursorHz, cursorLevel });
  const plotRef = useRef<uPlot | null>(null);
  const hasOverlay = !!overlay;

  const data = useMemo<uPlot.AlignedData>(() => {
    // max and min each at their own bin: one x array for both, the other's points null (spanned)
    const c = envelopeColumns(hz, max, min, minHz, overlay ?? null);
    const cols: (number | null)[][] = [c.x, c.max, c.min];
    if (c.overlay) cols.push(c.overlay);
    return cols as uPlot.AlignedData;
  }, [hz, min, max, minHz, overlay]);

  const options = useMemo<Omit<uPlot.Options, "width" | "height">>(() => {
    const line = themeColor("brand-strong", "#084c4e");
    const band = "rgba(13, 106, 108, 0.18)";
    const series: uPlot.Series[] = [
      {},
      { label: "max", stroke: line, width: 1, points: { show: false }, spanGaps: true },
      { label: "min", stroke: "rgba(13, 106, 108, 0.45)", width: 1, points: { show: false }, spanGaps: true },
    ];
    // nulls: at the min-only points (spanned) and outside the compared capture's range (nothing to span there)
    if (hasOverlay) series.push({ label: "compared", stroke: OVERLAY_COLOR, width: 1, dash: [4, 2], points: { show: false }, spanGaps: true });
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
        // uPlot's drag selection (zoom) starts only on a plain left-button drag; Shift-drag pans (below).
        bind: {
          mousedown: (_u, targ, handler) => (e) => {
            if (e.button === 0 && !e.shiftKey && e.target === targ) handler(e);
            return null;
          },
        },
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
            const ds = drawState.current;
            ds.pointerX = left == null || left < 0 ? null : left;
            if (left == null || left < 0) cb.current.onHover(null);
            else cb.current.onHover(u.posToVal(left, "x"));
            if (hoverKey(u, ds) !== ds.hoverKey) u.redraw(false);
          },
        ],
        draw: [
          (u) => {
            drawOverlays(u, drawState.current);
            const fmin = u.scales.x.min ?? 0;
            const fmax = u.scales.x.max ?? 0;
            const points = visiblePoints(u.data[0] as ArrayLike<number>, fmin, fmax);
            const host = u.root.parentElement;
            if (host) host.dataset.drawnPoints = String(points);
            performance.mark("bh:spectrum-drawn", { detail: { fmin, fmax, points } });
          },
        ],
        ready: [
          (u) => {
            let downX = 0;
            u.over.addEventListener("mousedown", (e) => {
              downX = e.offsetX;
              if (!(e.button === 1 || (e.button === 0 && e.shiftKey))) return;
              // Pan: the view follows the pointer; the viewer refetches once the drag settles.
              e.preventDefault(); // no autoscroll on the middle button, no text selection
              const from = { min: u.scales.x.min ?? cb.current.view.min, max: u.scales.x.max ?? cb.current.view.max };
              const startX = e.clientX;
              const width = Math.max(1, u.over.clientWidth);
              u.over.style.cursor = "grabbing";
              const move = (m: MouseEvent) => cb.current.onPan(from, -(m.clientX - startX) / width);
              const up = () => {
                u.over.style.cursor = "";
                document.removeEventListener("mousemove", move);
                document.removeEventListener("mouseup", up);
              };
              document.addEventListener("mousemove", move);
              document.addEventListener("mouseup", up);
            });
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
      redrawKey={`${cursorHz}|${cursorLevel}|${[...families].join()}|${markers.length}`}
      onReady={(u) => {
        plotRef.current = u;
        u.setScale("x", { min: cb.current.view.min, max: cb.current.view.max });
      }}
      label={label}
    />
  );
}

/**
 * The highest max within ±5 CSS px of a click: clicks land on the line, not beside it, and at the frequency of the
 * line's bin (each max sits at its own bin).
 */
function snapToPeak(u: uPlot, offsetX: number): number {
  const xs = u.data[0] as ArrayLike<number>;
  const ys = u.data[1] as ArrayLike<number | null | undefined>;
  const lo = nearestIndex(xs, u.posToVal(offsetX - 5, "x"));
  const hi = nearestIndex(xs, u.posToVal(offsetX + 5, "x"));
  let best = -1;
  for (let i = Math.max(0, lo); i <= hi; i++) if (ys[i] != null && (best < 0 || ys[i]! > ys[best]!)) best = i;
  if (best < 0) {
    // no max under the click (a min-only point at most): the nearest max
    const at = u.posToVal(offsetX, "x");
    for (let i = 0; i < xs.length; i++) if (ys[i] != null && (best < 0 || Math.abs(xs[i] - at) < Math.abs(xs[best] - at))) best = i;
    if (best < 0) return at;
  }
  return xs[best];
}

/** Samples of a sorted x array inside [lo, hi]: what uPlot draws of each series. */
function visiblePoints(xs: ArrayLike<number>, lo: number, hi: number): number {
  /** Index of the first sample above v (or at/above it with `strict` false). */
  const bound = (v: number, strict: boolean) => {
    let a = 0;
    let b = xs.length;
    while (a < b) {
      const m = (a + b) >> 1;
      if (strict ? xs[m] <= v : xs[m] < v) a = m + 1;
      else b = m;
    }
    return a;
  };
  return Math.max(0, bound(hi, true) - bound(lo, false));
}

/** Markers whose label is hidden and whose line is under the pointer (canvas px positions of the last draw). */
function hoveredHidden(u: uPlot, s: DrawState): PlacedMarker[] {
  if (s.pointerX === null) return [];
  const pr = u.bbox.width / Math.max(1, u.over.clientWidth || u.bbox.width);
  const x = u.bbox.left + s.pointerX * pr;
  const near = s.placed.filter((p) => Math.abs(p.x - x) <= HOVER_PX * pr);
  return near.some((p) => !p.labelled) ? near : [];
}

function hoverKey(u: uPlot, s: DrawState): string {
  return hoveredHidden(u, s).map((p) => `${p.marker.name}@${p.marker.hz}`).join("|");
}

function drawOverlays(u: uPlot, s: DrawState) {
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
    mergePx: MERGE_PX * pr,
  });
  s.placed = placed;
  const rowH = 14 * pr;
  const rows = placed.reduce((n, p) => (p.labelled ? Math.max(n, p.row + 1) : n), 0);
  for (const { marker, x, row, labelled } of placed) {
    const st = familyStyle(marker.family);
    ctx.strokeStyle = st.color;
    ctx.lineWidth = 1.25 * pr;
    ctx.setLineDash(st.dash.map((d) => d * pr));
    ctx.beginPath();
    ctx.moveTo(x, bbox.top + (labelled ? row + 1 : rows) * rowH);
    ctx.lineTo(x, bbox.top + bbox.height);
    ctx.stroke();
    ctx.setLineDash([]);
    if (!labelled) continue;
    const w = ctx.measureText(marker.name).width;
    const lx = Math.min(Math.max(x - w / 2, bbox.left + 1), bbox.left + bbox.width - w - 1);
    ctx.fillStyle = "rgba(255,255,255,0.85)";
    ctx.fillRect(lx - 2 * pr, bbox.top + row * rowH + pr, w + 4 * pr, rowH - 2 * pr);
    ctx.fillStyle = st.color;
    ctx.fillText(marker.name, lx, bbox.top + row * rowH + 2 * pr);
  }
  // The pointer is on lines whose labels were left off: list every marker there, beside the pointer.
  const hovered = hoveredHidden(u, s);
  s.hoverKey = hovered.map((p) => `${p.marker.name}@${p.marker.hz}`).join("|");
  if (hovered.length) {
    const names = hovered.map((p) => p.marker.name);
    const w = Math.max(...names.map((n) => ctx.measureText(n).width)) + 8 * pr;
    const x0 = hovered[0].x + 8 * pr + w < bbox.left + bbox.width ? hovered[0].x + 8 * pr : hovered[0].x - 8 * pr - w;
    const y0 = bbox.top + rows * rowH + 2 * pr;
    ctx.fillStyle = "rgba(255,255,255,0.94)";
    ctx.strokeStyle = "rgba(89,92,97,0.5)";
    ctx.lineWidth = pr;
    ctx.fillRect(x0, y0, w, names.length * rowH + 4 * pr);
    ctx.strokeRect(x0, y0, w, names.length * rowH + 4 * pr);
    hovered.forEach((p, i) => {
      ctx.fillStyle = familyStyle(p.marker.family).color;
      ctx.fillText(p.marker.name, x0 + 4 * pr, y0 + 2 * pr + i * rowH + 2 * pr);
    });
  }
  if (s.cursorHz !== null && s.cursorHz >= xMin && s.cursorHz <= xMax) {
    const x = u.valToPos(s.cursorHz, "x", true);
    ctx.strokeStyle = themeColor("brand", "#0d6a6c");
    ctx.lineWidth = 2 * pr;
    ctx.beginPath();
    ctx.moveTo(x, bbox.top);
    ctx.lineTo(x, bbox.top + bbox.height);
    ctx.stroke();
    const y = s.cursorLevel;
    if (y != null && Number.isFinite(y)) {
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
