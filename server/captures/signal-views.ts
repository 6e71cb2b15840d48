// Spectra and waveforms of stored captures for the viewer. The parsed capture and each channel's full spectrum
// are computed once and kept in an in-memory LRU, so zooming and panning only re-decimate (milliseconds).
import type { Knex } from "knex";
import { parseCapture } from "../../src/engine/parse/index.ts";
import { spectrumForDisplay } from "../../src/engine/spectrum.ts";
import type { Capture, Channel } from "../../src/engine/types.ts";
import type { BlobStore } from "../blob/store.ts";
import { badRequest, HttpError, notFound } from "../errors.ts";
import { decimateMinMax, LruCache, type UniformSeries } from "../spectra.ts";

export interface FullSpectrum {
  channel: string;
  unit: string;
  series: UniformSeries;
  resolutionHz: number;
}

const MB = 1024 * 1024;
const captures = new LruCache<Capture>(Number(process.env.BARHOUND_CAPTURE_CACHE_MB || 256) * MB);
const spectra = new LruCache<FullSpectrum>(Number(process.env.BARHOUND_SPECTRUM_CACHE_MB || 256) * MB);

/** Drop cached views (tests). */
export function clearSignalCaches() {
  captures.clear();
  spectra.clear();
}

async function captureRow(db: Knex, id: number) {
  const row = await db("captures").where({ id }).first("id", "blob_key", "file_name", "sample_rate");
  if (!row) throw notFound("No such capture.");
  if (!row.blob_key) throw new HttpError(409, "This capture has no stored recording yet.", undefined, "no-recording");
  return row;
}

export async function loadParsed(db: Knex, blob: BlobStore, id: number): Promise<Capture> {
  const row = await captureRow(db, id);
  return captures.getOrCompute(`c${id}`, async () => {
    const bytes = await blob.get(row.blob_key);
    const cap = parseCapture(bytes, { fileName: row.file_name ?? undefined, sampleRate: row.sample_rate ?? undefined });
    const size = cap.channels.reduce((s, c) => s + c.data.byteLength, 0);
    return { value: cap, size };
  });
}

function pickChannel(cap: Capture, name: string | undefined, kind: string | undefined): Channel {
  if (name) {
    const ch = cap.channels.find((c) => c.name === name) ?? cap.channels.find((c) => c.name.toLowerCase() === name.toLowerCase());
    if (!ch) throw badRequest("No such channel", { channel: `This capture has: ${cap.channels.map((c) => c.name).join(", ")}` });
    return ch;
  }
  const ch = kind ? cap.channels.find((c) => c.kind === kind) : cap.channels.find((c) => c.kind === "current") ?? cap.channels[0];
  if (!ch) throw badRequest("No such channel", { kind: `This capture has no ${kind} channel` });
  return ch;
}

/** The whole-band spectrum of one channel at full resolution (cached). */
export async function fullSpectrum(db: Knex, blob: BlobStore, id: number, channelName?: string, kind?: string): Promise<FullSpectrum> {
  const cap = await loadParsed(db, blob, id);
  const ch = pickChannel(cap, channelName, kind);
  return spectra.getOrCompute(`s${id}:${ch.name}`, async () => {
    const vibration = ch.kind === "vibration";
    // Current: dB re the supply line (the engine's default reference). Vibration: velocity in mm/s r.m.s. per line.
    const d = spectrumForDisplay(ch.data, cap.sampleRate, {
      maxPoints: Number.MAX_SAFE_INTEGER,
      ...(vibration ? { quantity: "velocity-mm-s" as const, unit: ch.unit } : {}),
    });
    const n = d.hz.length;
    const values = Float32Array.from(vibration ? d.level : d.db);
    const dx = n > 1 ? d.hz[1] - d.hz[0] : cap.sampleRate / 2;
    const value: FullSpectrum = { channel: ch.name, unit: d.unit, series: { x0: d.hz[0] ?? 0, dx, values }, resolutionHz: d.resolutionHz };
    return { value, size: values.byteLength + 64 };
  });
}

export async function spectrumView(
  db: Knex,
  blob: BlobStore,
  id: number,
  q: { channel?: string; kind?: string; fmin?: number; fmax?: number; buckets: number },
) {
  const s = await fullSpectrum(db, blob, id, q.channel, q.kind);
  const top = s.series.x0 + (s.series.values.length - 1) * s.series.dx;
  const fMin = Math.max(s.series.x0, q.fmin ?? s.series.x0);
  const fMax = Math.min(top, q.fmax ?? top);
  if (!(fMax > fMin)) throw badRequest("Invalid frequency range", { fmax: `fmax must be above fmin (the spectrum spans ${s.series.x0}–${top.toFixed(1)} Hz)` });
  const d = decimateMinMax(s.series, { xMin: fMin, xMax: fMax, buckets: q.buckets });
  return { channel: s.channel, unit: s.unit, fMin, fMax, resolutionHz: s.resolutionHz, decimated: d.decimated, hz: d.x, min: d.min, max: d.max };
}

export async function waveformView(db: Knex, blob: BlobStore, id: number, q: { channel?: string; from?: number; to?: number; buckets: number }) {
  const cap = await loadParsed(db, blob, id);
  const ch = pickChannel(cap, q.channel, undefined);
  const d = decimateMinMax({ x0: 0, dx: 1 / cap.sampleRate, values: ch.data }, { xMin: q.from, xMax: q.to, buckets: q.buckets });
  return { channel: ch.name, unit: ch.unit, sampleRate: cap.sampleRate, decimated: d.decimated, t: d.x, min: d.min, max: d.max };
}
