// Turns a finished stream (interleaved little-endian frames) into a capture and a WAV file with a "bhch"
// channel-description chunk, so the stored file reads back through the same parser as an uploaded WAV.
//
// Integer formats are converted to float with each channel's scale (engineering units per count): the WAV is
// always 32-bit float, so the stored numbers are the engineering values and need no extra metadata to be right.

import type { Capture, Channel } from "../../src/engine/types.ts";
import { writeWav } from "../../src/engine/parse/wav.ts";
import { BYTES_PER_SAMPLE, type SampleFormat, type StreamChannel } from "./protocol.ts";

export interface StreamLayout {
  sampleRate: number;
  channels: StreamChannel[];
  sampleFormat: SampleFormat;
}

/** De-interleave frames into one Float32Array per channel (scaled for integer formats). */
export function framesToCapture(frames: Uint8Array, layout: StreamLayout): Capture {
  const nCh = layout.channels.length;
  const bps = BYTES_PER_SAMPLE[layout.sampleFormat];
  const frameBytes = nCh * bps;
  if (frames.length % frameBytes !== 0) throw new RangeError(`The stream holds ${frames.length} bytes, not a whole number of ${frameBytes}-byte frames.`);
  const n = frames.length / frameBytes;
  const view = new DataView(frames.buffer, frames.byteOffset, frames.byteLength);
  const channels: Channel[] = layout.channels.map((c, ch) => {
    const data = new Float32Array(n);
    const scale = layout.sampleFormat === "f32le" ? 1 : (c.scale ?? 1);
    for (let i = 0, p = ch * bps; i < n; i++, p += frameBytes) {
      if (layout.sampleFormat === "f32le") data[i] = view.getFloat32(p, true);
      else if (layout.sampleFormat === "i16le") data[i] = view.getInt16(p, true) * scale;
      else data[i] = view.getInt32(p, true) * scale;
    }
    const out: Channel = { name: c.name, kind: c.kind, unit: c.unit, data };
    if (c.position) out.position = c.position;
    return out;
  });
  return { sampleRate: layout.sampleRate, channels, format: "stream" };
}

/** Interleave a capture's channels as f32le frames (what the command-line gateway sends). */
export function captureToF32Frames(capture: Capture): Buffer {
  const nCh = capture.channels.length;
  const n = capture.channels[0]?.data.length ?? 0;
  const buf = Buffer.alloc(n * nCh * 4);
  for (let i = 0, p = 0; i < n; i++) for (let ch = 0; ch < nCh; ch++, p += 4) buf.writeFloatLE(capture.channels[ch].data[i], p);
  return buf;
}

export function framesToWav(frames: Uint8Array, layout: StreamLayout): Buffer {
  const wav = writeWav(framesToCapture(frames, layout));
  return Buffer.from(wav.buffer, wav.byteOffset, wav.byteLength);
}
