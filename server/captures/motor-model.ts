// A motor's equivalent circuit (measured values when saved on the motor, else estimated from the nameplate), where
// each value came from, its curves and key points, and its analysed operating points placed on the curves at their
// measured current, with the flags of the points that do not fit the model.
//
// The saved model (assets.motor_model, written by PUT /api/assets/:id/motor-model in server/routes/motor-model.ts)
// keeps the circuit per phase of its connection, the frequency its reactances refer to, and the values as entered;
// the voltage and poles it runs at are the nameplate's at the time of use.
import type { Knex } from "knex";
import { HttpError } from "../errors.ts";
import { inferRatedHz, rpmFromSlip } from "../../src/engine/formulas.ts";
import { assertValidInput } from "../../src/engine/motor-model/circuit.ts";
import {
  breakdownSlip,
  CURRENT_MISMATCH_LIMIT,
  curves,
  estimateFromNameplate,
  fromTests,
  keyPoints,
  measuredLineCurrentA,
  modelReading,
  MotorModelError,
  type AnalysisMotorModel,
  type CircuitParams,
  type Connection,
  type ModelFlag,
  type ModelSource,
  type MotorModelInput,
  type NameplateForModel,
  type ParamName,
} from "../../src/engine/motor-model/index.ts";
import type { AssetMotorModelBody } from "../../src/shared/schemas/motor-model.ts";
import type { ModelOperatingPoint } from "../../src/engine/motor-model/types.ts";

/** Where one circuit value came from, as the motor page names it. */
export type ValueSource = "nameplate estimate" | "no-load test" | "locked-rotor test" | "entered";

/** What assets.motor_model holds. */
export interface StoredMotorModel {
  version: 1;
  method: AssetMotorModelBody["method"];
  /** The request body as saved (the form starts from it). */
  entered: AssetMotorModelBody;
  params: CircuitParams;
  rotationalLossW: number;
  connection: Connection;
  /** Frequency the reactances refer to, Hz. */
  frequencyHz: number;
  /** Line voltage when the nameplate has none (the no-load test's), V. */
  lineVoltage: number;
  detail: Partial<Record<ParamName, { source: ValueSource; basis: string }>>;
  notes: string[];
  savedAt: string;
  savedBy: { id: number; name: string } | null;
}

export interface CircuitValue {
  name: ParamName;
  label: string;
  /** What the value is, in words. */
  meaning: string;
  value: number | null;
  unit: "Ω" | "W";
  source: ValueSource;
  /** The assumption, fit or test behind it, one sentence. */
  basis: string;
}

const VALUE_INFO: Record<ParamName, { label: string; meaning: string; unit: "Ω" | "W" }> = {
  r1: { label: "R1", meaning: "stator resistance", unit: "Ω" },
  x1: { label: "X1", meaning: "stator leakage reactance", unit: "Ω" },
  r2: { label: "R2", meaning: "rotor resistance, referred to the stator", unit: "Ω" },
  x2: { label: "X2", meaning: "rotor leakage reactance, referred to the stator", unit: "Ω" },
  xm: { label: "Xm", meaning: "magnetising reactance", unit: "Ω" },
  rc: { label: "Rc", meaning: "core-loss resistance", unit: "Ω" },
  rotorLockedR2: { label: "R2 at standstill", meaning: "rotor resistance of the deep bars when starting", unit: "Ω" },
  rotorLockedX2: { label: "X2 at standstill", meaning: "rotor leakage reactance when starting", unit: "Ω" },
  rotationalLossW: { label: "Rotational losses", meaning: "friction and windage (and core loss, when Rc is not given)", unit: "W" },
};
const VALUE_ORDER: ParamName[] = ["r1", "x1", "r2", "x2", "xm", "rc", "rotorLockedR2", "rotorLockedX2", "rotationalLossW"];

const num = (v: unknown) => (v === null || v === undefined ? undefined : Number(v));

/** The nameplate fields the estimate needs; null when rated kW, voltage or current is missing. */
export function nameplateForModel(asset: Record<string, any>): NameplateForModel | null {
  if (!asset.rated_kw || !asset.rated_voltage || !asset.rated_current) return null;
  return {
    poles: Number(asset.poles),
    ratedRpm: Number(asset.rated_rpm),
    ratedHz: num(asset.rated_hz),
    ratedKw: Number(asset.rated_kw),
    ratedVoltage: Number(asset.rated_voltage),
    ratedCurrent: Number(asset.rated_current),
    efficiency: num(asset.efficiency_pct),
    powerFactor: num(asset.power_factor),
    designLetter: asset.design_letter ?? undefined,
    connection: asset.connection ?? undefined,
  };
}

/** The saved measured model of an assets row, or null. */
export function storedModelOf(asset: Record<string, any>): StoredMotorModel | null {
  const m = asset.motor_model as StoredMotorModel | null | undefined;
  return m && typeof m === "object" && m.version === 1 && m.params ? m : null;
}

