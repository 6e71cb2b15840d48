// The one uPlot wrapper of the app's charts: it owns create, setData, setSize (ResizeObserver) and destroy.
// Options are rebuilt only when `optionsKey` changes; new data is pushed with setData. Hooks that need the
// latest React state should read refs, and callers trigger a repaint with the `redrawKey` prop.
// Shared by the spectrum, motor and calculator screens.
import { useEffect, useRef } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";

export interface UPlotChartProps {
  /** Options without width/height; height is given separately, width follows the container. */
  options: Omit<uPlot.Options, "width" | "height">;
  data: uPlot.AlignedData;
  height: number;
  /** Change it to rebuild the chart with new options (series count, axes …). */
  optionsKey?: string;
  /** Change it to repaint overlays drawn by hooks (markers, cursor) without new data. */
  redrawKey?: unknown;
  /** Keep the current x/y scales when data changes (true when the caller drives the x range). */
  keepScales?: boolean;
  onReady?: (u: uPlot) => void;
  className?: string;
  /** Accessible description of what the chart shows (the canvas itself is opaque to screen readers). */
  label: string;
}

export function UPlotChart({ options, data, height, optionsKey = "", redrawKey, keepScales, onReady, className = "", label }: UPlotChartProps) {
  const host = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const latest = useRef({ options, data, height, onReady, keepScales });
  latest.current = { options, data, height, onReady, keepScales };

  useEffect(() => {
    const el = host.current;
    if (!el) return;
    const width = Math.max(200, el.clientWidth);
    const u = new uPlot({ ...latest.current.options, width, height: latest.current.height }, latest.current.data, el);
    plot.current = u;
    latest.current.onReady?.(u);
    const ro = new ResizeObserver(() => {
      const w = Math.max(200, el.clientWidth);
      if (Math.abs(w - u.width) > 1) u.setSize({ width: w, height: latest.current.height });
    });
    ro.observe(el);
    return () => {
      ro.disconnect();
      u.destroy();
      plot.current = null;
    };
  }, [optionsKey]);

  useEffect(() => {
    const u = plot.current;
    if (u && u.data !== data) u.setData(data, !latest.current.keepScales);
  }, [data]);

  useEffect(() => {
    const u = plot.current;
    if (u && u.height !== height) u.setSize({ width: u.width, height });
  }, [height]);

  useEffect(() => {
    plot.current?.redraw(false);
  }, [redrawKey]);

  return <div ref={host} className={`bh-chart w-full ${className}`} role="img" aria-label={label} />;
}

/** A theme colour from the CSS custom properties (Tailwind 4 exposes tokens as --color-*). */
export function themeColor(name: string, fallback: string): string {
  if (typeof document === "undefined") return fallback;
  const v = getComputedStyle(document.documentElement).getPropertyValue(`--color-${name}`).trim();
  return v || fallback;
}

export const MONO_FONT = '12px "JetBrains Mono", ui-monospace, monospace';
export const SANS_FONT = '12px "IBM Plex Sans", system-ui, sans-serif';

/** Axis defaults: readable mono tick labels, a faint grid, a sans label with the unit. */
export function axis(label: string, extra: Partial<uPlot.Axis> = {}): uPlot.Axis {
  const ink = themeColor("ink-muted", "#555");
  const grid = themeColor("line", "#e3e3e3");
  return {
    label,
    stroke: ink,
    font: MONO_FONT,
    labelFont: SANS_FONT,
    labelSize: 18,
    grid: { stroke: grid, width: 1 },
    ticks: { stroke: grid, width: 1, size: 4 },
    ...extra,
  };
}
