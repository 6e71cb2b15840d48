// Types of the motor model: the per-phase equivalent circuit of a three-phase induction motor
// (stator R1 + jX1, shunt Rc ∥ jXm, rotor R2/s + jX2, all referred to the stator) and what it predicts.

/** Circuit constants in ohms per phase, referred to the stator, at the supply frequency of the input. */
export interface CircuitParams {
  r1: number;
  x1: number;
  r2: number;
  x2: number;
  xm: number;
  /** Core-loss resistance in parallel with Xm. Absent or null: core loss is lumped into the rotational loss. */
  rc?: number | null;
  /**
   * Deep-bar (skin-effect) rotor: rotor resistance at standstill (rotor frequency = supply frequency), Ω.
   * With it, `r2` is the running value (rotor frequency → 0) and R2 varies with slip between the two
   * (see `rotorAtSlip` in circuit.ts). Absent or null: R2 is constant at `r2`, the classical single-cage circuit.
   */
  rotorLockedR2?: number | null;
  /** Deep-bar rotor: rotor leakage reactance at standstill, Ω. With it, `x2` is the running value. Absent or null: X2 constant. */
  rotorLockedX2?: number | null;
}

export type Connection = "star" | "delta";

export interface MotorModelInput {
  /** Line-to-line supply voltage, V r.m.s. */
  lineVoltage: number;
  frequencyHz: number;
  poles: number;
  /** How the phase impedances are connected; it sets the phase voltage and the line/phase current ratio. */
  connection: Connection;
  params: CircuitParams;
  /** Friction, windage (and, when rc is absent, core) loss in W, held constant at every speed. Default 0. */
  rotationalLossW?: number;
}

/** Where a circuit value came from, shown beside it on screen. */
export type ParamSource = "nameplate-estimate" | "no-load/locked-rotor test" | "entered";

export type ParamName = keyof CircuitParams | "rotationalLossW";
export type ParamSources = Partial<Record<ParamName, ParamSource>>;

/** NEMA design letter, or a wound rotor; sets the X1 : X2 split. */
export type DesignLetter = "A" | "B" | "C" | "D" | "wound";

export interface OperatingPoint {
  slip: number;
  rpm: number;
  /** Line current, A r.m.s. */
  statorCurrentA: number;
  /** Current in one phase winding (equals the line current in star), A r.m.s. */
  phaseCurrentA: number;
  /** cos φ of the input impedance; lagging for a motor. */
  powerFactor: number;
  inputPowerW: number;
  statorCopperLossW: number;
  /** Loss in Rc; 0 when rc is absent (then it is inside rotationalLossW). */
  coreLossW: number;
  airGapPowerW: number;
  rotorCopperLossW: number;
  convertedPowerW: number;
  outputPowerW: number;
  /** Electromagnetic torque P_ag / ω_s, N·m. */
  inducedTorqueNm: number;
  /** Shaft torque P_out / ω_m, N·m; null at standstill where ω_m = 0. */
  loadTorqueNm: number | null;
  /** P_out / P_in, 0 when the motor delivers no shaft power. */
  efficiency: number;
}

/** A condition worth showing beside a reading. Same severity words as the engine's quality verdicts. */
export interface ModelFlag {
  code: "beyond-breakdown" | "current-mismatch" | "slip-out-of-range";
  severity: "info" | "warning" | "error";
  message: string;
}

/** Thrown for inputs that are well-formed but physically impossible (the route answers 422). */
export class MotorModelError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "MotorModelError";
  }
}

/** GET /api/assets/:id/motor-model: an analysed capture on the model, measured current beside the model's,
 *  model-based load beside the slip method's (server/captures/motor-model.ts builds it, the motor page draws it). */
export interface ModelOperatingPoint {
  takenAt: string;
  captureId: number;
  analysisId: number;
  slip: number;
  /** Speed at this slip on the curves' frequency (the model's), for placing the point. */
  rpm: number;
  /** Measured supply frequency, Hz. */
  supplyHz: number | null;
  torqueNm: number | null;
  /** Measured line current (A, CT ratio and channel unit applied); null when the capture has no current channel. */
  currentA: number | null;
  /** The model's line current at this slip, A. */
  modelCurrentA: number | null;
  currentRatio: number | null;
  loadPct: number | null;
  slipMethodLoadPct: number | null;
  flags: ModelFlag[];
}
