// Motor model API: evaluate an equivalent circuit, estimate one from a nameplate, or derive one from
// no-load / locked-rotor tests. Pure computation, no database. Mounted by the app at /api/motor-model
// behind sign-in, so nothing here checks the user.
//
// POST /evaluate  body: { lineVoltage, frequencyHz, poles, connection, r1, x1, r2, x2, xm, rc?, rotorLockedR2?,
//                         rotorLockedX2?, rotationalLossW?, slip?, measuredCurrentA?, points? }
//                  The circuit constants may instead be nested: { ..., params: { r1, x1, r2, x2, xm, rc?, rotorLocked… } }
//                  (the standstill R2, X2 of a deep-bar rotor, as a nameplate estimate returns them).
//                  With slip: the operating point (+ flags). Without: { curves, start, pullUp, breakdown, thevenin }.
// POST /estimate  body: nameplate { ratedKw, ratedVoltage, ratedCurrent, ratedHz?, poles, ratedRpm, efficiency?,
//                         powerFactor?, designLetter?, connection? } → { input, sources, assumptions, ratedPoint, ... }
// POST /from-tests body: { noLoad: {V, I, P, f}, lockedRotor: {V, I, P, f}, statorResistanceDc?, designLetter,
//                         connection?, refine? } → { params, rotationalLossW, sources, notes }
// Bad bodies answer 400 { error: "Invalid request", fields: { path: message } }; well-formed but physically
// impossible inputs answer 422 { error }.

import { Router, type ErrorRequestHandler } from "express";
import type { z } from "zod";
import { zodFields } from "../errors.ts";
import { flatEvaluateBody, fromTestsBody, nameplateBody, nestedEvaluateBody } from "../../src/shared/schemas/motor-model.ts";
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
    const b = parse(nestedEvaluateBody, body);
    return { input: { ...b, params: b.params }, slip: b.slip, measuredCurrentA: b.measuredCurrentA, points: b.points };
  }
  const b = parse(flatEvaluateBody, body);
  const { r1, x1, r2, x2, xm, rc, rotorLockedR2, rotorLockedX2 } = b;
  return {
    input: {
      lineVoltage: b.lineVoltage,
      frequencyHz: b.frequencyHz,
      poles: b.poles,
      connection: b.connection,
      params: { r1, x1, r2, x2, xm, rc, rotorLockedR2, rotorLockedX2 },
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
    const estimate = estimateFromNameplate(parse(nameplateBody, req.body));
    const { start, pullUp, breakdown } = keyPoints(estimate.input);
    res.json({ ...estimate, start, pullUp, breakdown });
  });

  router.post("/from-tests", (req, res) => {
    res.json(fromTests(parse(fromTestsBody, req.body)));
  });

  router.use(handleErrors);
  return router;
}
