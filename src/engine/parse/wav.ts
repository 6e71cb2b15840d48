// WAV (RIFF/WAVE) capture reader and writer.
//
// Reads PCM integer 16/24/32-bit (also in WAVE_FORMAT_EXTENSIBLE, with any valid-bits value inside those
// containers) and IEEE float 32/64-bit, any channel count. Unknown chunks are skipped, honouring the pad byte
// after odd-sized chunks. A data chunk size of 0xFFFFFFFF (written by some streaming recorders that never patch
// the header) is read as "up to the end of the file", rounded down to whole frames; any other size that runs
// past the end of the file is a "wav-truncated" error. A trailing partial frame is dropped.
//
// Samples: integers are normalised to [-1, 1) (divided by 2^(bits-1)), then multiplied by the channel's scale;
// floats are multiplied by the scale. Output arrays are Float64Array.
//
// Channel description: an optional "bhch" chunk holding UTF-8 JSON, one entry per channel, at most 1 MiB:
//   [{ "name": "Ia", "kind": "current", "unit": "A", "scale": 0.01, "position": "A" }, ...]
// opts.channels overrides it field by field. Without either: names ch1..chN, kind "current", unit "A", scale 1.
//
// The header and chunk list are read by wav-chunks.ts (shared with the streaming validator, wav-stream.ts); this
// module decodes the samples and writes WAV files.

import type { Capture, Channel } from "../types.ts";
import { DEFAULT_MIN_SAMPLES, checkMinSamples } from "./errors.ts";
import {
  CHANNEL_CHUNK_ID,
  FORMAT_EXTENSIBLE,
  FORMAT_FLOAT,
  FORMAT_PCM,
  GUID_TAIL,
  WavChunkReader,
  channelInfo,
  nonFiniteSampleError,
  type WavChannelOption,
  type WavFormat,
} from "./wav-chunks.ts";

export type { WavChannelOption } from "./wav-chunks.ts";

export interface WavParseOptions {
  channels?: WavChannelOption[];
  minSamples?: number;
}

export interface WavWriteOptions {
  /** Bits per sample (default 32). */
  bits?: 16 | 24 | 32;
  /** IEEE float samples (needs bits 32). Default: float when no bits are given, integer PCM when they are. */
  float?: boolean;
  /** Write the "bhch" channel description chunk (default true). */
  describeChannels?: boolean;
}

export function parseWav(bytes: Uint8Array, opts: WavParseOptions = {}): Capture {
  const reader = new WavChunkReader();
  reader.push(bytes);
  const { format, dataStart, frames, description } = reader.finish();
  checkMinSamples(frames, opts.minSamples ?? DEFAULT_MIN_SAMPLES, format.sampleRate);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const channels: Channel[] = [];
  for (let ch = 0; ch < format.channels; ch++) {
    const info = channelInfo(ch, description?.[ch], opts.channels?.[ch]);
    const data = decodeChannel(bytes, view, dataStart, frames, ch, format, info.scale);
    const channel: Channel = { name: info.name, kind: info.kind, unit: info.unit, data };
    if (info.position !== undefined) channel.position = info.position;
    channels.push(channel);
  }
  return { sampleRate: format.sampleRate, channels, format: "wav" };
}

function decodeChannel(bytes: Uint8Array, view: DataView, start: number, frames: number, ch: number, f: WavFormat, scale: number): Float64Array {
  const out = new Float64Array(frames);
  const stride = f.blockAlign;
  let p = start + ch * (f.containerBits >> 3);
  if (f.float) {
    const wide = f.containerBits === 64;
    for (let i = 0; i < frames; i++, p += stride) {
      const v = wide ? view.getFloat64(p, true) : view.getFloat32(p, true);
      if (v - v !== 0) throw nonFiniteSampleError(i, ch, p, v);
      out[i] = v * scale;
    }
    return out;
  }
  // Dividing by a power of two is exact, so int * (scale / 2^(bits-1)) equals (int / 2^(bits-1)) * scale.
  if (f.containerBits === 16) {
    const k = scale / 32768;
    for (let i = 0; i < frames; i++, p += stride) out[i] = (((bytes[p] | (bytes[p + 1] << 8)) << 16) >> 16) * k;
  } else if (f.containerBits === 24) {
    const k = scale / 8388608;
    for (let i = 0; i < frames; i++, p += stride) out[i] = (((bytes[p] | (bytes[p + 1] << 8) | (bytes[p + 2] << 16)) << 8) >> 8) * k;
  } else {
    const k = scale / 2147483648;
    for (let i = 0; i < frames; i++, p += stride) out[i] = (bytes[p] | (bytes[p + 1] << 8) | (bytes[p + 2] << 16) | (bytes[p + 3] << 24)) * k;
  }
  return out;
}

// ---------------------------------------------------------------------------------------------------------------
// Writer

/**
 * Writes a capture as WAV. Integer PCM gets a per-channel scale so that the channel's peak maps to full scale
 * (recorded in the "bhch" chunk, so parseWav restores engineering units); float samples are written as-is with
 * scale 1. Files with more than two channels or more than 16 bits use WAVE_FORMAT_EXTENSIBLE.
 * The WAV header stores the sample rate in whole Hz, so a fractional rate is a RangeError.
 */
