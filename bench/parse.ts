// Parser throughput: a ~50 MB numeric CSV (time + three phase currents) and WAV files of the same samples, read by
// the full parsers and by the streaming validator (1 MiB chunks, as the upload check reads them).
// Run directly with `npx tsx bench/parse.ts`; the benchmark suite imports benchParse().

import { pathToFileURL } from "node:url";
import type { Capture } from "../src/engine/types.ts";
import { createCaptureValidator, parseCsv, parseWav, writeCsv, writeWav } from "../src/engine/parse/index.ts";

export interface BenchFigure {
  name: string;
  /** Input size in MB (10^6 bytes). */
  mb: number;
  /** Best of three runs, after one warm-up run. */
  ms: number;
  mbPerS: number;
}

const TARGET_CSV_BYTES = 50e6;
const SAMPLE_RATE = 10000;

/** Three 50 Hz phase currents of ~17 A peak with a little noise, rounded to 4 decimals like a logger writes. */
function makeCurrents(frames: number): Capture {
  const phases = [0, (-2 * Math.PI) / 3, (2 * Math.PI) / 3];
  let seed = 12345;
  const noise = () => {
    seed = (seed * 1103515245 + 12345) >>> 0;
    return seed / 2 ** 32 - 0.5;
  };
  const names = ["Ia", "Ib", "Ic"];
  const channels = phases.map((phase, k) => {
    const data = new Float64Array(frames);
    for (let i = 0; i < frames; i++) {
      const t = i / SAMPLE_RATE;
      data[i] = Math.round((17.5 * Math.sin(2 * Math.PI * 50 * t + phase) + 0.05 * noise()) * 1e4) / 1e4;
    }
    return { name: names[k], kind: "current" as const, unit: "A", position: "ABC"[k], data };
  });
  return { sampleRate: SAMPLE_RATE, channels };
}

function bestOf(run: () => void): number {
  run(); // warm-up
  let best = Infinity;
  for (let i = 0; i < 3; i++) {
    const start = performance.now();
    run();
    best = Math.min(best, performance.now() - start);
  }
  return best;
}

function figure(name: string, bytes: Uint8Array, run: () => void): BenchFigure {
  const ms = bestOf(run);
  const mb = bytes.length / 1e6;
  return { name, mb: round(mb, 2), ms: round(ms, 1), mbPerS: round(mb / (ms / 1000), 0) };
}

function round(v: number, decimals: number): number {
  const k = 10 ** decimals;
  return Math.round(v * k) / k;
}

export async function benchParse(): Promise<BenchFigure[]> {
  // Each row is about 34 bytes ("0.0001000,12.3456,-3.2101,-9.1355\n").
  const probe = writeCsv(makeCurrents(1000), { digits: 6 });
  const frames = Math.round((TARGET_CSV_BYTES / probe.length) * 1000);
  const capture = makeCurrents(frames);
  const csv = new TextEncoder().encode(writeCsv(capture, { digits: 6 }));
  const wav16 = writeWav(capture, { bits: 16 });
  const wavFloat = writeWav(capture, { bits: 32, float: true });
  const minSamples = 1;
  const figures = [
    figure("csv (t + 3 currents)", csv, () => parseCsv(csv, { minSamples })),
    figure("wav 16-bit PCM (3 ch)", wav16, () => parseWav(wav16, { minSamples })),
    figure("wav 32-bit float (3 ch)", wavFloat, () => parseWav(wavFloat, { minSamples })),
    figure("validate csv, 1 MiB chunks", csv, () => validateInChunks(csv, minSamples)),
    figure("validate wav float, 1 MiB", wavFloat, () => validateInChunks(wavFloat, minSamples)),
  ];
  return figures;
}

/** The streaming validator over the file in 1 MiB chunks; throws when it would need a second reading. */
function validateInChunks(bytes: Uint8Array, minSamples: number): void {
  const validator = createCaptureValidator({ minSamples });
  for (let p = 0; p < bytes.length; p += CHUNK_BYTES) validator.push(bytes.subarray(p, p + CHUNK_BYTES));
  if (!validator.finish()) throw new Error("the benchmark file needed a second reading");
}

const CHUNK_BYTES = 1 << 20;

const runDirectly = process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href;
if (runDirectly) {
  const figures = await benchParse();
  console.table(figures);
}