/** The circuit of a saved model at the motor's nameplate voltage and poles. */
export function measuredInputOf(asset: Record<string, any>, stored: StoredMotorModel): MotorModelInput {
  return {
    lineVoltage: num(asset.rated_voltage) ?? stored.lineVoltage,
    frequencyHz: stored.frequencyHz,
    poles: Number(asset.poles),
    connection: stored.connection,
    params: stored.params,
    rotationalLossW: stored.rotationalLossW,
  };
}

const ratedOutputW = (asset: Record<string, any>) => (asset.rated_kw ? Number(asset.rated_kw) * 1000 : null);

/** The CT ratio to apply to a capture's current channels: its measurement point's, when that is a current point. */
export function ctRatioOf(point: { kind?: string | null; ct_ratio?: number | null } | null | undefined): number | null {
  return point && point.kind === "current" && point.ct_ratio ? Number(point.ct_ratio) : null;
}

/**
 * What the analysis is given to build the motor's model (`AnalysisOptions.motorModel`): the saved measured circuit,
 * or the nameplate to estimate one from; null when neither is there (rated kW, voltage or current missing).
 */
export function analysisMotorModelOf(asset: Record<string, any>, ctRatio: number | null = null): AnalysisMotorModel | null {
  const stored = storedModelOf(asset);
  if (stored) return { source: "measured", input: measuredInputOf(asset, stored), ratedOutputW: ratedOutputW(asset), ctRatio };
  const np = nameplateForModel(asset);
  return np ? { source: "nameplate-estimate", nameplate: np, ratedOutputW: ratedOutputW(asset), ctRatio } : null;
}

/** A short description of the model an analysis ran with, for the analysis row's params. */
export function motorModelParams(asset: Record<string, any>, spec: AnalysisMotorModel | null) {
  if (!spec) return null;
  const stored = storedModelOf(asset);
  return spec.source === "measured" && stored ? { source: spec.source, method: stored.method, savedAt: stored.savedAt } : { source: spec.source };
}

/**
 * The model to save from a PUT body: circuit values as entered, or computed from the test readings (fromTests).
 * Throws MotorModelError for values no circuit can be built from, HttpError 422 when the nameplate lacks what is needed.
 */
export function buildStoredModel(asset: Record<string, any>, body: AssetMotorModelBody, by: { id: number; name: string } | null, now = new Date()): StoredMotorModel {
  const connection: Connection = body.connection ?? asset.connection ?? "star";
  const base = { version: 1 as const, method: body.method, entered: body, connection, savedAt: now.toISOString(), savedBy: by };
  let stored: StoredMotorModel;
  if (body.method === "circuit") {
    if (!asset.rated_voltage)
      throw new HttpError(422, "Add the rated voltage to the nameplate first: the circuit runs at it.", undefined, "nameplate-incomplete");
    const params: CircuitParams = { r1: body.r1, x1: body.x1, r2: body.r2, x2: body.x2, xm: body.xm, rc: body.rc ?? null };
    const entered = `Entered${by ? ` by ${by.name}` : ""} on ${now.toISOString().slice(0, 10)}.`;
    const detail: StoredMotorModel["detail"] = {};
    for (const k of ["r1", "x1", "r2", "x2", "xm", "rotationalLossW"] as const) detail[k] = { source: "entered", basis: entered };
    detail.rc = { source: "entered", basis: params.rc ? entered : "Not entered: the core loss is inside the rotational losses." };
    stored = {
      ...base,
      params,
      rotationalLossW: body.rotationalLossW,
      frequencyHz: inferRatedHz(Number(asset.rated_rpm), Number(asset.poles), num(asset.rated_hz)),
      lineVoltage: Number(asset.rated_voltage),
      detail,
      notes: [`Per-phase values of the ${connection} connection at the rated frequency, as entered.`],
    };
  } else {
    const r = fromTests(body);
    stored = {
      ...base,
      params: r.params,
      rotationalLossW: r.rotationalLossW,
      // fromTests takes the no-load test's frequency as rated; its reactances refer to it.
      frequencyHz: body.noLoad.f,
      lineVoltage: num(asset.rated_voltage) ?? body.noLoad.V,
      detail: { ...r.detail, rc: { source: "no-load test", basis: "The core loss is inside the rotational losses from the no-load test." } },
      notes: r.notes,
    };
  }
  // Refuse what no circuit can be built from, or what cannot be solved, before it is saved.
  const input = measuredInputOf(asset, stored);
  assertValidInput(input);
  keyPoints(input);
  return stored;
}

// An estimate depends only on the nameplate: keep the last few per motor and nameplate version.
const estimates = new Map<string, ReturnType<typeof estimateFromNameplate>>();
function cachedEstimate(asset: Record<string, any>, np: NameplateForModel) {
  const key = `${asset.id}:${asset.nameplate_version}:${JSON.stringify(np)}`;
  let est = estimates.get(key);
  if (!est) {
    est = estimateFromNameplate(np);
    if (estimates.size >= 200) estimates.delete(estimates.keys().next().value!);
    estimates.set(key, est);
  }
  return est;
}