export function writeWav(capture: Capture, opts: WavWriteOptions = {}): Uint8Array {
  const bits = opts.bits ?? 32;
  const float = opts.float ?? opts.bits === undefined;
  if (float && bits !== 32) throw new RangeError("Float WAV samples must be 32-bit.");
  const rate = capture.sampleRate;
  if (!Number.isInteger(rate) || rate <= 0 || rate > 0xffffffff) {
    throw new RangeError(`A WAV file stores the sample rate in whole Hz; ${rate} cannot be written.`);
  }
  const nCh = capture.channels.length;
  if (nCh === 0 || nCh > 65535) throw new RangeError("A WAV file needs 1 to 65535 channels.");
  const frames = capture.channels[0].data.length;
  if (capture.channels.some((c) => c.data.length !== frames)) throw new RangeError("All channels must have the same length.");

  const bytesPerSample = bits >> 3;
  const blockAlign = nCh * bytesPerSample;
  const dataBytes = frames * blockAlign;
  const extensible = nCh > 2 || bits > 16;
  const fmtSize = extensible ? 40 : 16;
  const fullScale = 2 ** (bits - 1);
  const scales = capture.channels.map((c) => (float ? 1 : intScale(c.data, fullScale)));
  const describe = opts.describeChannels ?? true;
  const descriptionBytes = describe ? new TextEncoder().encode(JSON.stringify(capture.channels.map((c, i) => describeChannel(c, scales[i])))) : new Uint8Array(0);
  const descriptionChunk = describe ? 8 + descriptionBytes.length + (descriptionBytes.length & 1) : 0;
  const total = 12 + 8 + fmtSize + descriptionChunk + 8 + dataBytes + (dataBytes & 1);
  if (total - 8 > 0xffffffff) throw new RangeError("The capture is too large for a WAV file (4 GiB limit).");

  const out = new Uint8Array(total);
  const view = new DataView(out.buffer);
  const ascii = (at: number, text: string) => {
    for (let i = 0; i < text.length; i++) out[at + i] = text.charCodeAt(i);
  };
  ascii(0, "RIFF");
  view.setUint32(4, total - 8, true);
  ascii(8, "WAVE");
  let p = 12;
  ascii(p, "fmt ");
  view.setUint32(p + 4, fmtSize, true);
  const code = float ? FORMAT_FLOAT : FORMAT_PCM;
  view.setUint16(p + 8, extensible ? FORMAT_EXTENSIBLE : code, true);
  view.setUint16(p + 10, nCh, true);
  view.setUint32(p + 12, rate, true);
  view.setUint32(p + 16, rate * blockAlign, true);
  view.setUint16(p + 20, blockAlign, true);
  view.setUint16(p + 22, bits, true);
  if (extensible) {
    view.setUint16(p + 24, 22, true); // cbSize
    view.setUint16(p + 26, bits, true); // valid bits
    view.setUint32(p + 28, 0, true); // channel mask: none (not loudspeakers)
    view.setUint16(p + 32, code, true);
    out.set(GUID_TAIL, p + 34);
  }
  p += 8 + fmtSize;
  if (describe) {
    ascii(p, CHANNEL_CHUNK_ID);
    view.setUint32(p + 4, descriptionBytes.length, true);
    out.set(descriptionBytes, p + 8);
    p += descriptionChunk;
  }
  ascii(p, "data");
  view.setUint32(p + 4, dataBytes, true);
  p += 8;
  for (let ch = 0; ch < nCh; ch++) {
    const data = capture.channels[ch].data;
    const k = fullScale / scales[ch];
    let q = p + ch * bytesPerSample;
    for (let i = 0; i < frames; i++, q += blockAlign) {
      if (float) {
        view.setFloat32(q, data[i], true);
        continue;
      }
      let v = Math.round(data[i] * k);
      if (!(v >= -fullScale)) v = Number.isNaN(v) ? 0 : -fullScale;
      else if (v > fullScale - 1) v = fullScale - 1;
      out[q] = v & 0xff;
      out[q + 1] = (v >> 8) & 0xff;
      if (bits >= 24) out[q + 2] = (v >> 16) & 0xff;
      if (bits === 32) out[q + 3] = (v >> 24) & 0xff;
    }
  }
  return out;
}

/** Scale for integer PCM: the channel's peak lands on the largest code, so rounding error is at most half a step. */
function intScale(data: Float32Array | Float64Array, fullScale: number): number {
  let peak = 0;
  for (let i = 0; i < data.length; i++) {
    const a = Math.abs(data[i]);
    if (a > peak) peak = a;
  }
  if (!(peak > 0) || !Number.isFinite(peak)) return 1;
  return (peak * fullScale) / (fullScale - 1);
}

function describeChannel(c: Channel, scale: number): Record<string, unknown> {
  const entry: Record<string, unknown> = { name: c.name, kind: c.kind, unit: c.unit, scale };
  if (c.position !== undefined) entry.position = c.position;
  return entry;
}
