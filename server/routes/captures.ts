// Captures: upload (POST /captures), list, detail with the current analysis, requeue, spectrum and waveform.
import { z } from "zod";
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { badRequest, conflict, HttpError, notFound, parseOr400 } from "../errors.ts";
import { audit } from "../audit.ts";
import { applySort, applyTimeRange, idParam, listQuery, paginate, timeRangeFields } from "../captures/paging.ts";
import { CAPTURE_SORT, captureBase, captureOut, captureSelect, loadCapture } from "../captures/capture-service.ts";
import { checkFile, FileRejected, receiveMultipart, removeDir, type CheckedFile } from "../captures/upload.ts";
import { ingestFailure, requeueAnalysis, storeCapturesAndQueue } from "../captures/ingest.ts";
import { spectrumView, waveformView } from "../captures/signal-views.ts";
import { blobStoreOf } from "../blob/index.ts";
import { uploadFields } from "../../src/shared/schemas/captures.ts";

const STATUSES = ["received", "queued", "analysing", "analysed", "failed"] as const;

export function captureRoutes(ctx: AppContext) {
  const r = guardedRouter("/api");
  const { db } = ctx;

  /**
   * Upload one or more capture files. All-or-nothing: every file is checked first; if any is refused, none is
   * stored and the answer names the file. Status codes: 400 bad metadata or no file, 404 unknown motor,
   * 413 over the size limit, 415 not CSV/WAV by content, 422 CSV/WAV that cannot be parsed (message names the
   * line or byte), 503 code "unavailable" when the database, queue or blob store failed (nothing stored), 202 stored
   * and queued.
   */
  r.post("/captures", "captures.upload", async (req, res) => {
    const { dir, files, fields } = await receiveMultipart(ctx, req, res);
    // The answer is sent only after the temp folder is gone, so a client never sees leftovers.
    let answer: { status: number; body: unknown };
    try {
      const meta = parseOr400(uploadFields, fields, "Invalid capture details");
      if (!files.length) throw badRequest("Attach at least one capture file (form part \"file\").", { file: "Required" });
      const asset = await db("assets").where({ id: meta.assetId }).first("id");
      if (!asset) throw new HttpError(404, `No motor with id ${meta.assetId}.`, { assetId: "No such motor" }, "not-found");
      if (meta.measurementPointId) {
        const point = await db("measurement_points").where({ id: meta.measurementPointId, asset_id: meta.assetId }).first("id");
        if (!point) throw badRequest("Invalid capture details", { measurementPointId: "This measurement point does not belong to the motor" });
      }
      const checked: CheckedFile[] = [];
      for (const f of files) checked.push(await checkFile(f, meta.sampleRate));
      const takenAt = meta.takenAt ? new Date(meta.takenAt) : new Date();
      const stored = await storeCapturesAndQueue(
        ctx,
        checked.map((f) => ({
          assetId: meta.assetId,
          measurementPointId: meta.measurementPointId ?? null,
          takenAt,
          takenByUserId: req.user!.id,
          source: "upload" as const,
          fileName: f.fileName,
          format: f.format,
          path: f.path,
          movePath: true, // the temp file goes into the blob store as it is (renamed, not copied)
          notes: meta.notes ?? null,
          meta: f.meta,
        })),
      ).catch((err: unknown) => {
        // The database, queue or blob store failing here is a 503 "nothing was stored, try again" (the ingest undid
        // its steps), not a bare 500; the cause goes to the log.
        const refusal = ingestFailure(err);
        if (refusal !== err) req.log?.error({ err }, "capture ingest failed");
        throw refusal;
      });
      await audit(db, { actor: req.user, action: "capture.uploaded", subjectType: "asset", subjectId: meta.assetId, details: { captures: stored.map((s) => s.id) }, ip: req.ip });
      answer = { status: 202, body: { captures: stored } };
    } catch (err) {
      if (!(err instanceof FileRejected)) throw err;
      answer = { status: err.status, body: { error: err.message, code: err.code, fields: err.fields, ...err.detail } };
    } finally {
      await removeDir(dir);
    }
    res.status(answer.status).json(answer.body);
  });

  r.get("/captures", "fleet.read", async (req, res) => {
    const q = listQuery(req.query, {
      assetId: z.coerce.number().int().positive().optional(),
      siteId: z.coerce.number().int().positive().optional(),
      status: z.string().optional().refine((s) => !s || s.split(",").every((x) => (STATUSES as readonly string[]).includes(x)), `One or more of: ${STATUSES.join(", ")}`),
      source: z.enum(["upload", "stream"]).optional(),
      mine: z.enum(["0", "1", "true", "false"]).optional(),
      ...timeRangeFields, // on taken_at
    }, { strict: true });
    const base = captureBase(db);
    applyTimeRange(base, "c.taken_at", q);
    if (q.assetId) base.where("c.asset_id", q.assetId);
    if (q.siteId) base.where("ar.site_id", q.siteId);
    if (q.status) base.whereIn("c.status", q.status.split(","));
    if (q.source) base.where("c.source", q.source);
    if (q.mine === "1" || q.mine === "true") base.where("c.taken_by_user_id", req.user!.id);
    res.json(await paginate(base, (b) => applySort(captureSelect(b), q.sort, CAPTURE_SORT, "-takenAt", "c.id"), q, captureOut));
  });

  r.get("/captures/:id", "fleet.read", async (req, res) => {
    const cap = await loadCapture(db, idParam(req.params.id, "capture"));
    if (!cap) throw notFound("No such capture.");
    res.json(cap);
  });

  r.post("/captures/:id/requeue", "captures.requeue", async (req, res) => {
    const id = idParam(req.params.id, "capture");
    const row = await db("captures").where({ id }).first("status");
    if (!row) throw notFound("No such capture.");
    if (row.status === "queued" || row.status === "received") throw conflict("This capture is already waiting for analysis.");
    const out = await requeueAnalysis(ctx, id, { newVersion: false });
    await audit(db, { actor: req.user, action: "capture.requeued", subjectType: "capture", subjectId: id, details: { from: row.status, version: out?.version }, ip: req.ip });
    res.status(202).json(out);
  });

  const num = z.preprocess((v) => (v === "" || v === undefined ? undefined : Number(v)), z.number().finite().optional());
  const buckets = z.preprocess((v) => (v === "" || v === undefined ? undefined : Number(v)), z.number().int().min(16).max(20000).default(2000));

  r.get("/captures/:id/spectrum", "fleet.read", async (req, res) => {
    const id = idParam(req.params.id, "capture");
    const q = parseOr400(
      z.object({ channel: z.string().max(100).optional(), kind: z.enum(["current", "vibration"]).optional(), fmin: num, fmax: num, buckets }),
      req.query,
      "Invalid spectrum query",
    );
    res.json(await spectrumView(db, blobStoreOf(ctx), id, q));
  });

  r.get("/captures/:id/waveform", "fleet.read", async (req, res) => {
    const id = idParam(req.params.id, "capture");
    const q = parseOr400(z.object({ channel: z.string().max(100).optional(), from: num, to: num, buckets }), req.query, "Invalid waveform query");
    res.json(await waveformView(db, blobStoreOf(ctx), id, q));
  });

  return r.router;
}
