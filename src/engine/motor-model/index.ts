// Motor model: the per-phase equivalent circuit of a three-phase induction motor and what it predicts.
// Pure TypeScript (no server, database or file-system imports) so the worker, the API and the browser share it.

export type {
  CircuitParams,
  Connection,
  DesignLetter,
  ModelFlag,
  MotorModelInput,
  OperatingPoint,
  ParamName,
  ParamSource,
  ParamSources,
} from "./types.ts";
export { MotorModelError } from "./types.ts";
export {
  evaluateAtSlip,
  phaseVoltage,
  rotorAtSlip,
  hasDeepBarRotor,
  deepBarWeights,
  skinEffectFactors,
  DEEP_BAR_XI_AT_STANDSTILL,
} from "./circuit.ts";
export { thevenin, theveninTorque, type TheveninForm, type TheveninResult } from "./thevenin.ts";
export { curves, keyPoints, breakdownSlip, type CurveOptions, type KeyPoints, type MotorCurves, type TorquePoint } from "./curves.ts";
export { estimateFromNameplate, type NameplateEstimate, type NameplateForModel } from "./estimate.ts";
export { fromTests, type FromTestsResult, type TestData, type TestReading, type TestValueSource } from "./from-tests.ts";
export { loadFromSlip, checkOperatingPoint, CURRENT_MISMATCH_LIMIT, type CheckOptions, type ModelLoad } from "./load.ts";
export {
  modelReading,
  analysisModelReading,
  resolveMotorModel,
  measuredLineCurrentA,
  ampsPerUnit,
  atSupplyFrequency,
  FREQUENCY_SHIFT_HZ,
  type AnalysisMotorModel,
  type MeasuredPoint,
  type ModelForReading,
  type ModelReading,
  type ModelSource,
} from "./operating-point.ts";
export {
  STATOR_LEAKAGE_SHARE,
  BREAKDOWN_TORQUE_RATIO,
  typicalBreakdownTorqueRatio,
  LOCKED_ROTOR_CURRENT_RATIO,
  nemaMaxLockedRotorCurrentA,
  typicalLockedRotorCurrentRatio,
  typicalLockedRotorTorqueRatio,
} from "./design.ts";
