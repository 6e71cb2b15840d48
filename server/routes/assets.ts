// Motors (assets), their measurement points, the register import, trends and re-analysis.
import { z } from "zod";
import multer from "multer";
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { badRequest, conflict, HttpError, notFound, parseOr400 } from "../errors.ts";
import { audit } from "../audit.ts";
import { applySort, applyTimeRange, idParam, listQuery, paginate, timeRangeQuery } from "../captures/paging.ts";
import { applyGradeFilter, ASSET_SORT, assetBase, assetOut, assetSelect, loadAsset, nameplateChanges, pointOut, toRow } from "../captures/asset-service.ts";
import { assetBody, assetPatchBody, speedProblem } from "../../src/shared/schemas/assets.ts";
import { DEFAULT_POINT_UNIT, pointBody, pointPatchBody, type PointPatchBody } from "../../src/shared/schemas/points.ts";
import { importAssets } from "../captures/asset-import.ts";
import { requeueAnalyses } from "../captures/ingest.ts";
import { motorModelOf } from "../captures/motor-model.ts";

const pointRow = (p: PointPatchBody) => {
  const row: Record<string, unknown> = {};
  if (p.name !== undefined) row.name = p.name;
  if (p.kind !== undefined) row.kind = p.kind;
  if (p.position !== undefined) row.position = p.position;
  if (p.ctRatio !== undefined) row.ct_ratio = p.ctRatio;
  if (p.sensitivity !== undefined) row.sensitivity = p.sensitivity;
  if (p.unit !== undefined) row.unit = p.unit;
  return row;
};

/**
 * The most trend points one answer holds. A range with more keeps the newest (the answer says `truncated`, how many
 * the range holds and from when it shows), so the latest readings are never the ones missing.
 */
export const TREND_POINT_CAP = 5000;

const isUnique = (err: unknown) => (err as { code?: string }).code === "23505";
const isForeignKey = (err: unknown) => (err as { code?: string }).code === "23503";

