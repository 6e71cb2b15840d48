// The full-range display spectrum of each channel, computed once at analysis time and stored next to the capture,
// so the first spectrum view after a server start reads ~4 bytes per bin instead of re-reading and re-transforming
// the whole recording. Pure module (engine + Buffer): the worker's analysis thread computes and encodes, the server
// decodes.
//
// Blob key: `<capture blob key>.spectrum/<encodeURIComponent(channel name)>.f32`. Layout: a little-endian uint32
// header length, a UTF-8 JSON header `{ format, channel, kind, unit, x0, dx, resolutionHz, count }`, zero padding
// to a multiple of 4 bytes, then `count` little-endian float32 values. Memory: channels × bins × 4 bytes.
import { spectrumForDisplay } from "../../src/engine/spectrum.ts";
import type { Channel } from "../../src/engine/types.ts";
import type { UniformSeries } from "../spectra.ts";

export interface FullSpectrum {
  channel: string;
  unit: string;
  series: UniformSeries & { values: Float32Array };
  resolutionHz: number;
  /** Velocity integrated from acceleration: lines below this are 0 (see spectrumForDisplay). */
  lowCutHz?: number;
}

export const SPECTRUM_FORMAT = "barhound-spectrum-1";

export function spectrumBlobKey(captureBlobKey: string, channel: string): string {
  // encodeURIComponent leaves "." alone; a name of "." or ".." still yields a safe last segment ("..f32").
  return `${captureBlobKey}.spectrum/${encodeURIComponent(channel)}.f32`;
}

/** The whole-band spectrum of one channel at full resolution: dB re the supply line for current, mm/s r.m.s. for vibration. */
export function computeFullSpectrum(ch: Channel, sampleRate: number): FullSpectrum {
  const vibration = ch.kind === "vibration";
  const d = spectrumForDisplay(ch.data, sampleRate, {
    maxPoints: Number.MAX_SAFE_INTEGER,
    ...(vibration ? { quantity: "velocity-mm-s" as const, unit: ch.unit } : {}),
  });
  const n = d.hz.length;
  const values = Float32Array.from(vibration ? d.level : d.db);
  const dx = n > 1 ? d.hz[1] - d.hz[0] : sampleRate / 2;
  return { channel: ch.name, unit: d.unit, series: { x0: d.hz[0] ?? 0, dx, values }, resolutionHz: d.resolutionHz, ...(d.lowCutHz !== undefined ? { lowCutHz: d.lowCutHz } : {}) };
}

const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

export function encodeSpectrum(s: FullSpectrum, kind: string): Buffer {
  const values = s.series.values;
  const header = Buffer.from(
    JSON.stringify({ format: SPECTRUM_FORMAT, channel: s.channel, kind, unit: s.unit, x0: s.series.x0, dx: s.series.dx, resolutionHz: s.resolutionHz, lowCutHz: s.lowCutHz, count: values.length }),
    "utf8",
  );
  const start = Math.ceil((4 + header.length) / 4) * 4;
  const out = Buffer.alloc(start + values.length * 4);
  out.writeUInt32LE(header.length, 0);
  header.copy(out, 4);
  if (LITTLE_ENDIAN) Buffer.from(values.buffer, values.byteOffset, values.byteLength).copy(out, start);
  else for (let i = 0; i < values.length; i++) out.writeFloatLE(values[i], start + i * 4);
  return out;
}

/** The stored spectrum, or null when the bytes are not one (truncated, another format): the caller recomputes. */
export function decodeSpectrum(bytes: Buffer): FullSpectrum | null {
  if (bytes.length < 8) return null;
  const len = bytes.readUInt32LE(0);
  if (4 + len > bytes.length) return null;
  let h: { format?: unknown; channel?: unknown; unit?: unknown; x0?: unknown; dx?: unknown; resolutionHz?: unknown; lowCutHz?: unknown; count?: unknown };
  try {
    h = JSON.parse(bytes.toString("utf8", 4, 4 + len));
  } catch {
    return null;
  }
  const start = Math.ceil((4 + len) / 4) * 4;
  const count = Number(h.count);
  if (h.format !== SPECTRUM_FORMAT || !Number.isInteger(count) || bytes.length !== start + count * 4) return null;
  if (typeof h.channel !== "string" || typeof h.unit !== "string" || ![h.x0, h.dx, h.resolutionHz].every((v) => typeof v === "number")) return null;
  const values = new Float32Array(count);
  if (LITTLE_ENDIAN) new Uint8Array(values.buffer).set(bytes.subarray(start, start + count * 4));
  else for (let i = 0; i < count; i++) values[i] = bytes.readFloatLE(start + i * 4);
  return {
    channel: h.channel,
    unit: h.unit,
    series: { x0: h.x0 as number, dx: h.dx as number, values },
    resolutionHz: h.resolutionHz as number,
    ...(typeof h.lowCutHz === "number" ? { lowCutHz: h.lowCutHz } : {}),
  };
}
