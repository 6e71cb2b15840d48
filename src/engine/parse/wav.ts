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
// Channel description: an optional "bhch" chunk holding UTF-8 JSON, one entry per channel:
//   [{ "name": "Ia", "kind": "current", "unit": "A", "scale": 0.01, "position": "A" }, ...]
// opts.channels overrides it field by field. Without either: names ch1..chN, kind "current", unit "A", scale 1.

import type { Capture, Channel, ChannelKind } from "../types.ts";
import { CaptureParseError, DEFAULT_MIN_SAMPLES, checkMinSamples } from "./errors.ts";

export interface WavChannelOption {
  name?: string;
  kind?: ChannelKind;
  unit?: string;
  scale?: number;
  position?: string;
}

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

const FORMAT_PCM = 1;
const FORMAT_FLOAT = 3;
const FORMAT_EXTENSIBLE = 0xfffe;
const STREAMING_SIZE = 0xffffffff;
const CHANNEL_CHUNK_ID = "bhch";
// Tail shared by the KSDATAFORMAT_SUBTYPE_* GUIDs whose first two bytes are the classic format code.
const GUID_TAIL = [0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71];

const FORMAT_NAMES: Record<number, string> = {
  0x0002: "Microsoft ADPCM",
  0x0006: "A-law",
  0x0007: "µ-law",
  0x0011: "IMA ADPCM",
  0x0031: "GSM 6.10",
  0x0050: "MPEG",
  0x0055: "MP3",
  0x00ff: "AAC",
  0x0161: "WMA",
  0xf1ac: "FLAC",
};

const KINDS: ReadonlySet<string> = new Set(["current", "vibration", "voltage", "other"]);

interface WavFormat {
  code: number;
  channels: number;
  sampleRate: number;
  blockAlign: number;
  containerBits: number;
  float: boolean;
}

function fourCC(bytes: Uint8Array, at: number): string {
  return String.fromCharCode(bytes[at], bytes[at + 1], bytes[at + 2], bytes[at + 3]);
}

export function parseWav(bytes: Uint8Array, opts: WavParseOptions = {}): Capture {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const size = bytes.length;
  if (size === 0) throw new CaptureParseError("empty", "The file is empty.");
  if (size < 12) {
    throw new CaptureParseError("wav-truncated", `The file is only ${size} bytes long; a WAV header alone needs at least 44 bytes.`, { byte: size });
  }
  const riff = fourCC(bytes, 0);
  if (riff === "RIFX" || riff === "RF64" || riff === "BW64") {
    throw new CaptureParseError(
      "unsupported-encoding",
      `This is a ${riff === "RIFX" ? "big-endian (RIFX)" : riff} WAV file, which is not supported. Export it as a standard little-endian RIFF WAV.`,
      { byte: 0 },
    );
  }
  if (riff !== "RIFF" || fourCC(bytes, 8) !== "WAVE") {
    throw new CaptureParseError("wav-bad-header", "The file does not start with a RIFF/WAVE header, so it is not a WAV file.", { byte: 0 });
  }

  let format: WavFormat | undefined;
  let dataStart = -1;
  let dataBytes = 0;
  let description: unknown[] | undefined;
  let pos = 12;
  while (pos + 8 <= size) {
    const id = fourCC(bytes, pos);
    const chunkSize = view.getUint32(pos + 4, true);
    const body = pos + 8;
    if (id === "data") {
      if (chunkSize === STREAMING_SIZE) dataBytes = size - body;
      else if (body + chunkSize > size) {
        throw new CaptureParseError(
          "wav-truncated",
          `The WAV header says the audio data is ${chunkSize} bytes, but only ${size - body} bytes follow it (from byte ${body}). ` +
            `The file was cut short, probably during copying or upload; copy it again from the recorder.`,
          { byte: body },
        );
      } else dataBytes = chunkSize;
      dataStart = body;
      if (chunkSize === STREAMING_SIZE) break;
    } else {
      if (body + chunkSize > size) {
        if (dataStart >= 0) break; // junk after the audio data is harmless
        throw new CaptureParseError(
          "wav-truncated",
          `The "${printableId(id)}" chunk at byte ${pos} claims ${chunkSize} bytes, but only ${size - body} remain. The file is cut short or damaged.`,
          { byte: pos },
        );
      }
      if (id === "fmt ") format = readFormat(view, body, chunkSize);
      else if (id === CHANNEL_CHUNK_ID) description = readDescription(bytes, body, chunkSize);
    }
    pos = body + chunkSize + (chunkSize & 1);
  }

  if (format === undefined) {
    throw new CaptureParseError("wav-bad-header", `The WAV file has no "fmt " chunk describing its samples${dataStart < 0 ? " and no audio data" : ""}.`, { byte: 12 });
  }
  if (dataStart < 0) {
    throw new CaptureParseError("wav-truncated", `The WAV file ends (at byte ${size}) before its audio data ("data" chunk). The file is cut short or damaged.`, { byte: size });
  }
  if (description !== undefined && description.length !== format.channels) {
    throw new CaptureParseError(
      "wav-bad-header",
      `The channel description in the file lists ${description.length} channels but the audio has ${format.channels}.`,
    );
  }

  const frames = Math.floor(dataBytes / format.blockAlign);
  checkMinSamples(frames, opts.minSamples ?? DEFAULT_MIN_SAMPLES, format.sampleRate);
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

function printableId(id: string): string {
  return /^[\x20-\x7e]{4}$/.test(id) ? id : "unnamed";
}

function readFormat(view: DataView, at: number, chunkSize: number): WavFormat {
  if (chunkSize < 16) {
    throw new CaptureParseError("wav-bad-header", `The WAV "fmt " chunk is ${chunkSize} bytes; it needs at least 16.`, { byte: at });
  }
  let code = view.getUint16(at, true);
  const channels = view.getUint16(at + 2, true);
  const sampleRate = view.getUint32(at + 4, true);
  const blockAlign = view.getUint16(at + 12, true);
  const bitsPerSample = view.getUint16(at + 14, true);
  if (code === FORMAT_EXTENSIBLE) {
    if (chunkSize < 40) {
      throw new CaptureParseError("wav-bad-header", `The WAV "fmt " chunk says WAVE_FORMAT_EXTENSIBLE but is only ${chunkSize} bytes (needs 40).`, { byte: at });
    }
    code = view.getUint16(at + 24, true);
    for (let i = 0; i < GUID_TAIL.length; i++) {
      if (view.getUint8(at + 26 + i) !== GUID_TAIL[i]) {
        throw new CaptureParseError("unsupported-encoding", "The WAV file uses an unknown sample encoding (an extensible sub-format GUID this reader does not know).", { byte: at + 24 });
      }
    }
  }
  if (code !== FORMAT_PCM && code !== FORMAT_FLOAT) {
    const name = FORMAT_NAMES[code];
    throw new CaptureParseError(
      "unsupported-encoding",
      `The WAV file is encoded as ${name ?? "an unsupported format"} (format code ${code}, 0x${code.toString(16).padStart(4, "0")}). ` +
        `Export it as 16-, 24- or 32-bit PCM or 32-bit float.`,
      { byte: at },
    );
  }
  if (channels === 0) throw new CaptureParseError("wav-bad-header", "The WAV header says the file has 0 channels.", { byte: at + 2 });
  if (sampleRate === 0) throw new CaptureParseError("wav-bad-header", "The WAV header gives a sample rate of 0 Hz.", { byte: at + 4 });
  const float = code === FORMAT_FLOAT;
  const containerBits = blockAlign > 0 && blockAlign % channels === 0 ? (blockAlign / channels) * 8 : bitsPerSample;
  const supported = float ? containerBits === 32 || containerBits === 64 : containerBits === 16 || containerBits === 24 || containerBits === 32;
  if (!supported) {
    throw new CaptureParseError(
      "unsupported-encoding",
      `The WAV file has ${containerBits}-bit ${float ? "float" : "integer PCM"} samples (format code ${code}), which is not supported. ` +
        `Export it as 16-, 24- or 32-bit PCM or 32-bit float.`,
      { byte: at + 14 },
    );
  }
  if (blockAlign !== (channels * containerBits) / 8) {
    throw new CaptureParseError("wav-bad-header", `The WAV header's block size (${blockAlign} bytes) does not fit ${channels} channels of ${bitsPerSample} bits.`, { byte: at + 12 });
  }
  return { code, channels, sampleRate, blockAlign, containerBits, float };
}

function readDescription(bytes: Uint8Array, at: number, chunkSize: number): unknown[] {
  let text: string;
  let parsed: unknown;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(bytes.subarray(at, at + chunkSize));
    parsed = JSON.parse(text.replace(/\0+$/, ""));
  } catch {
    throw new CaptureParseError("wav-bad-header", `The channel description in the WAV file (chunk "bhch" at byte ${at - 8}) is not valid JSON.`, { byte: at - 8 });
  }
  if (!Array.isArray(parsed)) {
    throw new CaptureParseError("wav-bad-header", `The channel description in the WAV file (chunk "bhch" at byte ${at - 8}) is not a list of channels.`, { byte: at - 8 });
  }
  return parsed;
}

