// One analysed capture read through the motor model: the equivalent circuit at the measured slip (and at the
// measured supply frequency) gives shaft output, load, torque, efficiency and power factor, and the line current
// the motor should draw there; beside it the measured current (real amperes: channel unit and CT ratio applied)
// and checkOperatingPoint's flags (slip beyond breakdown, current far from the model's).
// Pure: the analysis (analyze.ts, through `AnalysisOptions.motorModel`), the API and the browser share it.

import { evaluateAtSlip } from "./circuit.ts";
import { breakdownSlip } from "./curves.ts";
import { estimateFromNameplate, type NameplateForModel } from "./estimate.ts";
import { checkOperatingPoint, CURRENT_MISMATCH_LIMIT } from "./load.ts";
import { MotorModelError, type ModelFlag, type MotorModelInput } from "./types.ts";

/** Where the circuit of a motor came from: estimated from its nameplate, or measured values saved on the motor. */
export type ModelSource = "nameplate-estimate" | "measured";

export interface ModelForReading {
  input: MotorModelInput;
  source: ModelSource;
  /** Rated shaft output, W (nameplate kW × 1000). Without it there is no load %, the rest is given. */
  ratedOutputW?: number | null;
}

export interface MeasuredPoint {
  /** Measured slip (per unit). */
  slip: number | null;
  /** Measured supply (fundamental) frequency, Hz; absent or null: the model's own frequency. */
  supplyHz?: number | null;
  /** Measured line-to-line voltage, V; absent: the model's voltage (the rated one). */
  lineVoltage?: number | null;
  /** Mean measured line current, real amperes (see `measuredLineCurrentA`); absent or null: not measured. */
  currentA?: number | null;
  /** The slip method's load of the same analysis, %, to say how far apart the two are. */
  slipMethodLoadPct?: number | null;
}

export interface ModelReading {
  source: ModelSource;
  slip: number | null;
  /** Frequency and line voltage the circuit was evaluated at. */
  frequencyHz: number;
  lineVoltage: number;
  /** Shaft output as a share of rated output, %; null without rated kW or without a motoring slip. */
  loadPct: number | null;
  outputKw: number | null;
  inputKw: number | null;
  /** Shaft (load) torque, N·m. */
  torqueNm: number | null;
  /** Per unit. */
  efficiency: number | null;
  powerFactor: number | null;
  /** Line current the model draws at this slip, A. */
  modelCurrentA: number | null;
  /** Mean measured line current, A; null when the capture has no usable current channel. */
  measuredCurrentA: number | null;
  /** measured / model. */
  currentRatio: number | null;
  /** The current-mismatch limit used for the flag, ± %. */
  currentTolerancePct: number;
  slipMethodLoadPct: number | null;
  /** Model-based load minus slip-method load, percentage points. */
  apartPct: number | null;
  flags: ModelFlag[];
  notes: string[];
}

/**
 * Supply-frequency difference above which the circuit is moved to the measured frequency, Hz: the same 1 Hz the slip
 * method uses to tell a drive-fed motor (load.ts).
 */
export const FREQUENCY_SHIFT_HZ = 1;

const given = (v: number | null | undefined): v is number => v !== undefined && v !== null && Number.isFinite(v);
const round = (v: number, digits: number) => Math.round(v * 10 ** digits) / 10 ** digits;

/**
 * The circuit at another supply frequency, for a motor on a variable-frequency drive: reactances scale with f
 * (X = 2πfL), the drive holds V/f constant up to the model's (rated) frequency and the voltage at rated above it
 * (field weakening), common practice for a standard V/f drive. Rc scales with f too (core loss proportional to
 * frequency at constant flux: the hysteresis part; an approximation). Resistances and the rotational loss are kept
 * (friction and windage fall with speed in reality, so the output reads a little low at reduced speed).
 */
