// The CPU part of seeding one demo capture: synthesise it from its recipe, write it as the 16-bit WAV a
// technician would upload, and analyse those bytes exactly as the analysis worker does (workers/analysis-task.ts:
// parse, run the engine with the motor's nameplate). Runs in a piscina thread during the seed, or in-process.
import { synthCapture } from "../../src/engine/synth.ts";
import { writeWav } from "../../src/engine/parse/index.ts";
import { analyzeCapture, ENGINE_VERSION } from "../../src/engine/analyze.ts";
import type { AnalysisResult, Capture, Nameplate } from "../../src/engine/types.ts";
import type { AnalysisMotorModel } from "../../src/engine/motor-model/index.ts";
import analysisTask from "../../workers/analysis-task.ts";
import { summariseCapture, toPlainJson, type AnalysisTaskOutput } from "../captures/engine-io.ts";
import type { CaptureSpec } from "./story.ts";

export interface HistoryTaskInput {
  spec: Pick<CaptureSpec, "synth" | "extraVibration" | "fileName" | "keepBlob">;
  nameplate: Nameplate;
  /** The motor's model, as the worker gives it (server/captures/motor-model.ts `analysisMotorModelOf`). */
  motorModel?: AnalysisMotorModel | null;
}

export interface HistoryTaskOutput {
  output: AnalysisTaskOutput;
  /** The WAV bytes, only when the recording is kept. */
  wav: Uint8Array | null;
  byteSize: number;
}

/** The capture of a recipe: the current phases (+ H accelerometer) and, on watched motors, the V accelerometer. */
export function synthesise(spec: HistoryTaskInput["spec"]): Capture {
  const main = synthCapture(spec.synth).capture;
  if (spec.extraVibration) {
    const v = synthCapture(spec.extraVibration).capture.channels.filter((c) => c.kind === "vibration");
    main.channels.push(...v);
  }
  return main;
}

/** Size of the 16-bit WAV the capture would have been uploaded as (header and channel chunk approximated). */
function wavBytes(capture: Capture): number {
  const frames = capture.channels[0]?.data.length ?? 0;
  return 12 + 48 + 8 + 80 * capture.channels.length + 8 + frames * capture.channels.length * 2;
}

export default function historyTask(input: HistoryTaskInput): HistoryTaskOutput {
  const capture = synthesise(input.spec);
  if (input.spec.keepBlob) {
    // Kept: the stored bytes are what gets analysed, so a re-analysis of the blob gives the same result.
    const wav = writeWav(capture, { bits: 16 });
    const output = analysisTask({ bytes: wav, fileName: input.spec.fileName, nameplate: input.nameplate, motorModel: input.motorModel });
    return { output, wav, byteSize: wav.byteLength };
  }
  // Not kept: the same engine call on the samples themselves (16-bit quantisation changes nothing measurable).
  const result = analyzeCapture(capture, input.nameplate, input.motorModel ? { motorModel: input.motorModel } : {});
  const output: AnalysisTaskOutput = { engineVersion: ENGINE_VERSION, meta: summariseCapture(capture), result: toPlainJson(result) as AnalysisResult };
  return { output, wav: null, byteSize: wavBytes(capture) };
}
