// Spectra and waveforms of stored captures for the viewer. Each channel's full spectrum is read from the blob the
// worker stored at analysis time (server/captures/spectrum-store.ts), or else computed from the parsed capture; both
// are kept in an in-memory LRU, so zooming and panning only re-decimate (milliseconds).
import type { Knex } from "knex";
import { parseCapture } from "../../src/engine/parse/index.ts";
import type { Capture } from "../../src/engine/types.ts";
import type { BlobStore } from "../blob/store.ts";
import { badRequest, HttpError, notFound } from "../errors.ts";
import { decimateMinMax, LruCache } from "../spectra.ts";
import { computeFullSpectrum, decodeSpectrum, spectrumBlobKey, type FullSpectrum } from "./spectrum-store.ts";

export type { FullSpectrum };

const MB = 1024 * 1024;
const captures = new LruCache<Capture>(Number(process.env.BARHOUND_CAPTURE_CACHE_MB || 256) * MB);
const spectra = new LruCache<FullSpectrum>(Number(process.env.BARHOUND_SPECTRUM_CACHE_MB || 256) * MB);

/** Drop cached views (tests). */
export function clearSignalCaches() {
  captures.clear();
  spectra.clear();
}

async function captureRow(db: Knex, id: number) {
  const row = await db("captures").where({ id }).first("id", "blob_key", "file_name", "sample_rate", "channels", "status");
  if (!row) throw notFound("No such capture.");
  if (!row.blob_key) {
    // An analysed capture without a recording keeps its readings only (the demo history does this): gone for good.
    if (row.status === "analysed")
      throw new HttpError(410, "The raw recording of this capture was not kept; its readings are still shown.", undefined, "recording-not-kept");
    throw new HttpError(409, "This capture has no stored recording yet.", undefined, "no-recording");
  }
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

function pickChannel<C extends { name: string; kind: string }>(cap: { channels: C[] }, name: string | undefined, kind: string | undefined): C {
  if (name) {
    const ch = cap.channels.find((c) => c.name === name) ?? cap.channels.find((c) => c.name.toLowerCase() === name.toLowerCase());
    if (!ch) throw badRequest("No such channel", { channel: `This capture has: ${cap.channels.map((c) => c.name).join(", ")}` });
    return ch;
  }
  const ch = kind ? cap.channels.find((c) => c.kind === kind) : cap.channels.find((c) => c.kind === "current") ?? cap.channels[0];
  if (!ch) throw badRequest("No such channel", { kind: `This capture has no ${kind} channel` });
  return ch;
}

/** The spectrum the worker stored for a channel, or null (none yet, unreadable, or the store failed: recompute). */
async function storedSpectrum(blob: BlobStore, captureKey: string, channel: string): Promise<FullSpectrum | null> {
  let bytes: Buffer;
  try {
    bytes = await blob.get(spectrumBlobKey(captureKey, channel));
  } catch (err) {
    const e = err as { code?: string; name?: string };
    if (e.code !== "ENOENT" && e.name !== "NoSuchKey" && e.name !== "NotFound") console.error(`[spectra] stored spectrum of ${captureKey} ${channel}:`, (err as Error).message);
    return null;
  }
  const s = decodeSpectrum(bytes);
  return s && s.channel === channel ? s : null;
}

/**
 * The whole-band spectrum of one channel at full resolution (cached). The channel is picked from the capture row's
 * channel list, so a stored spectrum answers without reading the recording; without one, the recording is parsed
 * and transformed.
 */
export async function fullSpectrum(db: Knex, blob: BlobStore, id: number, channelName?: string, kind?: string): Promise<FullSpectrum> {
  const row = await captureRow(db, id);
  const listed = Array.isArray(row.channels) ? (row.channels as { name: string; kind: string }[]).filter((c) => typeof c?.name === "string") : [];
  const name = listed.length ? pickChannel({ channels: listed }, channelName, kind).name : undefined;
  const compute = async () => {
    const cap = await loadParsed(db, blob, id);
    return computeFullSpectrum(pickChannel(cap, name, undefined), cap.sampleRate);
  };
  const sized = (value: FullSpectrum) => ({ value, size: value.series.values.byteLength + 64 });
  if (!name) {
    // No channel list on the row (an old capture): parse to find the channel, then cache under its name.
    const cap = await loadParsed(db, blob, id);
    const ch = pickChannel(cap, channelName, kind);
    return spectra.getOrCompute(`s${id}:${ch.name}`, async () => sized(computeFullSpectrum(ch, cap.sampleRate)));
  }
  return spectra.getOrCompute(`s${id}:${name}`, async () => sized((await storedSpectrum(blob, row.blob_key, name)) ?? (await compute())));
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
  // Each point sits at the bin of its bucket's max (a line is drawn and read at its own bin); minHz says where the
  // bucket's min is, only when decimated (otherwise every point is one bin and min = max).
  return {
    channel: s.channel,
    unit: s.unit,
    fMin,
    fMax,
    resolutionHz: s.resolutionHz,
    binHz: s.series.dx,
    lowCutHz: s.lowCutHz ?? null,
    decimated: d.decimated,
    bucketHz: d.decimated ? d.bucketDx : null,
    hz: d.maxX,
    minHz: d.decimated ? d.minX : null,
    min: d.min,
    max: d.max,
  };
}

export async function waveformView(db: Knex, blob: BlobStore, id: number, q: { channel?: string; from?: number; to?: number; buckets: number }) {
  const cap = await loadParsed(db, blob, id);
  const ch = pickChannel(cap, q.channel, undefined);
  const d = decimateMinMax({ x0: 0, dx: 1 / cap.sampleRate, values: ch.data }, { xMin: q.from, xMax: q.to, buckets: q.buckets });
  return { channel: ch.name, unit: ch.unit, sampleRate: cap.sampleRate, decimated: d.decimated, t: d.x, min: d.min, max: d.max };
}
