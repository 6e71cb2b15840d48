// A WAV capture checked as it streams in: the chunk list through wav-chunks.ts (as the full parser, wav.ts), the
// declared data length against the bytes that arrive, and for float samples every sample for NaN/Infinity while
// the data passes (FloatCheck keeps one partial frame). Nothing of the audio data is kept.
//
// Float samples can only be checked in passing when the "fmt " chunk comes before the data (as every common writer
// puts it). When it comes after, finish() returns null and the same bytes are pushed again from the first: the
// second reading checks the data with the format now known.

import type { ChannelKind } from "../types.ts";
import { checkMinSamples } from "./errors.ts";
import { WavChunkReader, channelInfo, nonFiniteSampleError, type WavChannelOption, type WavFormat, type WavLayout } from "./wav-chunks.ts";

export interface WavStreamOptions {
  channels?: WavChannelOption[];
  minSamples: number;
}

export interface WavStreamSummary {
  sampleRate: number;
  samples: number;
  channels: { name: string; kind: ChannelKind; unit: string; position?: string }[];
}

export class WavStreamReader {
  private reader: WavChunkReader | null = new WavChunkReader();
  /** The float check of the current data chunk, and the number of "fmt " chunks read when that chunk began. */
  private check: FloatCheck | null = null;
  private checkFormatChunks = -1;
  /** Second reading: the first reading's layout and length, and the bytes passed so far. */
  private layout: WavLayout | null = null;
  private firstReadingBytes = -1;
  private offset = 0;

  constructor(private readonly opts: WavStreamOptions) {
    const reader = this.reader!;
    reader.onDataChunk = (dataStart) => {
      const format = reader.format;
      this.check = format?.float ? new FloatCheck(format, dataStart) : null;
      this.checkFormatChunks = reader.formatChunks;
    };
    reader.onData = (bytes, start, end) => this.check?.feed(bytes, start, end);
  }

  push(chunk: Uint8Array): void {
    if (this.reader) {
      this.reader.push(chunk);
      return;
    }
    // Second reading: only the audio data of the layout matters.
    const { dataStart, frames, format } = this.layout!;
    const from = Math.max(this.offset, dataStart);
    const until = Math.min(this.offset + chunk.length, dataStart + frames * format.blockAlign);
    if (from < until) this.check!.feed(chunk, from - this.offset, until - this.offset);
    this.offset += chunk.length;
  }

  /** The end of the file: the summary, or null when the file must be pushed once more (float data before "fmt "). */
  finish(): WavStreamSummary | null {
    let layout: WavLayout;
    if (this.reader) {
      const reader = this.reader;
      layout = reader.finish();
      checkMinSamples(layout.frames, this.opts.minSamples, layout.format.sampleRate);
      const checked = this.check !== null && this.checkFormatChunks === reader.formatChunks;
      if (layout.format.float && !checked) {
        this.reader = null;
        this.layout = layout;
        this.firstReadingBytes = reader.bytesRead;
        this.check = new FloatCheck(layout.format, layout.dataStart);
        return null;
      }
    } else {
      layout = this.layout!;
      if (this.offset !== this.firstReadingBytes) throw new Error(`The file changed between its two readings (${this.firstReadingBytes} bytes, then ${this.offset}).`);
    }
    const channels: WavStreamSummary["channels"] = [];
    for (let ch = 0; ch < layout.format.channels; ch++) {
      const info = channelInfo(ch, layout.description?.[ch], this.opts.channels?.[ch]);
      if (layout.format.float) this.check!.throwIfBad(ch);
      const channel: WavStreamSummary["channels"][number] = { name: info.name, kind: info.kind, unit: info.unit };
      if (info.position !== undefined) channel.position = info.position;
      channels.push(channel);
    }
    return { sampleRate: layout.format.sampleRate, samples: layout.frames, channels };
  }
}

/** Watches float frames for NaN and Infinity; remembers the first bad sample of each channel. */
class FloatCheck {
  private readonly carry: Uint8Array;
  private carryLength = 0;
  private frame = 0;
  private readonly firstBad: Float64Array;
  private readonly badValue: Float64Array;
  private unseen: number;
  private readonly sampleBytes: number;

  constructor(
    private readonly format: WavFormat,
    private readonly dataStart: number,
  ) {
    this.carry = new Uint8Array(format.blockAlign);
    this.firstBad = new Float64Array(format.channels).fill(-1);
    this.badValue = new Float64Array(format.channels);
    this.unseen = format.channels;
    this.sampleBytes = format.containerBits >> 3;
  }

  /** The next audio bytes, bytes[start, end). */
  feed(bytes: Uint8Array, start: number, end: number): void {
    const frameBytes = this.format.blockAlign;
    let p = start;
    if (this.carryLength > 0) {
      const take = Math.min(frameBytes - this.carryLength, end - p);
      this.carry.set(bytes.subarray(p, p + take), this.carryLength);
      this.carryLength += take;
      p += take;
      if (this.carryLength < frameBytes) return;
      this.frames(new DataView(this.carry.buffer), 0, 1);
      this.carryLength = 0;
    }
    const whole = Math.floor((end - p) / frameBytes);
    if (whole > 0) this.frames(new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength), p, whole);
    p += whole * frameBytes;
    if (p < end) {
      this.carry.set(bytes.subarray(p, end));
      this.carryLength = end - p;
    }
  }

  private frames(view: DataView, at: number, count: number): void {
    if (this.unseen === 0) {
      this.frame += count;
      return;
    }
    const { channels, blockAlign } = this.format;
    const wide = this.sampleBytes === 8;
    let p = at;
    for (let i = 0; i < count; i++, p += blockAlign) {
      for (let ch = 0; ch < channels; ch++) {
        const v = wide ? view.getFloat64(p + 8 * ch, true) : view.getFloat32(p + 4 * ch, true);
        if (v - v !== 0 && this.firstBad[ch] < 0) {
          this.firstBad[ch] = this.frame + i;
          this.badValue[ch] = v;
          this.unseen--;
        }
      }
    }
    this.frame += count;
  }

  throwIfBad(ch: number): void {
    const frame = this.firstBad[ch];
    if (frame < 0) return;
    throw nonFiniteSampleError(frame, ch, this.dataStart + frame * this.format.blockAlign + ch * this.sampleBytes, this.badValue[ch]);
  }
}
