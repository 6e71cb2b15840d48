// One spectrum with its controls: channel/phase switch, around-supply / full-range views, zoom and pan (refetching
// the window at full resolution), cursor readout, marker families, earlier-capture overlay and the keyboard.
import { useEffect, useMemo, useRef, useState, type KeyboardEvent } from "react";
import { Button } from "../../../components/Button.tsx";
import { Select } from "../../../components/Form.tsx";
import { Spinner } from "../../../components/Spinner.tsx";
import { errorMessage } from "../../../lib/api.ts";
import type { Capture } from "../../../lib/contracts.ts";
import { formatDateTime } from "../../../lib/format.ts";
import type { Marker } from "../../../engine/types.ts";
import { useSpectrum, type SpectrumResponse } from "../api/get-spectrum.ts";
import { hzDecimals, markerToleranceHz, resolveCursor, type BinPoints, type CursorTarget, type ResolvedCursor } from "../lib/cursor-resolve.ts";
import { familyForKey, familyStyle, MARKER_FAMILIES } from "../lib/marker-style.ts";
import { hannSidelobeDb, nextTarget, stepTargets } from "../lib/peak-steps.ts";
import { useSettled } from "../lib/use-settled.ts";
import {
  cursorReadout,
  markersForChannel,
  minMaxDecimate,
  nearestIndex,
  panRange,
  resampleOnto,
  signed,
  supplyWindow,
  zoomRange,
  type Range,
} from "../lib/viewer-math.ts";
import { OVERLAY_COLOR, SpectrumPlot } from "./SpectrumPlot.tsx";

export interface ViewerChannel {
  name: string;
  position?: string | null;
  unit: string;
}

export interface SpectrumViewerProps {
  captureId: number;
  kind: "current" | "vibration";
  channels: ViewerChannel[];
  sampleRate: number;
  supplyHz: number | null;
  slip: number | null;
  rpm: number | null;
  markers: Marker[];
  /** Other analysed captures of the same motor, newest first (the overlay picker). */
  earlier: Capture[];
  /** When this capture was taken, to say whether the compared one is earlier or later. */
  thisTakenAt?: string | null;
  title: string;
  /** Focus the plot on mount (the current spectrum is the screen's main control). */
  autoFocus?: boolean;
}

/** Most points per series handed to uPlot; the server already decimates to about one bucket per pixel. */
const MAX_POINTS = 4000;

