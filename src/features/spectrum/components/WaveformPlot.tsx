// The time waveform of one channel. "Five cycles" fetches a short window at full resolution and draws the line.
// "Whole capture" gets min/max per bucket from the server; those buckets are shorter than a cycle, so the line
// through them would beat: when the window holds many cycles the envelope over one cycle is drawn as a band.
import { useMemo, useState } from "react";
import type uPlot from "uplot";
import { Button } from "../../../components/Button.tsx";
import { Spinner } from "../../../components/Spinner.tsx";
import { errorMessage } from "../../../lib/api.ts";
import { useWaveform } from "../api/get-waveform.ts";
import { axis, themeColor, UPlotChart } from "../../../components/charts/UPlotChart.tsx";
import { periodEnvelope } from "../lib/viewer-math.ts";

/** From this many cycles in the window on, the waveform is drawn as its per-cycle envelope band. */
const ENVELOPE_FROM_CYCLES = 20;

export interface WaveformPlotProps {
  captureId: number;
  channels: { name: string; kind: string; unit: string; position?: string | null }[];
  durationS: number | null;
  supplyHz: number | null;
  /** Running speed, for the period of vibration channels (1× is slower than the supply). */
  rpm?: number | null;
}

export function WaveformPlot({ captureId, channels, durationS, supplyHz, rpm }: WaveformPlotProps) {
  const [channel, setChannel] = useState(channels[0]?.name ?? "");
  const [short, setShort] = useState(true);
  const cycles = 5;
  const to = short ? Math.min(durationS ?? 1, cycles / (supplyHz ?? 50)) : undefined;
  const q = useWaveform(captureId, channel ? { channel, from: short ? 0 : undefined, to, buckets: 2000 } : null);
  const w = q.data;
  const kind = channels.find((c) => c.name === channel)?.kind;
  // The slowest regular component: the supply cycle for current, the slower of supply and 1× for vibration.
  const f = supplyHz ?? 50;
  const periodS = kind === "current" || !rpm ? 1 / f : Math.max(1 / f, 60 / rpm);
  const cyclesShown = w && w.t.length > 1 ? (w.t[w.t.length - 1] - w.t[0]) / periodS : 0;
  const envelope = !!w && w.decimated && cyclesShown >= ENVELOPE_FROM_CYCLES;
  const data = useMemo<uPlot.AlignedData | null>(() => {
    if (!w) return null;
    if (!envelope) return [w.t, w.max, w.min];
    const e = periodEnvelope(w.t, w.min, w.max, periodS);
    return [w.t, e.max, e.min];
  }, [w, envelope, periodS]);
  const unit = w?.unit ?? channels.find((c) => c.name === channel)?.unit ?? "";
  const options = useMemo<Omit<uPlot.Options, "width" | "height">>(
    () => ({
      legend: { show: false },
      scales: { x: { time: false } },
      series: envelope
        ? [{}, { stroke: "rgba(13,106,108,0.7)", width: 1 }, { stroke: "rgba(13,106,108,0.7)", width: 1 }]
        : [{}, { stroke: themeColor("brand-strong", "#084c4e"), width: 1 }, { stroke: "rgba(13,106,108,0.5)", width: 1 }],
      bands: [{ series: [1, 2], fill: envelope ? "rgba(13,106,108,0.32)" : "rgba(13,106,108,0.2)" }],
      axes: [axis("Time (s)"), axis(`Amplitude (${unit})`, { size: 60 })],
      cursor: { drag: { x: false, y: false }, points: { show: false } },
    }),
    [unit, envelope],
  );
  return (
    <div>
      <div className="mb-2 flex flex-wrap items-center gap-2">
        <div role="group" aria-label="Waveform channel" className="inline-flex overflow-hidden rounded-md border border-line-strong">
          {channels.map((c) => (
            <button
              key={c.name}
              type="button"
              aria-pressed={c.name === channel}
              onClick={() => setChannel(c.name)}
              className={`px-2.5 py-1 text-caption ${c.name === channel ? "bg-brand text-brand-ink" : "bg-surface hover:bg-sunken"}`}
            >
              <span className="num">{c.name}</span>
            </button>
          ))}
        </div>
        <Button size="sm" aria-pressed={short} onClick={() => setShort(true)}>
          {cycles} supply cycles
        </Button>
        <Button size="sm" aria-pressed={!short} onClick={() => setShort(false)}>
          Whole capture
        </Button>
        {!short && w && (
          <span className="text-caption text-ink-muted" data-testid="waveform-mode">
            {envelope ? (
              <>
                envelope: min/max over each {kind === "current" || !rpm ? "supply cycle" : "cycle"} (<span className="num">{Math.round(cyclesShown)}</span> cycles)
              </>
            ) : w.decimated ? (
              "min/max per bucket"
            ) : (
              "every sample"
            )}
          </span>
        )}
      </div>
      {data ? (
        <UPlotChart
          options={options}
          optionsKey={`${unit}|${envelope}`}
          data={data}
          height={220}
          label={envelope ? `Envelope of the time waveform of ${channel}, whole capture` : `Time waveform of ${channel}`}
        />
      ) : q.isError ? (
        <p role="alert" className="text-danger">{errorMessage(q.error)}</p>
      ) : (
        <div className="flex h-[220px] items-center justify-center">
          <Spinner label="Loading waveform…" />
        </div>
      )}
    </div>
  );
}
