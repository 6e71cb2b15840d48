// Shared types of the analysis engine. The engine is pure TypeScript: no server, database or DOM imports,
// so the worker, the command line, the tests and the browser all use the same code.
import type { AnalysisMotorModel, ModelReading } from "./motor-model/operating-point.ts";

export type ChannelKind = "current" | "vibration" | "voltage" | "other";

export interface Channel {
  /** Column or channel name as it came in, e.g. "Ia", "accel_x". */
  name: string;
  kind: ChannelKind;
  /** Current phase ("A" | "B" | "C") or vibration axis ("H" | "V" | "A" / "x" | "y" | "z"), when known. */
  position?: string;
  /** Engineering unit of the samples: "A" for current, "m/s2" or "g" for acceleration, "mm/s" for velocity, "V". */
  unit: string;
  data: Float32Array | Float64Array;
}

export interface Capture {
  sampleRate: number;
  channels: Channel[];
  /** Format the capture was read from ("csv" | "wav" | "stream"). */
  format?: string;
}

export interface Nameplate {
  poles: number;
  /** Full-load (rated) speed in rpm, from the nameplate. */
  ratedRpm: number;
  /** Rated supply frequency (50 or 60). When absent it is inferred from ratedRpm and poles. */
  ratedHz?: number;
  ratedKw?: number;
  ratedVoltage?: number;
  ratedCurrent?: number;
  rotorBars?: number;
  statorSlots?: number;
  /** ISO 20816-3 machine group (1 = large, 2 = medium) and support flexibility. */
  machineGroup?: 1 | 2;
  support?: "rigid" | "flexible";
  /** True when the motor is fed by a variable-frequency drive. */
  driveFed?: boolean;
  /** Rolling bearings with known geometry (drive end, non-drive end), for the defect frequencies (bearings.ts). */
  bearings?: BearingGeometry[];
}

export type BearingPosition = "DE" | "NDE";

/** A rolling bearing's geometry: inner race turning with the shaft, outer race fixed in the housing. */
export interface BearingGeometry {
  position: BearingPosition;
  /** Free text, e.g. "6316 C3" (shown, not used in the computation). */
  designation?: string;
  /** Nb: number of rolling elements. */
  rollingElements: number;
  /** d: rolling-element diameter, mm. */
  elementDiameterMm: number;
  /** D: pitch diameter (centre circle of the elements), mm. */
  pitchDiameterMm: number;
  /** φ: contact angle in degrees (0 for a deep-groove ball bearing under radial load). Default 0. */
  contactAngleDeg?: number;
}

/** Cage (fundamental train), outer-race pass, inner-race pass and rolling-element spin frequencies. */
export type BearingDefect = "FTF" | "BPFO" | "BPFI" | "BSF";

/** One searched line: a harmonic of a defect frequency of one bearing, on the vibration spectrum. */
export interface BearingLine {
  /** Multiple of the defect frequency (1, 2, 3). */
  harmonic: number;
  /** Marker label, e.g. "BPFO DE", "2×BSF NDE". */
  label: string;
  /** harmonic × defect frequency at the measured shaft speed, Hz. */
  expectedHz: number;
  /** Band searched, Hz (below the expected frequency more than above: real lines sit 1–2 % low). */
  searchHz: [number, number];
  /** "above band": the line lies above what the capture's sample rate holds; it was not searched. */
  status: "found" | "not found" | "above band";
  foundHz: number | null;
  /** r.m.s. level of the found peak in the channel's unit (`unit`). */
  level: number | null;
  unit: string | null;
  /** The same peak as velocity, mm/s r.m.s. */
  velocityMmS: number | null;
  /** How far the peak stands above the median of its neighbourhood, dB. */
  dbOverFloor: number | null;
  /** Vibration channel the peak was found on (the one where it stands out most). */
  channel: string | null;
  /** Why a peak in the band was not counted, e.g. it is taken as another bearing line. */
  note?: string;
}

export interface BearingDefectResult {
  defect: BearingDefect;
  /** The defect frequency as a multiple of the shaft frequency (geometry only). */
  orderOfShaft: number;
  /** At the measured shaft speed, Hz; null when the speed is unknown. */
  expectedHz: number | null;
  lines: BearingLine[];
  /** True when any of its lines was found. */
  found: boolean;
}