export function SpectrumViewer(props: SpectrumViewerProps) {
  const { captureId, kind, channels, sampleRate, supplyHz, slip, rpm, markers, earlier, title, thisTakenAt } = props;
  const [channel, setChannel] = useState(channels[0]?.name ?? "");
  const bounds = useMemo<Range>(() => ({ min: 0, max: sampleRate / 2 }), [sampleRate]);
  const initialView = useMemo<Range>(() => {
    if (kind === "vibration") return { min: 0, max: Math.min(bounds.max, Math.max(200, (supplyHz ?? 50) * 5)) };
    return supplyHz ? supplyWindow(supplyHz, slip) : bounds;
  }, [kind, supplyHz, slip, bounds]);
  // Keys and buttons set the view at once (one step, one fetch); wheel zoom and drag settle 150 ms after the last
  // change, so a gesture costs one refetch when it stops.
  const [view, settled, changeView] = useSettled<Range>(initialView, 150);
  const setView = (next: Range | ((v: Range) => Range)) => changeView(next, "now");
  const setViewGesture = (next: Range | ((v: Range) => Range)) => changeView(next, "debounced");
  // What the cursor is on (a peak the click snapped to or a key stepped to, or a marker); what it reads follows
  // from the data (resolveCursor), the full-resolution window around it included.
  const [cursorTarget, setCursorTarget] = useState<CursorTarget<Marker> | null>(null);
  const [hoverHz, setHoverHz] = useState<number | null>(null);
  const [families, setFamilies] = useState<Set<string>>(
    () => new Set(kind === "vibration" ? ["vibration", "bearing"] : ["supply", "broken-bar", "eccentricity", "slot", "harmonic"]),
  );
  const [overlayId, setOverlayId] = useState<number | null>(null);
  const [showHelp, setShowHelp] = useState(false);
  const [note, setNote] = useState<string | null>(null);
  const box = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (props.autoFocus) box.current?.focus({ preventScroll: true });
  }, [props.autoFocus]);
  // About one bucket per canvas pixel of a wide plot; the server returns every bin when the window holds fewer.
  const buckets = 2000;

  const params = useMemo(
    () => ({ channel, kind, fmin: round(settled.min), fmax: round(settled.max), buckets }),
    [channel, kind, settled.min, settled.max, buckets],
  );
  const spectrum = useSpectrum(captureId, params);
  const overlayCapture = earlier.find((c) => c.id === overlayId) ?? null;
  const overlayChannel = overlayCapture ? pickChannel(overlayCapture, kind, channel, channels.find((c) => c.name === channel)?.position) : null;
  const overlay = useSpectrum(overlayCapture ? overlayCapture.id : null, overlayChannel ? { ...params, channel: overlayChannel } : null);

  const s = spectrum.data;
  const shown = useMemo(() => {
    if (!s) return null;
    // The server answers ≤ buckets points, each max at its own bin; re-bucket defensively (keeping each max at its
    // bin) so uPlot never gets more than a few thousand.
    if (s.hz.length <= MAX_POINTS) return { x: s.hz, min: s.min, max: s.max, minHz: s.minHz, decimated: s.decimated };
    const d = minMaxDecimate(s.hz, s.min, s.max, MAX_POINTS);
    return { x: Array.from(d.x), min: Array.from(d.min), max: Array.from(d.max), minHz: null, decimated: true };
  }, [s]);
  const overlayOnGrid = useMemo(() => (shown && overlay.data ? resampleOnto(shown.x, overlay.data.hz, overlay.data.max) : null), [shown, overlay.data]);

  const isCurrent = kind === "current";
  const peakValues = useMemo(() => (shown ? (isCurrent ? shown.max : shown.max.map((v) => 20 * Math.log10(Math.max(v, 1e-6)))) : []), [shown, isCurrent]);

  // The engine tags markers with the channel it measured them on; the frequencies hold for every phase / axis, so
  // a channel without its own markers of a family shows those of the analysed one (and says so).
  const { channelMarkers, markerSource, partly } = useMemo(() => markersForChannel(markers, channel, channels.map((c) => c.name)), [markers, channel, channels]);
  const presentFamilies = MARKER_FAMILIES.filter((f) => markers.some((m) => m.family === f.family));
  const ctx = useMemo(() => (s ? { binHz: s.binHz, resolutionHz: s.resolutionHz, bucketHz: s.bucketHz, markers: channelMarkers } : null), [s, channelMarkers]);

  // Where ← / → step: lines clearly above the local noise floor (not its bumps, not a stronger line's Hann side
  // lobes on a current spectrum) and every shown marker in the answer's range (peak-steps.ts).
  const targets = useMemo(() => {
    if (!shown || !s || !ctx) return [];
    const shownMarkers = channelMarkers.filter((m) => families.has(m.family));
    return stepTargets(shown.x, peakValues, shownMarkers, {
      tolHz: markerToleranceHz(ctx),
      range: { min: s.fMin, max: s.fMax },
      leakage: isCurrent ? { resolutionHz: s.resolutionHz, envelopeDb: hannSidelobeDb } : null,
    });
  }, [shown, s, ctx, peakValues, channelMarkers, families, isCurrent]);

  // A view that does not hold the cursor's bins (decimated, or panned away): fetch the full-resolution window of
  // ±32 bins around it (the route answers every bin when the range holds ≤ buckets of them).
  const windowParams = useMemo(() => {
    if (!cursorTarget || !s) return null;
    const hz = cursorTarget.hz;
    if (!s.decimated && hz >= s.fMin && hz <= s.fMax) return null;
    const half = 32 * s.binHz;
    return { channel, kind, fmin: round(Math.max(0, hz - half)), fmax: round(hz + half), buckets };
  }, [cursorTarget, s, channel, kind, buckets]);
  const cursorWindow = useSpectrum(captureId, windowParams);
  const windowBins = usable(cursorWindow.data, cursorWindow.isPlaceholderData, channel);

  const viewBins: BinPoints | null = shown ? { x: shown.x, max: shown.max, decimated: shown.decimated } : null;
  const resolved: ResolvedCursor<Marker> | null = cursorTarget && ctx ? resolveCursor(cursorTarget, [windowBins, viewBins], viewBins, ctx) : null;
  const cursorHz = resolved?.hz ?? null;
  const cursor = resolved ? cursorReadout(resolved.hz, resolved.level, supplyHz, slip, 20, resolved.precisionHz) : null;
  // The pointer reads the drawn point nearest to it: a bin's frequency and level (its bucket's max when decimated).
  const pointer = useMemo(() => {
    if (hoverHz === null || !shown || !s) return null;
    const i = nearestIndex(shown.x, hoverHz);
    return i >= 0 ? cursorReadout(shown.x[i], shown.max[i], supplyHz, slip, 20, s.binHz) : null;
  }, [hoverHz, shown, s, supplyHz, slip]);

  const unit = s?.unit ?? (isCurrent ? "dB" : "mm/s");
  // the view's bounds: a position, not a reading
  const rangeDigits = s ? Math.max(2, Math.min(4, Math.ceil(-Math.log10(Math.max(s.resolutionHz, 1e-6))) + 1)) : 2;
  const fr = rpm ? rpm / 60 : null;

  const toggleFamily = (family: string) =>
    setFamilies((prev) => {
      const next = new Set(prev);
      if (next.has(family)) next.delete(family);
      else next.add(family);
      return next;
    });

  const moveTo = (target: CursorTarget<Marker>) => {
    setCursorTarget(target);
    const hz = target.hz;
    if (hz < view.min || hz > view.max) setView((v) => panRange(v, (hz - (v.min + v.max) / 2) / (v.max - v.min), bounds));
  };

  const step = (dir: 1 | -1) => {
    if (!shown || !ctx) return;
    const from = cursorHz ?? (supplyHz && supplyHz > view.min && supplyHz < view.max ? supplyHz : dir > 0 ? view.min : view.max);
    // One resolution cell of tolerance: starting on a line (e.g. the supply, read at its marker while its bin is a
    // little off) moves on to the next one.
    const t = nextTarget(targets, from, dir, markerToleranceHz(ctx) + 1e-9);
    if (t === null) {
      setNote(dir > 0 ? "No further peak to the right in this view." : "No further peak to the left in this view.");
      return;
    }
    setNote(null);
    moveTo(t.marker ? { at: "marker", hz: t.marker.hz, marker: t.marker } : { at: "peak", hz: t.hz });
  };

  const minSpan = Math.max(0.05, (s?.resolutionHz ?? 0.01) * 20);
  const zoomTo = (v: Range, factor: number, center?: number) =>
    zoomRange(v, factor, bounds, center ?? (cursorHz !== null && cursorHz >= v.min && cursorHz <= v.max ? cursorHz : undefined), minSpan);
  const zoom = (factor: number) => setView((v) => zoomTo(v, factor));

  const onKeyDown = (e: KeyboardEvent<HTMLDivElement>) => {
    if (e.target instanceof HTMLInputElement || e.target instanceof HTMLSelectElement || e.target instanceof HTMLTextAreaElement) return;
    if (e.altKey || e.ctrlKey || e.metaKey) return;
    const k = e.key;
    let handled = true;
    if (k === "ArrowRight" && e.shiftKey) setView((v) => panRange(v, 0.25, bounds));
    else if (k === "ArrowLeft" && e.shiftKey) setView((v) => panRange(v, -0.25, bounds));
    else if (k === "ArrowRight") step(1);
    else if (k === "ArrowLeft") step(-1);
    else if (k === "+" || k === "=") zoom(0.5);
    else if (k === "-" || k === "_") zoom(2);
    else if (k === "a" && isCurrent) setView(initialView);
    else if (k === "f") setView(bounds);
    else if (k === "Escape") setCursorTarget(null);
    else if (k === "?") setShowHelp((x) => !x);
    else {
      const fam = familyForKey(k);
      if (fam && presentFamilies.some((f) => f.family === fam.family)) toggleFamily(fam.family);
      else handled = false;
    }
    if (handled) e.preventDefault();
  };

  const yLabel = isCurrent ? "Level (dB re supply)" : `Velocity (${unit})`;
  const chInfo = channels.find((c) => c.name === channel);

  return (
    <div
      ref={box}
      tabIndex={0}
      onKeyDown={onKeyDown}
      onMouseDown={(e) => {
        if (!(e.target instanceof HTMLInputElement || e.target instanceof HTMLSelectElement || e.target instanceof HTMLButtonElement)) e.currentTarget.focus();
      }}
      aria-label={`${title}: press ? for keys`}
      className="rounded-md outline-none focus-visible:ring-2 focus-visible:ring-brand/40"
      data-testid={`spectrum-${kind}`}
    >
      <div className="mb-2 flex flex-wrap items-center gap-2">
        {channels.length > 1 && (
          <div role="group" aria-label="Channel" className="inline-flex overflow-hidden rounded-md border border-line-strong">
            {channels.map((c) => (
              <button
                key={c.name}
                type="button"
                aria-pressed={c.name === channel}
                onClick={() => setChannel(c.name)}
                className={`px-2.5 py-1 text-caption ${c.name === channel ? "bg-brand text-brand-ink" : "bg-surface hover:bg-sunken"}`}
              >
                <span className="num">{c.name}</span>
                {c.position && <span className="ml-1 opacity-80">{isCurrent ? `phase ${c.position}` : `axis ${c.position}`}</span>}
              </button>
            ))}
          </div>
        )}
        {channels.length === 1 && (
          <span className="text-caption text-ink-muted">
            Channel <span className="num text-ink">{channel}</span>
            {chInfo?.position && <> · {isCurrent ? "phase" : "axis"} {chInfo.position}</>}
          </span>
        )}
        <span className="mx-1 h-5 w-px bg-line" aria-hidden="true" />
        {isCurrent && (
          <Button size="sm" onClick={() => setView(initialView)} aria-pressed={sameRange(view, initialView)} title="Key a">
            Around supply
          </Button>
        )}
        <Button size="sm" onClick={() => setView(bounds)} aria-pressed={sameRange(view, bounds)} title="Key f">
          Full range
        </Button>
        <Button size="sm" onClick={() => zoom(0.5)} title="Zoom in (+)" aria-label="Zoom in">
          +
        </Button>
        <Button size="sm" onClick={() => zoom(2)} title="Zoom out (−)" aria-label="Zoom out">
          −
        </Button>
        <Button size="sm" onClick={() => setView((v) => panRange(v, -0.25, bounds))} title="Pan left (Shift+←)" aria-label="Pan left">
          ◀
        </Button>
        <Button size="sm" onClick={() => setView((v) => panRange(v, 0.25, bounds))} title="Pan right (Shift+→)" aria-label="Pan right">
          ▶
        </Button>
        <span className="num text-caption text-ink-muted" aria-live="polite">
          {view.min.toFixed(rangeDigits)} – {view.max.toFixed(rangeDigits)} Hz
        </span>
        <span className="ml-auto flex items-center gap-2">
          {earlier.length > 0 && (
            <label className="flex items-center gap-1.5 text-caption text-ink-muted">
              Compare with
              <Select className="!w-auto !py-0.5 text-caption" value={overlayId ?? ""} onChange={(e) => setOverlayId(e.target.value ? Number(e.target.value) : null)}>
                <option value="">none</option>
                {earlier.map((c) => (
                  <option key={c.id} value={c.id}>
                    {formatDateTime(c.takenAt ?? c.createdAt)} · #{c.id}
                  </option>
                ))}
              </Select>
            </label>
          )}
          <Button size="sm" variant="ghost" onClick={() => setShowHelp((x) => !x)} aria-expanded={showHelp}>
            Keys ?
          </Button>
        </span>
      </div>

      <div className="relative">
        {shown ? (
          <SpectrumPlot
            hz={shown.x}
            min={shown.min}
            max={shown.max}
            minHz={shown.minHz}
            overlay={overlayOnGrid}
            view={view}
            markers={channelMarkers}
            families={families}
            cursorHz={cursorHz}
            cursorLevel={resolved?.level ?? null}
            yLabel={yLabel}
            yDigits={isCurrent ? 0 : 2}
            label={`${title}, ${channel}, ${view.min.toFixed(1)} to ${view.max.toFixed(1)} Hz`}
            onSelectRange={(r) => setViewGesture(zoomRange(r, 1, bounds, undefined, minSpan))}
            onPan={(from, fraction) => setViewGesture(panRange(from, fraction, bounds))}
            onPick={(hz) => {
              setNote(null);
              setCursorTarget({ at: "peak", hz });
            }}
            onHover={setHoverHz}
            onWheelZoom={(c, f) => setViewGesture((v) => zoomTo(v, f, c))}
          />
        ) : spectrum.isError ? (
          <div role="alert" className="flex h-[360px] items-center justify-center rounded-md border border-danger/30 bg-danger-soft text-danger">
            {errorMessage(spectrum.error)}
          </div>
        ) : (
          <div className="flex h-[360px] items-center justify-center">
            <Spinner label="Loading spectrum…" />
          </div>
        )}
        {spectrum.isFetching && shown && (
          <span className="absolute right-2 top-1 rounded-sm bg-surface/90 px-1.5 text-caption text-ink-muted">refining…</span>
        )}
      </div>

      <div className="mt-2 flex flex-wrap items-start gap-x-6 gap-y-2">
        <div className="min-w-[18rem] flex-1">
          <Readout title="Cursor" r={cursor} at={resolved} pending={cursorWindow.isFetching} unit={unit} isCurrent={isCurrent} fr={fr} s={s ?? null} />
          <Readout title="Pointer" r={pointer} unit={unit} isCurrent={isCurrent} fr={fr} s={s ?? null} faint />
          {note && <p className="text-caption text-ink-muted">{note}</p>}
        </div>
        <div className="text-caption text-ink-muted">
          {s && (
            <>
              Resolution <span className="num text-ink">{s.resolutionHz.toPrecision(3)} Hz</span> ·{" "}
              {s.decimated ? (
                <>
                  min/max of {s.hz.length} buckets (<span className="num">{fmtHz(s.bucketHz ?? 0)}</span> each; zoom in for every bin)
                </>
              ) : (
                <>every bin shown ({s.hz.length})</>
              )}
              {s.lowCutHz ? (
                <>
                  <br />
                  integrated from acceleration: below <span className="num text-ink">{s.lowCutHz} Hz</span> not shown
                </>
              ) : null}
              {overlayCapture && (
                <>
                  <br />
                  <span className="mr-1 inline-block w-5 border-t-2 border-dashed align-middle" style={{ borderColor: OVERLAY_COLOR }} />
                  compared with capture #{overlayCapture.id} ({formatDateTime(overlayCapture.takenAt)}
                  {thisTakenAt && overlayCapture.takenAt && overlayCapture.takenAt > thisTakenAt ? ", later" : ", earlier"}), channel {overlayChannel}
                  {overlay.isFetching && " …"}
                </>
              )}
            </>
          )}
        </div>
      </div>

      {presentFamilies.length > 0 && (
        <fieldset className="mt-2 flex flex-wrap items-center gap-x-4 gap-y-1">
          <legend className="sr-only">Marker families</legend>
          <span className="text-caption text-ink-muted">
            Markers{markerSource !== channel ? <> ({partly ? "some " : ""}found on <span className="num">{markerSource}</span>)</> : null}:
          </span>
          {presentFamilies.map((f) => (
            <label key={f.family} className="inline-flex cursor-pointer items-center gap-1.5 text-caption">
              <input type="checkbox" checked={families.has(f.family)} onChange={() => toggleFamily(f.family)} />
              <svg width="22" height="8" aria-hidden="true">
                <line x1="0" y1="4" x2="22" y2="4" stroke={f.color} strokeWidth="2" strokeDasharray={f.dash.join(" ")} />
              </svg>
              <kbd className="num rounded-sm border border-line-strong px-1 text-[0.7rem]">{f.key}</kbd>
              {f.label}
            </label>
          ))}
        </fieldset>
      )}

      {showHelp && <KeyHelp isCurrent={isCurrent} families={presentFamilies.map((f) => f.family)} />}
    </div>
  );
}

