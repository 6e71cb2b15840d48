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
//
// A motor's measured model (`assetMotorModelRoutes`, guarded, in ROUTE_MODULES; admins, like every asset edit):
// PUT    /api/assets/:id/motor-model[?reanalyse=1]  body: { method: "circuit", r1, x1, r2, x2, xm, rc?, rotationalLossW,
//        connection? } or { method: "tests", noLoad, lockedRotor, statorResistanceDc?, designLetter, connection?, refine? }
//        → the motor model as GET /api/assets/:id/motor-model answers it (+ queued)
// DELETE /api/assets/:id/motor-model[?reanalyse=1]  back to the nameplate estimate → { cleared, queued? }

import { Router, type ErrorRequestHandler, type Request } from "express";
import type { z } from "zod";
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { HttpError, notFound, parseOr400, zodFields } from "../errors.ts";
import { audit } from "../audit.ts";
import { idParam } from "../captures/paging.ts";
import { requeueAnalyses } from "../captures/ingest.ts";
import { buildStoredModel, motorModelOf, storedModelOf } from "../captures/motor-model.ts";
import { assetMotorModelBody, flatEvaluateBody, fromTestsBody, nameplateBody, nestedEvaluateBody } from "../../src/shared/schemas/motor-model.ts";
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

const wantsReanalysis = (req: Request) => req.query.reanalyse === "1" || req.query.reanalyse === "true";

/** Save measured circuit values on a motor, or go back to the nameplate estimate. Admins (assets.write), audited. */
export function assetMotorModelRoutes(ctx: AppContext): Router {
  const r = guardedRouter("/api");
  const { db } = ctx;
  // Every stored capture of the motor, as editing the nameplate does (PATCH /assets/:id?reanalyse=1).
  const reanalyseAll = async (assetId: number) => (await requeueAnalyses(ctx, { assetId }, { newVersion: true })).length;

  r.put("/assets/:id/motor-model", "assets.write", async (req, res) => {
    const id = idParam(req.params.id, "motor");
    const body = parseOr400(assetMotorModelBody, req.body, "Invalid motor model");
    const row = await db("assets").where({ id }).first();
    if (!row) throw notFound("No such motor.");
    let stored;
    try {
      stored = buildStoredModel(row, body, req.user ? { id: req.user.id, name: req.user.name } : null);
    } catch (err) {
      if (err instanceof MotorModelError) throw new HttpError(422, err.message, undefined, "motor-model");
      throw err;
    }
    const replaced = storedModelOf(row) !== null;
    await db.transaction(async (trx) => {
      await trx("assets").where({ id }).update({ motor_model: JSON.stringify(stored), updated_at: trx.fn.now() });
      await audit(trx, {
        actor: req.user,
        action: "asset.motor-model.saved",
        subjectType: "asset",
        subjectId: id,
        details: { method: body.method, replaced, connection: stored.connection, frequencyHz: stored.frequencyHz, params: stored.params, rotationalLossW: stored.rotationalLossW },
        ip: req.ip,
      });
    });
    const queued = wantsReanalysis(req) ? await reanalyseAll(id) : 0;
    const model = await motorModelOf(db, { ...row, motor_model: stored });
    res.json({ ...model, ...(queued ? { queued } : {}) });
  });

  r.delete("/assets/:id/motor-model", "assets.write", async (req, res) => {
    const id = idParam(req.params.id, "motor");
    const row = await db("assets").where({ id }).first();
    if (!row) throw notFound("No such motor.");
    const cleared = storedModelOf(row) !== null;
    if (cleared) {
      await db.transaction(async (trx) => {
        await trx("assets").where({ id }).update({ motor_model: null, updated_at: trx.fn.now() });
        await audit(trx, { actor: req.user, action: "asset.motor-model.cleared", subjectType: "asset", subjectId: id, details: { method: row.motor_model?.method ?? null }, ip: req.ip });
      });
    }
    const queued = cleared && wantsReanalysis(req) ? await reanalyseAll(id) : 0;
    res.json({ cleared, ...(queued ? { queued } : {}) });
  });

  return r.router;
}
