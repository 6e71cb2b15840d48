// Shared types of the analysis engine. The engine is pure TypeScript: no server, database or DOM imports,
// so the worker, the command line, the tests and the browser all use the same code.

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
}

export interface AnalysisOptions {
  /** Measured line voltage during the capture, for the slip method's voltage correction. */
  measuredVoltage?: number;
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
  /** Marker family for the viewer's keys: "supply" | "broken-bar" | "eccentricity" | "slot" | "harmonic" | "vibration". */
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
  quality: QualityVerdict[];
  markers: Marker[];
  /** Free-form extras (per-phase results, Park's vector, model-based load...). */
  [extra: string]: unknown;
}