/** Where the readout's frequency comes from, and so how many decimals it has. */
function sourceNote(at: ResolvedCursor<Marker> | null | undefined, s: SpectrumResponse | null): string {
  if (!s) return "";
  if (at?.source === "marker") return `The engine's line ${at.marker?.name ?? ""}: its frequency interpolated between bins (to about ${fmtHz(at.precisionHz)})`;
  if (at?.source === "bucket") return `Somewhere in a bucket of ${fmtHz(at.precisionHz)}: zoom in for the bin`;
  return `The bin's frequency (bins ${fmtHz(s.binHz)} apart)`;
}

function Readout(props: {
  title: string;
  r: ReturnType<typeof cursorReadout> | null;
  /** The resolved cursor (for the cursor readout): where the frequency comes from. */
  at?: ResolvedCursor<Marker> | null;
  /** The full-resolution window around the cursor is on its way (a level not known yet shows "…"). */
  pending?: boolean;
  unit: string;
  isCurrent: boolean;
  fr: number | null;
  s: SpectrumResponse | null;
  faint?: boolean;
}) {
  const { title, r, at, pending, unit, isCurrent, fr, faint, s } = props;
  const hzDigits = r?.hzDigits ?? 2;
  return (
    <div className={`flex items-baseline gap-x-4 text-body ${faint ? "text-ink-muted" : ""}`} aria-live={faint ? undefined : "polite"}>
      <span className="w-14 shrink-0 text-caption font-semibold uppercase tracking-wide text-ink-muted">{title}</span>
      {/* the values wrap under each other, never under the title, and each value stays on one line */}
      <div className="flex min-w-0 flex-wrap items-baseline gap-x-4 whitespace-nowrap">
      {r ? (
        <>
          <span className="num" title={sourceNote(at, s)}>
            {r.hz.toFixed(hzDigits)} Hz
          </span>
          <span className="num">{r.level === null ? (pending ? "…" : "—") : `${fmtSigned(r.level, isCurrent ? 1 : 3)} ${unit}`}</span>
          {at?.marker && (
            <span className="text-caption text-ink-muted" title="The engine's line the cursor is on">
              {at.marker.name}
            </span>
          )}
          {isCurrent ? (
            <>
              <span className="num" title="Offset from the supply line">
                {r.offsetHz === null ? "—" : `${signed(r.offsetHz, hzDigits)} Hz`}
              </span>
              <span className="num" title="Offset in multiples of the slip frequency s·f">
                {r.label}
              </span>
              {r.supplyOrder !== null && <span className="num text-ink-muted">{r.supplyOrder.toFixed(r.orderDigits)}× f</span>}
            </>
          ) : (
            <>
              {fr && (
                <span className="num" title="Multiple of the running speed">
                  {(r.hz / fr).toFixed(r.precisionHz === null ? 3 : hzDecimals(r.precisionHz / fr, 3))}× fr
                </span>
              )}
              {r.supplyOrder !== null && <span className="num text-ink-muted">{r.supplyOrder.toFixed(r.orderDigits)}× LF</span>}
            </>
          )}
        </>
      ) : (
        <span className="whitespace-normal text-caption text-ink-faint">{faint ? "move over the plot" : "click the plot or press → to step to a peak"}</span>
      )}
      </div>
    </div>
  );
}

