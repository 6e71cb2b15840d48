// Turns a finished stream (interleaved little-endian frames) into a capture and a WAV file with a "bhch"
// channel-description chunk, so the stored file reads back through the same parser as an uploaded WAV.
//
// Integer formats are converted to float with each channel's scale (engineering units per count): the WAV is
// always 32-bit float, so the stored numbers are the engineering values and need no extra metadata to be right.
//
// A finished stream is assembled by writeStreamWav: the header (sizes known from the session's byte count), then the
// part file's frames block by block, so memory stays at two blocks whatever the stream's length. framesToWav does the
// same in memory, for small inputs (tests compare the two byte for byte).

import fs from "node:fs/promises";
import type { Capture, Channel } from "../../src/engine/types.ts";
import { writeWav } from "../../src/engine/parse/wav.ts";
import { BYTES_PER_SAMPLE, type SampleFormat, type StreamChannel } from "./protocol.ts";

/** Largest data chunk a WAV can describe (its sizes are 32-bit), less room for the header. */
export const MAX_WAV_DATA_BYTES = 0xffff_ffff - 1024 * 1024;
/** Bytes of the part file converted at a time (rounded down to whole frames). */
const BLOCK_BYTES = 1024 * 1024;

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

/**
 * The header writeWav writes for this layout (RIFF, fmt, "bhch" channel description, data chunk header), with the sizes
 * of `frameCount` frames filled in: writeWav of the same capture is exactly this header followed by the f32le frames.
 */
export function wavHeader(layout: StreamLayout, frameCount: number): Buffer {
  const empty = writeWav(framesToCapture(new Uint8Array(0), layout));
  const head = Buffer.from(empty.buffer, empty.byteOffset, empty.byteLength);
  // writeWav puts the data chunk last; with no frames the header ends with its 8-byte chunk header.
  if (head.toString("latin1", head.length - 8, head.length - 4) !== "data") throw new Error("unexpected WAV layout: the data chunk is not last");
  const dataBytes = frameCount * layout.channels.length * 4; // a multiple of 4, so no pad byte
  if (dataBytes > MAX_WAV_DATA_BYTES || head.length - 8 + dataBytes > 0xffff_ffff)
    throw new RangeError(`The stream is too large for a WAV file (4 GiB limit): ${frameCount} frames of ${layout.channels.length} channel(s).`);
  head.writeUInt32LE(head.length - 8 + dataBytes, 4);
  head.writeUInt32LE(dataBytes, head.length - 4);
  return head;
}

/**
 * Write the WAV of a stored stream: the first `byteLength` bytes of `partFile` (interleaved frames in the layout's
 * sample format) become `dest`, a 32-bit float WAV byte-identical to framesToWav of the same frames. Reads and writes
 * one block at a time: memory stays bounded whatever the stream's length. Returns the WAV's size in bytes.
 */
export async function writeStreamWav(partFile: string, byteLength: number, layout: StreamLayout, dest: string): Promise<number> {
  const nCh = layout.channels.length;
  const bps = BYTES_PER_SAMPLE[layout.sampleFormat];
  const fb = nCh * bps;
  if (byteLength % fb !== 0) throw new RangeError(`The stream holds ${byteLength} bytes, not a whole number of ${fb}-byte frames.`);
  const header = wavHeader(layout, byteLength / fb);
  const blockFrames = Math.max(1, Math.floor(BLOCK_BYTES / fb));
  const input = Buffer.allocUnsafeSlow(blockFrames * fb);
  // f32le frames are the WAV's data as they are; integer counts are scaled into a second buffer.
  const output = layout.sampleFormat === "f32le" ? input : Buffer.allocUnsafeSlow(blockFrames * nCh * 4);
  const scales = layout.channels.map((c) => c.scale ?? 1);
  const src = await fs.open(partFile, "r");
  try {
    const out = await fs.open(dest, "w");
    try {
      let written = await writeAll(out, header, 0);
      for (let done = 0; done < byteLength; ) {
        const want = Math.min(input.length, byteLength - done);
        for (let got = 0; got < want; ) {
          const { bytesRead } = await src.read(input, got, want - got, done + got);
          if (bytesRead === 0) throw new Error(`The stored stream ${partFile} is shorter than recorded (${done + got} of ${byteLength} bytes).`);
          got += bytesRead;
        }
        const samples = want / bps;
        if (layout.sampleFormat === "i16le") for (let i = 0; i < samples; i++) output.writeFloatLE(input.readInt16LE(i * 2) * scales[i % nCh], i * 4);
        else if (layout.sampleFormat === "i32le") for (let i = 0; i < samples; i++) output.writeFloatLE(input.readInt32LE(i * 4) * scales[i % nCh], i * 4);
        written += await writeAll(out, output.subarray(0, samples * 4), written);
        done += want;
      }
      return written;
    } finally {
      await out.close();
    }
  } finally {
    await src.close();
  }
}

async function writeAll(fh: fs.FileHandle, data: Uint8Array, position: number): Promise<number> {
  for (let done = 0; done < data.length; ) done += (await fh.write(data, done, data.length - done, position + done)).bytesWritten;
  return data.length;
}
