// The RIFF/WAVE header and chunk list of a WAV capture, read incrementally: WavChunkReader takes the file in pieces
// (or whole, in one push) and keeps only chunk headers, the "fmt " fields and the "bhch" channel description, never
// the audio data. Shared by the full parser (wav.ts) and the streaming validator (wav-stream.ts), so both refuse the
// same files with the same messages. The rules are listed at the top of wav.ts.

import type { ChannelKind } from "../types.ts";
import { CaptureParseError } from "./errors.ts";

export interface WavChannelOption {
  name?: string;
  kind?: ChannelKind;
  unit?: string;
  scale?: number;
  position?: string;
}

export const FORMAT_PCM = 1;
export const FORMAT_FLOAT = 3;
export const FORMAT_EXTENSIBLE = 0xfffe;
const STREAMING_SIZE = 0xffffffff;
export const CHANNEL_CHUNK_ID = "bhch";
/** A channel description larger than this is refused (dozens of channels take a few KiB). */
export const MAX_DESCRIPTION_BYTES = 1 << 20;
// Tail shared by the KSDATAFORMAT_SUBTYPE_* GUIDs whose first two bytes are the classic format code.
export const GUID_TAIL = [0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71];
/** Bytes of a "fmt " chunk the reader looks at (WAVE_FORMAT_EXTENSIBLE: 40). */
const FMT_BYTES = 40;

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

export interface WavFormat {
  code: number;
  channels: number;
  sampleRate: number;
  blockAlign: number;
  containerBits: number;
  float: boolean;
}

/** What the chunk list says, once the whole file has passed. */
export interface WavLayout {
  format: WavFormat;
  /** File offset and length of the (last) "data" chunk's audio bytes. */
  dataStart: number;
  dataBytes: number;
  description?: unknown[];
  /** Whole frames in the audio data (a trailing partial frame is dropped). */
  frames: number;
}

/** The step the reader is in: bytes before `from` are skipped, bytes from `from` to `until` are this step's, the first `keep` of them held. */
type Step =
  | { kind: "riff"; from: number; until: number; keep: number }
  | { kind: "chunk-header"; from: number; until: number; keep: number }
  | { kind: "body"; id: string; chunkPos: number; size: number; from: number; until: number; keep: number }
  | { kind: "data"; chunkPos: number; size: number; from: number; until: number; keep: number };

/**
 * Reads the chunk list as the bytes pass. A chunk's rules apply once the whole chunk has arrived (so one that runs
 * past the end of the file is "truncated", or ignored after the audio data, as the end of the file tells).
 */
export class WavChunkReader {
  /** Called at the start of each "data" chunk: its audio bytes' file offset, and whether they run to the end of the file. */
  onDataChunk?: (dataStart: number, toEnd: boolean) => void;
  /** Called with the audio bytes of the current "data" chunk as they pass: bytes[start, end), file offset of bytes[start]. */
  onData?: (bytes: Uint8Array, start: number, end: number, offset: number) => void;

  /** The format in force now (the last complete "fmt " chunk), and how many "fmt " chunks were read. */
  format: WavFormat | undefined;
  formatChunks = 0;

  private offset = 0;
  private step: Step = { kind: "riff", from: 0, until: 12, keep: 12 };
  private held = new Uint8Array(64);
  private heldLength = 0;
  private dataStart = -1;
  private dataBytes = 0;
  private description: unknown[] | undefined;

  /** Bytes pushed so far. */
  get bytesRead(): number {
    return this.offset;
  }

  push(bytes: Uint8Array): void {
    let p = 0;
    while (p < bytes.length) {
      const step = this.step;
      if (this.offset < step.from) {
        const skip = Math.min(step.from - this.offset, bytes.length - p);
        p += skip;
        this.offset += skip;
        continue;
      }
      const take = Math.min(step.until - this.offset, bytes.length - p);
      const into = this.offset - step.from;
      if (into < step.keep) this.hold(bytes.subarray(p, p + Math.min(take, step.keep - into)));
      if (step.kind === "data" && this.onData) this.onData(bytes, p, p + take, this.offset);
      p += take;
      this.offset += take;
      if (this.offset === step.until) this.complete();
    }
  }