function KeyHelp({ isCurrent, families }: { isCurrent: boolean; families: string[] }) {
  const rows: [string, string][] = [
    ["← / →", "Step the cursor to the previous / next peak (a line above the noise floor, or a marker)"],
    ["Shift + ← / →", "Pan a quarter of the view"],
    ["+ / −", "Zoom in / out about the cursor (or the wheel over the plot)"],
    ["drag", "Zoom to the dragged span"],
    ["Shift + drag", "Pan the view (or drag with the middle button)"],
    ...(isCurrent ? ([["a", "Back to the band around the supply"]] as [string, string][]) : []),
    ["f", "Full range"],
    ["Esc", "Clear the cursor"],
    ...families.map((f) => [familyStyle(f).key, `Show / hide ${familyStyle(f).label}`] as [string, string]),
    ["?", "Show / hide these keys"],
  ];
  return (
    <div className="mt-2 rounded-md border border-line bg-sunken/50 p-3">
      <p className="mb-1 text-caption font-semibold text-ink-muted">Keys (click the plot first)</p>
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-0.5 text-caption">
        {rows.map(([k, v]) => (
          <div key={k} className="contents">
            <dt>
              <kbd className="num rounded-sm border border-line-strong bg-surface px-1">{k}</kbd>
            </dt>
            <dd>{v}</dd>
          </div>
        ))}
      </dl>
    </div>
  );
}