interface ChannelInfo {
  name: string;
  kind: ChannelKind;
  unit: string;
  scale: number;
  position?: string;
}

function channelInfo(index: number, described: unknown, override: WavChannelOption | undefined): ChannelInfo {
  const d = (typeof described === "object" && described !== null ? described : {}) as Record<string, unknown>;
  const name = override?.name ?? (typeof d.name === "string" && d.name !== "" ? d.name : `ch${index + 1}`);
  const kind = override?.kind ?? (typeof d.kind === "string" && KINDS.has(d.kind) ? (d.kind as ChannelKind) : "current");
  const unit = override?.unit ?? (typeof d.unit === "string" ? d.unit : defaultUnit(kind));
  const scale = override?.scale ?? (typeof d.scale === "number" && Number.isFinite(d.scale) ? d.scale : 1);
  if (!Number.isFinite(scale)) {
    throw new CaptureParseError("wav-bad-header", `The scale given for channel ${index + 1} (${scale}) is not a finite number.`);
  }
  const position = override?.position ?? (typeof d.position === "string" ? d.position : undefined);
  const info: ChannelInfo = { name, kind, unit, scale };
  if (position !== undefined) info.position = position;
  return info;
}

function defaultUnit(kind: ChannelKind): string {
  return kind === "current" ? "A" : kind === "voltage" ? "V" : kind === "vibration" ? "m/s2" : "";
}

function decodeChannel(bytes: Uint8Array, view: DataView, start: number, frames: number, ch: number, f: WavFormat, scale: number): Float64Array {
  const out = new Float64Array(frames);
  const stride = f.blockAlign;
  let p = start + ch * (f.containerBits >> 3);
  if (f.float) {
    const wide = f.containerBits === 64;
    for (let i = 0; i < frames; i++, p += stride) {
      const v = wide ? view.getFloat64(p, true) : view.getFloat32(p, true);
      if (v - v !== 0) {
        throw new CaptureParseError(
          "non-finite",
          `Sample ${i + 1} of channel ${ch + 1} (byte ${p}) is ${v} rather than a finite number. The recording is damaged at that point.`,
          { byte: p },
        );
      }
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