export interface BearingResult {
  position: BearingPosition;
  designation: string | null;
  defects: BearingDefectResult[];
}

/** Bearing defect frequencies on the vibration spectrum: an indication for the analyst, not a grade. */
export interface BearingsResult {
  /** Measured shaft frequency used (fused speed / 60), Hz; null when the speed was not found. */
  shaftHz: number | null;
  rpm: number | null;
  /** Search band relative to the expected frequency: from −lowPct % to +highPct %. */
  tolerance: { lowPct: number; highPct: number };
  /** Vibration channels searched. */
  channels: string[];
  bearings: BearingResult[];
  /** Why nothing was searched (no vibration channel, speed not found), else null. */
  note: string | null;
}

export interface AnalysisOptions {
  /** Measured line voltage during the capture, for the slip method's voltage correction. */
  measuredVoltage?: number;
  /**
   * The motor's model (a measured circuit, or the nameplate to estimate one from): with it the result gains
   * `model`, the equivalent circuit's load, output, torque, efficiency and current at the measured slip
   * (motor-model/operating-point.ts). Nothing else in the result changes.
   */
  motorModel?: AnalysisMotorModel;
}

export type Severity = "info" | "warning" | "error";

export interface QualityVerdict {
  /** Stable machine code, e.g. "too-short", "clipping", "dc-offset", "light-load", "unstable-supply", "low-sample-rate". */
  code: string;
  severity: Severity;
  message: string;
  channel?: string;
}

export interface SlipEstimate {
  /** "eccentricity" | "slot-harmonic" | "vibration-1x" | "pole-pass" | "broken-bar-pair" | "nameplate" */
  method: string;
  slip: number;
  rpm: number;
  /** 0..1 */
  confidence: number;
  detail?: string;
}

export type RotorGrade = "R1" | "R2" | "R3" | "R4" | "R5";

export const ROTOR_GRADE_NAMES: Record<RotorGrade, string> = {
  R1: "Sound",
  R2: "Watch",
  R3: "Developing",
  R4: "Serious",
  R5: "Severe",
};

export interface BrokenBarResult {
  lowerHz: number | null;
  lowerDb: number | null; // dB below the supply component (positive number)
  upperHz: number | null;
  upperDb: number | null;
  /** Depth used for grading (dB below supply). */
  depthDb: number | null;
  grade: RotorGrade | null;
  gradeName: string; // ROTOR_GRADE_NAMES[grade] or "Not assessable"
  estimatedBrokenBars: number | null;
  assessable: boolean;
  reason: string | null;
  loadOscillationSuspected: boolean;
  confidence: number;
  caveats: string[];
}

export interface VibrationResult {
  channel: string;
  velocityRmsMmS: number;
  bandHz: [number, number];
  zone: "A" | "B" | "C" | "D";
  machineGroup: 1 | 2;
  support: "rigid" | "flexible";
  oneXHz: number | null;
  oneXMmS: number | null;
  twoLineHz: number | null;
  twoLineMmS: number | null;
  polePassHz: number | null;
}

export interface Marker {
  /** Label drawn on the plot, e.g. "f", "f − 2sf", "f + fr", "RSH", "1×", "2×LF". */
  name: string;
  /** Marker family for the viewer's keys: "supply" | "broken-bar" | "eccentricity" | "slot" | "harmonic" | "vibration" | "bearing". */
  family: string;
  hz: number;
  /** Level in dB relative to the supply component (current) or mm/s (vibration). */
  level: number;
  channel: string;
}

export interface AnalysisResult {
  engineVersion: string;
  supplyHz: number | null;
  syncRpm: number | null;
  slip: number | null;
  rpm: number | null;
  slipEstimates: SlipEstimate[];
  loadPct: number | null;
  loadMethod: string | null;
  brokenBar: BrokenBarResult;
  vibration: VibrationResult | null;
  /** Bearing defect frequencies searched on the vibration spectrum; absent when the nameplate has no bearing geometry. */
  bearings?: BearingsResult;
  quality: QualityVerdict[];
  markers: Marker[];
  /** Model-based reading at the measured slip, when the analysis was given the motor's model (engine ≥ 1.2.0). */
  model?: ModelReading;
  /** Free-form extras (per-phase results, Park's vector, model-based load...). */
  [extra: string]: unknown;
}