function circuitTable(input: MotorModelInput, detail: Partial<Record<ParamName, { source: ValueSource; basis: string }>>): CircuitValue[] {
  const values: Partial<Record<ParamName, number | null>> = { ...input.params, rotationalLossW: input.rotationalLossW ?? 0 };
  return VALUE_ORDER.filter((k) => detail[k] !== undefined || (values[k] !== undefined && values[k] !== null)).map((k) => ({
    name: k,
    ...VALUE_INFO[k],
    value: values[k] ?? null,
    source: detail[k]?.source ?? "entered",
    basis: detail[k]?.basis ?? "",
  }));
}

export type OperatingPointOut = ModelOperatingPoint;

export async function motorModelOf(db: Knex, asset: Record<string, any>) {
  let input: MotorModelInput;
  let sources: Record<string, string>;
  let assumptions: string[] = [];
  let detail: Partial<Record<ParamName, { source: ValueSource; basis: string }>>;
  let origin: ModelSource;
  let measured: { method: string; entered: AssetMotorModelBody; notes: string[]; savedAt: string; savedBy: StoredMotorModel["savedBy"]; connection: Connection; frequencyHz: number } | null = null;
  try {
    const stored = storedModelOf(asset);
    if (stored) {
      origin = "measured";
      input = measuredInputOf(asset, stored);
      detail = stored.detail;
      sources = Object.fromEntries(Object.entries(stored.detail).map(([k, v]) => [k, v!.source]));
      measured = { method: stored.method, entered: stored.entered, notes: stored.notes, savedAt: stored.savedAt, savedBy: stored.savedBy, connection: stored.connection, frequencyHz: stored.frequencyHz };
    } else {
      const np = nameplateForModel(asset);
      if (!np)
        throw new HttpError(422, "The motor model needs rated kW, voltage and current on the nameplate; add them to the motor first.", undefined, "nameplate-incomplete");
      const est = cachedEstimate(asset, np);
      origin = "nameplate-estimate";
      input = est.input;
      sources = est.sources;
      assumptions = est.assumptions;
      detail = Object.fromEntries(Object.entries(est.basis).map(([k, basis]) => [k, { source: "nameplate estimate" as const, basis: basis! }]));
    }
    const model = { input, source: origin, ratedOutputW: ratedOutputW(asset) };
    const rows = await db("analyses as an")
      .join("captures as c", "c.id", "an.capture_id")
      .leftJoin("measurement_points as mp", "mp.id", "c.measurement_point_id")
      .where({ "an.asset_id": asset.id, "an.is_current": true })
      .whereNotNull("an.slip")
      .orderBy([{ column: "an.taken_at", order: "desc" }, { column: "an.id", order: "desc" }])
      .limit(500)
      .select(
        "an.id",
        "an.capture_id",
        "an.taken_at",
        "an.slip",
        db.raw(`an.result->'supplyHz' as supply_hz`),
        db.raw(`an.result->'phases' as phases`),
        db.raw(`an.result->'loadEstimates' as load_estimates`),
        "c.channels",
        "mp.kind as point_kind",
        "mp.ct_ratio",
      );
    const sBreak = breakdownSlip(input);
    const operatingPoints: OperatingPointOut[] = rows
      .reverse()
      .filter((r) => r.slip > 0 && r.slip < 1)
      .map((r) => {
        const supplyHz = typeof r.supply_hz === "number" ? r.supply_hz : null;
        const phases = Array.isArray(r.phases) ? r.phases : [];
        const current = measuredLineCurrentA(phases, Array.isArray(r.channels) ? r.channels : [], ctRatioOf({ kind: r.point_kind, ct_ratio: r.ct_ratio }));
        const slipMethod = Array.isArray(r.load_estimates) ? r.load_estimates.find((e: { method?: string }) => e.method === "slip")?.loadPct ?? null : null;
        const reading = modelReading(model, { slip: r.slip, supplyHz, currentA: current.currentA, slipMethodLoadPct: slipMethod }, { breakdownSlip: sBreak });
        return {
          takenAt: r.taken_at,
          captureId: r.capture_id,
          analysisId: r.id,
          slip: r.slip,
          rpm: rpmFromSlip(input.frequencyHz, input.poles, r.slip),
          supplyHz,
          torqueNm: reading.torqueNm,
          currentA: reading.measuredCurrentA,
          modelCurrentA: reading.modelCurrentA,
          currentRatio: reading.currentRatio,
          loadPct: reading.loadPct,
          slipMethodLoadPct: slipMethod,
          flags: reading.flags,
        };
      });
    return {
      origin,
      measured,
      input,
      sources,
      circuit: circuitTable(input, detail),
      assumptions,
      curves: curves(input, { points: 200 }),
      keyPoints: keyPoints(input),
      operatingPoints,
      currentTolerancePct: 100 * CURRENT_MISMATCH_LIMIT,
    };
  } catch (err) {
    if (err instanceof MotorModelError) throw new HttpError(422, err.message, undefined, "motor-model");
    throw err;
  }
}