export function atSupplyFrequency(input: MotorModelInput, hz: number): { input: MotorModelInput; note: string | null } {
  if (!(hz > 0) || Math.abs(hz - input.frequencyHz) <= FREQUENCY_SHIFT_HZ) return { input, note: null };
  const k = hz / input.frequencyHz;
  const p = input.params;
  const scaled: MotorModelInput = {
    ...input,
    frequencyHz: hz,
    lineVoltage: input.lineVoltage * Math.min(1, k),
    params: {
      ...p,
      x1: p.x1 * k,
      x2: p.x2 * k,
      xm: p.xm * k,
      ...(given(p.rc) ? { rc: p.rc * k } : {}),
      ...(given(p.rotorLockedX2) ? { rotorLockedX2: p.rotorLockedX2 * k } : {}),
    },
  };
  return {
    input: scaled,
    note:
      `Supply at ${round(hz, 2)} Hz, not the model's ${input.frequencyHz} Hz: reactances scaled by f and the voltage taken as ` +
      `${round(scaled.lineVoltage, 0)} V (constant V/f up to ${input.frequencyHz} Hz, rated voltage above; a standard drive, common practice).`,
  };
}

/** Factor from a current channel's unit to amperes; null for a unit that is not a current. */
export function ampsPerUnit(unit: string | null | undefined): number | null {
  const u = (unit ?? "").trim().toLowerCase();
  if (u === "a" || u === "") return 1;
  if (u === "ma") return 1e-3;
  if (u === "ka") return 1e3;
  return null;
}

/**
 * Mean line current of the analysed phases in real amperes: each phase's r.m.s. (`phases[].rmsA` of the analysis,
 * computed on the samples in the channel's own unit) converted by its channel's unit (A, mA, kA), times the CT ratio
 * when the recording is of a CT secondary (the ratio of the measurement point the capture was taken on). Null when no
 * phase has a current unit.
 */
export function measuredLineCurrentA(
  phases: ReadonlyArray<{ channel: string; rmsA: number | null }>,
  channels: ReadonlyArray<{ name: string; kind?: string; unit?: string | null }>,
  ctRatio?: number | null,
): { currentA: number | null; notes: string[] } {
  const notes: string[] = [];
  const amps: number[] = [];
  for (const ph of phases) {
    if (!given(ph.rmsA)) continue;
    const ch = channels.find((c) => c.name === ph.channel);
    const k = ampsPerUnit(ch?.unit);
    if (k === null) {
      notes.push(`Channel ${ph.channel} is in ${ch?.unit}, not amperes: left out of the measured current.`);
      continue;
    }
    amps.push(ph.rmsA * k);
  }
  if (!amps.length) return { currentA: null, notes };
  let mean = amps.reduce((a, b) => a + b, 0) / amps.length;
  if (given(ctRatio) && ctRatio > 0 && ctRatio !== 1) {
    mean *= ctRatio;
    notes.push(`Measured current × CT ratio ${ctRatio} : 1 of the measurement point (the recording is of the CT secondary).`);
  }
  notes.push(`Measured current: true r.m.s. mean of ${amps.length} phase${amps.length === 1 ? "" : "s"} (harmonics included; the model gives the fundamental).`);
  return { currentA: mean, notes };
}

/**
 * The model's reading of one operating point. Never throws for a bad slip: it says so in a flag.
 * `options.breakdownSlip`: the model's breakdown slip when the caller reads many points of one model; used while
 * the point is at the model's frequency (the supply voltage does not move it: torque scales with V² at every slip).
 */