  /** The end of the file: the layout, or the CaptureParseError the file earns. */
  finish(): WavLayout {
    const size = this.offset;
    if (size === 0) throw new CaptureParseError("empty", "The file is empty.");
    if (size < 12) {
      throw new CaptureParseError("wav-truncated", `The file is only ${size} bytes long; a WAV header alone needs at least 44 bytes.`, { byte: size });
    }
    const step = this.step;
    if (step.kind === "data") {
      const body = step.chunkPos + 8;
      if (step.size === STREAMING_SIZE) {
        this.dataStart = body;
        this.dataBytes = size - body;
      } else {
        throw new CaptureParseError(
          "wav-truncated",
          `The WAV header says the audio data is ${step.size} bytes, but only ${size - body} bytes follow it (from byte ${body}). ` +
            `The file was cut short, probably during copying or upload; copy it again from the recorder.`,
          { byte: body },
        );
      }
    } else if (step.kind === "body" && this.dataStart < 0) {
      // A chunk that runs past the end of the file; after the audio data it is harmless junk.
      throw new CaptureParseError(
        "wav-truncated",
        `The "${printableId(step.id)}" chunk at byte ${step.chunkPos} claims ${step.size} bytes, but only ${size - step.chunkPos - 8} remain. The file is cut short or damaged.`,
        { byte: step.chunkPos },
      );
    }
    const format = this.format;
    if (format === undefined) {
      throw new CaptureParseError("wav-bad-header", `The WAV file has no "fmt " chunk describing its samples${this.dataStart < 0 ? " and no audio data" : ""}.`, { byte: 12 });
    }
    if (this.dataStart < 0) {
      throw new CaptureParseError("wav-truncated", `The WAV file ends (at byte ${size}) before its audio data ("data" chunk). The file is cut short or damaged.`, { byte: size });
    }
    if (this.description !== undefined && this.description.length !== format.channels) {
      throw new CaptureParseError(
        "wav-bad-header",
        `The channel description in the file lists ${this.description.length} channels but the audio has ${format.channels}.`,
      );
    }
    const layout: WavLayout = { format, dataStart: this.dataStart, dataBytes: this.dataBytes, frames: Math.floor(this.dataBytes / format.blockAlign) };
    if (this.description !== undefined) layout.description = this.description;
    return layout;
  }

  private hold(part: Uint8Array): void {
    if (this.heldLength + part.length > this.held.length) {
      const grown = new Uint8Array(Math.max(this.held.length * 2, this.heldLength + part.length));
      grown.set(this.held.subarray(0, this.heldLength));
      this.held = grown;
    }
    this.held.set(part, this.heldLength);
    this.heldLength += part.length;
  }

  /** The current step has all its bytes: apply its rules and move on. */
  private complete(): void {
    for (;;) {
      const step = this.step;
      const held = this.held.subarray(0, this.heldLength);
      this.heldLength = 0;
      if (step.kind === "riff") {
        checkRiffHeader(held);
        this.step = chunkHeaderAt(12);
      } else if (step.kind === "chunk-header") {
        const id = fourCC(held, 0);
        const size = new DataView(held.buffer, held.byteOffset, 8).getUint32(4, true);
        const body = step.from + 8;
        if (id === "data") {
          this.step = { kind: "data", chunkPos: step.from, size, from: body, until: size === STREAMING_SIZE ? Infinity : body + size, keep: 0 };
          this.onDataChunk?.(body, size === STREAMING_SIZE);
        } else {
          const keep = id === "fmt " ? Math.min(size, FMT_BYTES) : id === CHANNEL_CHUNK_ID && size <= MAX_DESCRIPTION_BYTES ? size : 0;
          this.step = { kind: "body", id, chunkPos: step.from, size, from: body, until: body + size, keep };
        }
      } else if (step.kind === "data") {
        this.dataStart = step.from;
        this.dataBytes = step.size;
        this.step = chunkHeaderAt(step.until + (step.size & 1));
      } else {
        const body = step.from;
        if (step.id === "fmt ") {
          this.format = readFormat(new DataView(held.buffer, held.byteOffset, held.length), step.size, body);
          this.formatChunks++;
        } else if (step.id === CHANNEL_CHUNK_ID) {
          if (step.size > MAX_DESCRIPTION_BYTES) {
            throw new CaptureParseError(
              "wav-bad-header",
              `The channel description in the WAV file (chunk "bhch" at byte ${step.chunkPos}) is ${step.size} bytes; at most ${MAX_DESCRIPTION_BYTES} are allowed.`,
              { byte: step.chunkPos },
            );
          }
          this.description = readDescription(held, step.chunkPos);
        }
        this.step = chunkHeaderAt(step.until + (step.size & 1));
      }
      // An empty chunk body is complete as soon as it starts.
      const next = this.step;
      if (!(next.from === this.offset && next.until === this.offset)) return;
    }
  }
}

