// Motor model API: evaluate an equivalent circuit, estimate one from a nameplate, or derive one from
// no-load / locked-rotor tests. Pure computation, no database. Mounted by the app at /api/motor-model
// behind sign-in, so nothing here checks the user.
//
// POST /evaluate  body: { lineVoltage, frequencyHz, poles, connection, r1, x1, r2, x2, xm, rc?, rotationalLossW?,
//                         slip?, measuredCurrentA?, points? }
//                  The circuit constants may instead be nested: { ..., params: { r1, x1, r2, x2, xm, rc? } }.
//                  With slip: the operating point (+ flags). Without: { curves, start, pullUp, breakdown, thevenin }.
// POST /estimate  body: nameplate { ratedKw, ratedVoltage, ratedCurrent, ratedHz?, poles, ratedRpm, efficiency?,
//                         powerFactor?, designLetter?, connection? } → { input, sources, assumptions, ratedPoint, ... }
// POST /from-tests body: { noLoad: {V, I, P, f}, lockedRotor: {V, I, P, f}, statorResistanceDc?, designLetter,
//                         connection?, refine? } → { params, rotationalLossW, sources, notes }
// Bad bodies answer 400 { error: "Invalid request", fields: { path: message } }; well-formed but physically
// impossible inputs answer 422 { error }.

import { Router, type ErrorRequestHandler } from "express";
import { z } from "zod";
import { zodFields } from "../errors.ts";
import {
  checkOperatingPoint,
  curves,
  estimateFromNameplate,
  evaluateAtSlip,
  fromTests,
  keyPoints,
  MotorModelError,
  type MotorModelInput,
} from "../../src/engine/motor-model/index.ts";

const positive = z.number().positive().finite();
const nonNegative = z.number().nonnegative().finite();
const poles = z.number().int().min(2).max(120).refine((p) => p % 2 === 0, "poles must be even");
const connection = z.enum(["star", "delta"]);

const circuitFields = {
  r1: nonNegative,
  x1: nonNegative,
  r2: positive,
  x2: nonNegative,
  xm: positive,
  rc: positive.nullable().optional(),
};

const evaluateFields = {
  lineVoltage: positive,
  frequencyHz: positive,
  poles,
  connection,
  rotationalLossW: nonNegative.optional(),
  /** 1 = standstill, 0 = synchronous; plugging (up to 2) and generating (down to −1) are allowed. */
  slip: z.number().min(-1).max(2).optional(),
  measuredCurrentA: positive.optional(),
  points: z.number().int().min(2).max(2000).optional(),
};

const flatEvaluateSchema = z.object({ ...evaluateFields, ...circuitFields });
const nestedEvaluateSchema = z.object({ ...evaluateFields, params: z.object(circuitFields) });

const nameplateSchema = z.object({
  ratedKw: positive,
  ratedVoltage: positive,
  ratedCurrent: positive,
  ratedHz: positive.optional(),
  poles,
  ratedRpm: positive,
  efficiency: z.number().gt(0).max(100).optional(),
  powerFactor: z.number().gt(0).max(1).optional(),
  designLetter: z.enum(["A", "B", "C", "D", "wound"]).optional(),
  connection: connection.optional(),
});

const reading = z.object({ V: positive, I: positive, P: nonNegative, f: positive });
const testsSchema = z.object({
  noLoad: reading,
  lockedRotor: reading,
  statorResistanceDc: positive.optional(),
  designLetter: z.enum(["A", "B", "C", "D", "wound"]),
  connection: connection.optional(),
  refine: z.boolean().optional(),
});

class InvalidBody extends Error {
  constructor(public fields: Record<string, string>) {
    super("Invalid request");
  }
}

function parse<T>(schema: z.ZodType<T>, body: unknown): T {
  const r = schema.safeParse(body);
  if (!r.success) throw new InvalidBody(zodFields(r.error));
  return r.data;
}

/** Builds the model input from either body shape (flat constants, or nested under `params`). */
function modelInput(body: unknown): { input: MotorModelInput; slip?: number; measuredCurrentA?: number; points?: number } {
  const nested = typeof body === "object" && body !== null && "params" in body;
  if (nested) {
    const b = parse(nestedEvaluateSchema, body);
    return { input: { ...b, params: b.params }, slip: b.slip, measuredCurrentA: b.measuredCurrentA, points: b.points };
  }
  const b = parse(flatEvaluateSchema, body);
  const { r1, x1, r2, x2, xm, rc } = b;
  return {
    input: {
      lineVoltage: b.lineVoltage,
      frequencyHz: b.frequencyHz,
      poles: b.poles,
      connection: b.connection,
      params: { r1, x1, r2, x2, xm, rc },
      rotationalLossW: b.rotationalLossW,
    },
    slip: b.slip,
    measuredCurrentA: b.measuredCurrentA,
    points: b.points,
  };
}

const handleErrors: ErrorRequestHandler = (err, _req, res, next) => {
  if (err instanceof InvalidBody) {
    res.status(400).json({ error: "Invalid request", fields: err.fields });
    return;
  }
  if (err instanceof MotorModelError) {
    res.status(422).json({ error: err.message });
    return;
  }
  next(err);
};

export function motorModelRouter(): Router {
  const router = Router();

  router.post("/evaluate", (req, res) => {
    const { input, slip, measuredCurrentA, points } = modelInput(req.body);
    if (slip !== undefined) {
      res.json({ ...evaluateAtSlip(input, slip), flags: checkOperatingPoint(input, slip, measuredCurrentA) });
      return;
    }
    const { start, pullUp, breakdown, thevenin } = keyPoints(input);
    res.json({ curves: curves(input, { points: points ?? 200 }), start, pullUp, breakdown, thevenin });
  });

  router.post("/estimate", (req, res) => {
    const estimate = estimateFromNameplate(parse(nameplateSchema, req.body));
    const { start, pullUp, breakdown } = keyPoints(estimate.input);
    res.json({ ...estimate, start, pullUp, breakdown });
  });

  router.post("/from-tests", (req, res) => {
    res.json(fromTests(parse(testsSchema, req.body)));
  });

  router.use(handleErrors);
  return router;
}