export function assetRoutes(ctx: AppContext) {
  const r = guardedRouter("/api");
  const { db } = ctx;
  const importUpload = multer({ storage: multer.memoryStorage(), limits: { fileSize: 5 * 1024 * 1024, files: 1 } });

  const mustAsset = async (id: number) => {
    const a = await loadAsset(db, id);
    if (!a) throw notFound("No such motor.");
    return a;
  };
  const checkArea = async (areaId: number | undefined) => {
    if (areaId !== undefined && !(await db("areas").where({ id: areaId }).first())) throw badRequest("Invalid motor", { areaId: "No such area" });
  };
  // Every stored capture of the motor: versions reserved in one UPDATE, jobs queued in one INSERT (one transaction).
  const reanalyseAll = async (assetId: number) => (await requeueAnalyses(ctx, { assetId }, { newVersion: true })).length;

  r.get("/assets", "fleet.read", async (req, res) => {
    const q = listQuery(req.query, {
      siteId: z.coerce.number().int().positive().optional(),
      areaId: z.coerce.number().int().positive().optional(),
      q: z.string().trim().max(100).optional(),
      grade: z.string().max(60).optional(),
      drivenEquipment: z.string().max(40).optional(),
      criticality: z.enum(["low", "medium", "high"]).optional(),
    });
    const base = assetBase(db);
    if (q.siteId) base.where("s.id", q.siteId);
    if (q.areaId) base.where("a.area_id", q.areaId);
    if (q.q) base.where((w) => w.whereILike("a.tag", `%${q.q}%`).orWhereILike("a.name", `%${q.q}%`));
    if (q.drivenEquipment) base.whereIn("a.driven_equipment", q.drivenEquipment.split(","));
    if (q.criticality) base.where("a.criticality", q.criticality);
    if (q.grade) applyGradeFilter(base, q.grade);
    const page = await paginate(base, (b) => applySort(assetSelect(db)(b), q.sort, ASSET_SORT, "tag", "a.id"), q, assetOut);
    res.json(page);
  });

  r.get("/assets/:id", "fleet.read", async (req, res) => {
    const asset = await mustAsset(idParam(req.params.id, "motor"));
    const points = await db("measurement_points").where({ asset_id: asset.id }).orderBy("id");
    // How many captures it has, and how many of them keep their recording (what a re-analysis takes).
    const [counts] = await db("captures").where({ asset_id: asset.id }).select(db.raw("count(*)::int as total"), db.raw("count(blob_key)::int as stored"));
    res.json({ ...asset, measurementPoints: points.map(pointOut), captureCount: counts.total, storedCaptureCount: counts.stored });
  });

  r.post("/assets", "assets.write", async (req, res) => {
    const body = parseOr400(assetBody, req.body, "Invalid motor");
    await checkArea(body.areaId);
    try {
      const [row] = await db("assets").insert(toRow(body)).returning("id");
      await audit(db, { actor: req.user, action: "asset.created", subjectType: "asset", subjectId: row.id, details: { tag: body.tag }, ip: req.ip });
      res.status(201).json(await loadAsset(db, row.id));
    } catch (err) {
      if (isUnique(err)) throw new HttpError(409, `A motor with tag ${body.tag} already exists.`, { tag: "Another motor already has this tag" }, "conflict");
      throw err;
    }
  });

  r.patch("/assets/:id", "assets.write", async (req, res) => {
    const id = idParam(req.params.id, "motor");
    const body = parseOr400(assetPatchBody, req.body, "Invalid motor");
    const row = await db("assets").where({ id }).first();
    if (!row) throw notFound("No such motor.");
    const speed = speedProblem({ ratedRpm: body.ratedRpm ?? row.rated_rpm, ratedHz: body.ratedHz ?? row.rated_hz, poles: body.poles ?? row.poles });
    if (speed) throw badRequest("Invalid motor", { ratedRpm: speed });
    await checkArea(body.areaId);
    const changed = nameplateChanges(row, body);
    try {
      await db("assets")
        .where({ id })
        .update({ ...toRow(body), ...(changed.length ? { nameplate_version: row.nameplate_version + 1 } : {}), updated_at: db.fn.now() });
    } catch (err) {
      if (isUnique(err)) throw new HttpError(409, `A motor with tag ${body.tag} already exists.`, { tag: "Another motor already has this tag" }, "conflict");
      throw err;
    }
    await audit(db, { actor: req.user, action: "asset.updated", subjectType: "asset", subjectId: id, details: { fields: Object.keys(body), nameplateChanged: changed }, ip: req.ip });
    const queued = req.query.reanalyse === "1" || req.query.reanalyse === "true" ? await reanalyseAll(id) : 0;
    res.json({ ...(await loadAsset(db, id)), ...(queued ? { queued } : {}) });
  });

  r.delete("/assets/:id", "assets.write", async (req, res) => {
    const id = idParam(req.params.id, "motor");
    const row = await db("assets").where({ id }).first();
    if (!row) throw notFound("No such motor.");
    // The register keeps a motor with history; the way out is to move it or leave it.
    const wayOut = "Move it to another area, or leave it in the register.";
    const [{ count }] = await db("captures").where({ asset_id: id }).count<{ count: string }[]>({ count: "*" });
    const n = Number(count);
    if (n > 0) throw conflict(`Motor ${row.tag} was not deleted: it has ${n} capture${n === 1 ? "" : "s"}, and the register keeps a motor with its history. ${wayOut}`);
    try {
      await db("assets").where({ id }).delete();
    } catch (err) {
      if (isForeignKey(err)) throw conflict(`Motor ${row.tag} was not deleted: inspections or gateway streams refer to it, and the register keeps a motor with its history. ${wayOut}`);
      throw err;
    }
    await audit(db, { actor: req.user, action: "asset.deleted", subjectType: "asset", subjectId: id, details: { tag: row.tag }, ip: req.ip });
    res.status(204).end();
  });

  r.post("/assets/import", "assets.write", (req, res, next) => {
    importUpload.single("file")(req, res, (err: unknown) => {
      if (err) {
        const code = (err as { code?: string }).code;
        if (code === "LIMIT_FILE_SIZE") return next(new HttpError(413, "The register file is larger than 5 MB.", undefined, "too-large"));
        return next(badRequest("Send the register as a multipart form with one `file` part.", { file: (err as Error).message }));
      }
      next();
    });
  }, async (req, res) => {
    if (!req.file) throw badRequest("Attach the register CSV as `file`.", { file: "Required" });
    const text = req.file.buffer.toString("utf8");
    if (text.includes("\u0000")) throw new HttpError(415, "The register must be a CSV text file.", undefined, "unsupported-type");
    const report = await importAssets(db, text);
    await audit(db, { actor: req.user, action: "asset.imported", subjectType: "asset", details: { created: report.created, updated: report.updated, errors: report.errors.length }, ip: req.ip });
    res.json(report);
  });

  r.post("/assets/:id/points", "assets.write", async (req, res) => {
    const assetId = idParam(req.params.id, "motor");
    const body = parseOr400(pointBody, req.body, "Invalid measurement point");
    if (!(await db("assets").where({ id: assetId }).first())) throw notFound("No such motor.");
    try {
      const p = await db.transaction(async (trx) => {
        const [row] = await trx("measurement_points").insert({ asset_id: assetId, ...pointRow(body), unit: body.unit ?? DEFAULT_POINT_UNIT[body.kind] }).returning("*");
        await audit(trx, { actor: req.user, action: "point.created", subjectType: "asset", subjectId: assetId, details: { pointId: row.id, name: row.name, kind: row.kind }, ip: req.ip });
        return row;
      });
      res.status(201).json(pointOut(p));
    } catch (err) {
      if (isUnique(err)) throw new HttpError(409, `This motor already has a point named ${body.name}.`, { name: "This motor already has a point with this name" }, "conflict");
      throw err;
    }
  });

  r.patch("/points/:id", "assets.write", async (req, res) => {
    const id = idParam(req.params.id, "measurement point");
    const body = parseOr400(pointPatchBody, req.body, "Invalid measurement point");
    const before = await db("measurement_points").where({ id }).first();
    if (!before) throw notFound("No such measurement point.");
    try {
      const row = pointRow(body);
      if (Object.keys(row).length)
        await db.transaction(async (trx) => {
          await trx("measurement_points").where({ id }).update(row);
          await audit(trx, { actor: req.user, action: "point.updated", subjectType: "asset", subjectId: before.asset_id, details: { pointId: id, fields: Object.keys(row) }, ip: req.ip });
        });
    } catch (err) {
      if (isUnique(err)) throw new HttpError(409, `This motor already has a point named ${body.name}.`, { name: "This motor already has a point with this name" }, "conflict");
      throw err;
    }
    res.json(pointOut(await db("measurement_points").where({ id }).first()));
  });

  r.delete("/points/:id", "assets.write", async (req, res) => {
    const id = idParam(req.params.id, "measurement point");
    await db.transaction(async (trx) => {
      const [gone] = await trx("measurement_points").where({ id }).delete().returning(["asset_id", "name"]);
      if (!gone) throw notFound("No such measurement point.");
      await audit(trx, { actor: req.user, action: "point.deleted", subjectType: "asset", subjectId: gone.asset_id, details: { pointId: id, name: gone.name }, ip: req.ip });
    });
    res.status(204).end();
  });

  r.post("/assets/:id/reanalyse", "analyses.reanalyse", async (req, res) => {
    const id = idParam(req.params.id, "motor");
    await mustAsset(id);
    const queued = await reanalyseAll(id);
    await audit(db, { actor: req.user, action: "asset.reanalysed", subjectType: "asset", subjectId: id, details: { queued }, ip: req.ip });
    res.status(202).json({ queued });
  });

  r.get("/assets/:id/trend", "fleet.read", async (req, res) => {
    const id = idParam(req.params.id, "motor");
    const q = parseOr400(
      timeRangeQuery({ limit: z.coerce.number().int().min(1, "limit is at least 1").max(TREND_POINT_CAP, `limit is at most ${TREND_POINT_CAP}`).optional() }),
      req.query,
      "Invalid trend query",
    );
    await mustAsset(id);
    const cap = q.limit ?? TREND_POINT_CAP;
    const inRange = () => applyTimeRange(db("analyses").where({ asset_id: id, is_current: true }), "taken_at", q);
    // Newest first (index analyses_asset_current), one more than the cap to know whether the range holds more.
    const newest = await inRange()
      .orderBy([{ column: "taken_at", order: "desc" }, { column: "id", order: "desc" }])
      .limit(cap + 1);
    const truncated = newest.length > cap;
    const rows = newest.slice(0, cap).reverse(); // oldest first, as the charts draw them
    const total = truncated ? Number((await inRange().count({ n: "*" }))[0].n) : rows.length;
    res.json({
      points: rows.map((a: Record<string, any>) => ({
        takenAt: a.taken_at,
        captureId: a.capture_id,
        analysisId: a.id,
        loadPct: a.load_pct,
        slip: a.slip,
        rpm: a.rpm,
        sidebandDb: a.sideband_db,
        rotorGrade: a.rotor_grade,
        rotorAssessable: a.rotor_assessable,
        vibrationRms: a.vibration_rms,
        vibrationZone: a.vibration_zone,
        supplyHz: a.supply_hz,
      })),
      truncated,
      total,
      limit: cap,
      shownFrom: rows.length ? rows[0].taken_at : null,
    });
  });

  r.get("/assets/:id/motor-model", "fleet.read", async (req, res) => {
    const id = idParam(req.params.id, "motor");
    const row = await db("assets").where({ id }).first();
    if (!row) throw notFound("No such motor.");
    res.json(await motorModelOf(db, row));
  });

  return r.router;
}