export function modelReading(model: ModelForReading, at: MeasuredPoint, options: { breakdownSlip?: number } = {}): ModelReading {
  const notes: string[] = [];
  let input = model.input;
  let shifted = false;
  if (given(at.supplyHz)) {
    const moved = atSupplyFrequency(input, at.supplyHz);
    input = moved.input;
    shifted = moved.input !== model.input;
    if (moved.note) notes.push(moved.note);
  }
  if (given(at.lineVoltage) && at.lineVoltage > 0) input = { ...input, lineVoltage: at.lineVoltage };
  else notes.push(`Supply voltage not measured: the model runs at ${round(input.lineVoltage, 0)} V.`);

  const measuredCurrentA = given(at.currentA) && at.currentA > 0 ? at.currentA : null;
  const slipMethodLoadPct = given(at.slipMethodLoadPct) ? at.slipMethodLoadPct : null;
  const out: ModelReading = {
    source: model.source,
    slip: given(at.slip) ? at.slip : null,
    frequencyHz: round(input.frequencyHz, 4),
    lineVoltage: round(input.lineVoltage, 2),
    loadPct: null,
    outputKw: null,
    inputKw: null,
    torqueNm: null,
    efficiency: null,
    powerFactor: null,
    modelCurrentA: null,
    measuredCurrentA: measuredCurrentA === null ? null : round(measuredCurrentA, 3),
    currentRatio: null,
    currentTolerancePct: 100 * CURRENT_MISMATCH_LIMIT,
    slipMethodLoadPct,
    apartPct: null,
    flags: [],
    notes,
  };
  if (out.slip === null) {
    notes.push("No slip was measured: the model cannot place this capture.");
    return out;
  }
  const slip = out.slip;
  const sBreak = slip > 0 && slip < 1 ? (!shifted && options.breakdownSlip !== undefined ? options.breakdownSlip : breakdownSlip(input)) : undefined;
  out.flags = checkOperatingPoint(input, slip, measuredCurrentA, { breakdownSlip: sBreak, source: model.source });
  if (!(slip > 0 && slip < 1)) return out;

  const p = evaluateAtSlip(input, slip);
  const rated = given(model.ratedOutputW) && model.ratedOutputW > 0 ? model.ratedOutputW : null;
  out.outputKw = round(p.outputPowerW / 1000, 4);
  out.inputKw = round(p.inputPowerW / 1000, 4);
  out.loadPct = rated === null ? null : round((100 * p.outputPowerW) / rated, 2);
  out.torqueNm = p.loadTorqueNm === null ? null : round(p.loadTorqueNm, 3);
  out.efficiency = round(p.efficiency, 4);
  out.powerFactor = round(p.powerFactor, 4);
  out.modelCurrentA = round(p.statorCurrentA, 3);
  out.currentRatio = measuredCurrentA === null ? null : round(measuredCurrentA / p.statorCurrentA, 4);
  out.apartPct = out.loadPct === null || slipMethodLoadPct === null ? null : round(out.loadPct - slipMethodLoadPct, 2);
  if (rated === null) notes.push("Rated kW missing from the nameplate: output, torque and efficiency are given, load % is not.");
  return out;
}

/** What the analysis is given to build the motor's model: a measured circuit, or the nameplate to estimate it from. */
export type AnalysisMotorModel = {
  ratedOutputW?: number | null;
  /** CT ratio (primary : secondary) of the measurement point, when the recording is of a CT secondary. */
  ctRatio?: number | null;
} & ({ source: "measured"; input: MotorModelInput } | { source: "nameplate-estimate"; nameplate: NameplateForModel });

// The estimate depends only on the nameplate and takes tens of milliseconds: keep the last few.
const estimates = new Map<string, MotorModelInput>();

/** The circuit of an `AnalysisMotorModel`; throws MotorModelError when the nameplate cannot be estimated. */
export function resolveMotorModel(spec: AnalysisMotorModel): ModelForReading {
  if (spec.source === "measured") return { source: "measured", input: spec.input, ratedOutputW: spec.ratedOutputW };
  const key = JSON.stringify(spec.nameplate);
  let input = estimates.get(key);
  if (!input) {
    input = estimateFromNameplate(spec.nameplate).input;
    if (estimates.size >= 32) estimates.delete(estimates.keys().next().value!);
    estimates.set(key, input);
  }
  return { source: "nameplate-estimate", input, ratedOutputW: spec.ratedOutputW };
}

/**
 * The model reading of an analysis: slip, supply and slip-method load from the analysis, the measured current from
 * its phases (`measuredLineCurrentA`). Null when the model cannot be built (the nameplate estimate fails).
 */
export function analysisModelReading(
  spec: AnalysisMotorModel,
  analysis: {
    slip: number | null;
    supplyHz: number | null;
    phases: ReadonlyArray<{ channel: string; rmsA: number | null }>;
    loadEstimates?: ReadonlyArray<{ method: string; loadPct: number }>;
  },
  channels: ReadonlyArray<{ name: string; kind?: string; unit?: string | null }>,
  measuredVoltage?: number | null,
): ModelReading | null {
  let model: ModelForReading;
  try {
    model = resolveMotorModel(spec);
  } catch (err) {
    if (err instanceof MotorModelError) return null;
    throw err;
  }
  const current = measuredLineCurrentA(analysis.phases, channels, spec.ctRatio);
  const reading = modelReading(model, {
    slip: analysis.slip,
    supplyHz: analysis.supplyHz,
    lineVoltage: measuredVoltage,
    currentA: current.currentA,
    slipMethodLoadPct: analysis.loadEstimates?.find((e) => e.method === "slip")?.loadPct ?? null,
  });
  reading.notes.push(...current.notes);
  return reading;
}
