// Piscina task: the CPU-bound part of one analysis (parse the file, run the engine), in a worker thread so
// several captures are analysed at once and the job loop stays responsive.
import { parseCapture, CaptureParseError } from "../src/engine/parse/index.ts";
import { analyzeCapture, ENGINE_VERSION } from "../src/engine/analyze.ts";
import type { AnalysisResult, Nameplate } from "../src/engine/types.ts";
import type { AnalysisMotorModel } from "../src/engine/motor-model/index.ts";
import { summariseCapture, toPlainJson, type AnalysisTaskOutput, type EncodedSpectrum } from "../server/captures/engine-io.ts";
import { computeFullSpectrum, encodeSpectrum } from "../server/captures/spectrum-store.ts";

export interface AnalysisTaskInput {
  bytes: Uint8Array;
  fileName: string;
  sampleRate?: number;
  nameplate: Nameplate;
  /** The motor's model (measured circuit or nameplate to estimate from): the result then carries `model`. */
  motorModel?: AnalysisMotorModel | null;
}

/** With BARHOUND_TIMING=1 the output carries `timing` (ms per step), for bench/pipeline.ts via workers/worker.ts. */
const TIMING = process.env.BARHOUND_TIMING === "1";

/** Parse errors come back as a value: an Error's class does not survive the trip between threads. */
export default function analysisTask(input: AnalysisTaskInput): AnalysisTaskOutput {
  const t0 = performance.now();
  let capture;
  try {
    capture = parseCapture(input.bytes, { fileName: input.fileName, sampleRate: input.sampleRate });
  } catch (err) {
    if (err instanceof CaptureParseError) return { parseError: { code: err.code, message: err.message } };
    throw err;
  }
  const t1 = performance.now();
  const result = analyzeCapture(capture, input.nameplate, input.motorModel ? { motorModel: input.motorModel } : {});
  const t2 = performance.now();
  // The viewer's full-range spectrum of each channel, stored next to the capture by the job (server/captures/analysis-job.ts).
  // A channel whose spectrum cannot be computed is left out: the viewer computes it on demand.
  const spectra: EncodedSpectrum[] = [];
  for (const ch of capture.channels) {
    try {
      spectra.push({ channel: ch.name, bytes: encodeSpectrum(computeFullSpectrum(ch, capture.sampleRate), ch.kind) });
    } catch {
      /* left to the viewer */
    }
  }
  const out: AnalysisTaskOutput = { engineVersion: ENGINE_VERSION, meta: summariseCapture(capture), result: toPlainJson(result) as AnalysisResult, spectra };
  if (TIMING) Object.assign(out, { timing: { parseMs: t1 - t0, analyzeMs: t2 - t1, spectraMs: performance.now() - t2 } });
  return out;
}
