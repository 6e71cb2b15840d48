// The time waveform of one channel: min/max per bucket from the server, drawn as a band so a decimated
// waveform keeps its envelope. "Five cycles" fetches a short window at full resolution.
import { useMemo, useState } from "react";
import type uPlot from "uplot";
import { Button } from "../../../components/Button.tsx";
import { Spinner } from "../../../components/Spinner.tsx";
import { errorMessage } from "../../../lib/api.ts";
import { useWaveform } from "../api/get-waveform.ts";
import { axis, themeColor, UPlotChart } from "../chart/UPlotChart.tsx";

export interface WaveformPlotProps {
  captureId: number;
  channels: { name: string; kind: string; unit: string; position?: string | null }[];
  durationS: number | null;
  supplyHz: number | null;
}

export function WaveformPlot({ captureId, channels, durationS, supplyHz }: WaveformPlotProps) {
  const [channel, setChannel] = useState(channels[0]?.name ?? "");
  const [short, setShort] = useState(true);
  const cycles = 5;
  const to = short ? Math.min(durationS ?? 1, cycles / (supplyHz ?? 50)) : undefined;
  const q = useWaveform(captureId, channel ? { channel, from: short ? 0 : undefined, to, buckets: 2000 } : null);
  const w = q.data;
  const data = useMemo<uPlot.AlignedData | null>(() => (w ? [w.t, w.max, w.min] : null), [w]);
  const unit = w?.unit ?? channels.find((c) => c.name === channel)?.unit ?? "";
  const options = useMemo<Omit<uPlot.Options, "width" | "height">>(
    () => ({
      legend: { show: false },
      scales: { x: { time: false } },
      series: [{}, { stroke: themeColor("brand-strong", "#084c4e"), width: 1 }, { stroke: "rgba(13,106,108,0.5)", width: 1 }],
      bands: [{ series: [1, 2], fill: "rgba(13,106,108,0.2)" }],
      axes: [axis("Time (s)"), axis(`Amplitude (${unit})`, { size: 60 })],
      cursor: { drag: { x: false, y: false }, points: { show: false } },
    }),
    [unit],
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
        {!short && <span className="text-caption text-ink-muted">min/max envelope per bucket</span>}
      </div>
      {data ? (
        <UPlotChart options={options} optionsKey={unit} data={data} height={220} label={`Time waveform of ${channel}`} />
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