function chunkHeaderAt(pos: number): Step {
  return { kind: "chunk-header", from: pos, until: pos + 8, keep: 8 };
}

function fourCC(bytes: Uint8Array, at: number): string {
  return String.fromCharCode(bytes[at], bytes[at + 1], bytes[at + 2], bytes[at + 3]);
}

function checkRiffHeader(head: Uint8Array): void {
  const riff = fourCC(head, 0);
  if (riff === "RIFX" || riff === "RF64" || riff === "BW64") {
    throw new CaptureParseError(
      "unsupported-encoding",
      `This is a ${riff === "RIFX" ? "big-endian (RIFX)" : riff} WAV file, which is not supported. Export it as a standard little-endian RIFF WAV.`,
      { byte: 0 },
    );
  }
  if (riff !== "RIFF" || fourCC(head, 8) !== "WAVE") {
    throw new CaptureParseError("wav-bad-header", "The file does not start with a RIFF/WAVE header, so it is not a WAV file.", { byte: 0 });
  }
}

function printableId(id: string): string {
  return /^[\x20-\x7e]{4}$/.test(id) ? id : "unnamed";
}

/** The "fmt " chunk's fields; `view` holds its first bytes (up to 40), `at` is the body's file offset (for messages). */
function readFormat(view: DataView, chunkSize: number, at: number): WavFormat {
  if (chunkSize < 16) {
    throw new CaptureParseError("wav-bad-header", `The WAV "fmt " chunk is ${chunkSize} bytes; it needs at least 16.`, { byte: at });
  }
  let code = view.getUint16(0, true);
  const channels = view.getUint16(2, true);
  const sampleRate = view.getUint32(4, true);
  const blockAlign = view.getUint16(12, true);
  const bitsPerSample = view.getUint16(14, true);
  if (code === FORMAT_EXTENSIBLE) {
    if (chunkSize < 40) {
      throw new CaptureParseError("wav-bad-header", `The WAV "fmt " chunk says WAVE_FORMAT_EXTENSIBLE but is only ${chunkSize} bytes (needs 40).`, { byte: at });
    }
    code = view.getUint16(24, true);
    for (let i = 0; i < GUID_TAIL.length; i++) {
      if (view.getUint8(26 + i) !== GUID_TAIL[i]) {
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

/** The "bhch" chunk's JSON list; `chunkPos` is the chunk's file offset (for messages). */
function readDescription(body: Uint8Array, chunkPos: number): unknown[] {
  let text: string;
  let parsed: unknown;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(body);
    parsed = JSON.parse(text.replace(/\0+$/, ""));
  } catch {
    throw new CaptureParseError("wav-bad-header", `The channel description in the WAV file (chunk "bhch" at byte ${chunkPos}) is not valid JSON.`, { byte: chunkPos });
  }
  if (!Array.isArray(parsed)) {
    throw new CaptureParseError("wav-bad-header", `The channel description in the WAV file (chunk "bhch" at byte ${chunkPos}) is not a list of channels.`, { byte: chunkPos });
  }
  return parsed;
}

export interface ChannelInfo {
  name: string;
  kind: ChannelKind;
  unit: string;
  scale: number;
  position?: string;
}

/** Name, kind, unit, scale and position of channel `index`: the override, else the file's description, else defaults. */
export function channelInfo(index: number, described: unknown, override: WavChannelOption | undefined): ChannelInfo {
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

/** A float sample that is NaN or infinite: sample `frame` (0-based) of channel `ch` (0-based), at file offset `byte`. */
export function nonFiniteSampleError(frame: number, ch: number, byte: number, value: number): CaptureParseError {
  return new CaptureParseError(
    "non-finite",
    `Sample ${frame + 1} of channel ${ch + 1} (byte ${byte}) is ${value} rather than a finite number. The recording is damaged at that point.`,
    { byte },
  );
}