/** The overlay capture's channel: the same name, else the same phase/axis, else its first channel of the kind. */
function pickChannel(c: Capture, kind: string, name: string, position: string | null | undefined): string | null {
  const same = c.channels.filter((ch) => ch.kind === kind);
  if (same.some((ch) => ch.name === name)) return name;
  const byPos = position ? same.find((ch) => ch.position === position) : undefined;
  return byPos?.name ?? same[0]?.name ?? null;
}

function round(x: number): number {
  return Number(x.toPrecision(7));
}

function sameRange(a: Range, b: Range): boolean {
  return Math.abs(a.min - b.min) < 1e-9 && Math.abs(a.max - b.max) < 1e-9;
}

function fmtSigned(x: number, digits: number): string {
  const t = x.toFixed(digits);
  return Number(t) === 0 ? Math.abs(x).toFixed(digits) : t.replace("-", "\u2212"); // no "−0.0"
}

/** A width in Hz with three significant digits. */
function fmtHz(hz: number): string {
  return `${Number(hz.toPrecision(3))} Hz`;
}

/** A window answer for the cursor, when it is the channel's own and not a stand-in from an earlier query. */
function usable(d: SpectrumResponse | undefined, placeholder: boolean, channel: string): BinPoints | null {
  if (!d || placeholder || d.channel !== channel) return null;
  return { x: d.hz, max: d.max, decimated: d.decimated };
}
