// Findings (raised by analyses), analysts' verdicts on them, and the review queue.
import { z } from "zod";
import type { Knex } from "knex";
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { notFound, parseOr400 } from "../errors.ts";
import { audit } from "../audit.ts";
import { verdictBody } from "../../src/shared/schemas/findings.ts";
import { applySort, applyTimeRange, idParam, listQuery, paginate, timeRangeFields } from "../captures/paging.ts";
import { publishEvent } from "../captures/publish.ts";
import { waitingSinceColumn } from "../reports/review-counts.ts";

const FINDING_STATUSES = ["open", "confirmed", "dismissed", "remeasure"] as const;

/** One scale for both kinds, worst = highest: rotor R2..R5 → 2..5, vibration zone C → 3, D → 4. */
const SEVERITY = `(case f.level when 'R5' then 5 when 'R4' then 4 when 'R3' then 3 when 'R2' then 2 when 'D' then 4 when 'C' then 3 when 'B' then 2 else 1 end)`;
/** What a finding's `level` holds: a rotor grade (R2 Watch … R5 Severe) or a vibration zone (B … D). */
const FINDING_LEVELS = ["R2", "R3", "R4", "R5", "B", "C", "D"] as const;
const levelList = z
  .string()
  .transform((s) => s.split(",").map((x) => x.trim().toUpperCase()).filter(Boolean))
  .refine((l) => l.length > 0 && l.every((x) => (FINDING_LEVELS as readonly string[]).includes(x)), `One or more of: ${FINDING_LEVELS.join(", ")} (comma-separated)`);

const CRITICALITY = `(case a.criticality when 'high' then 3 when 'medium' then 2 else 1 end)`;

const FINDING_SORT: Record<string, string> = {
  createdAt: "f.created_at",
  severity: SEVERITY,
  level: SEVERITY,
  criticality: CRITICALITY,
  assetTag: "a.tag",
  status: "f.status",
  kind: "f.kind",
  loadPct: "an.load_pct",
};

function findingBase(db: Knex) {
  return db("findings as f")
    .join("assets as a", "a.id", "f.asset_id")
    .join("areas as ar", "ar.id", "a.area_id")
    .join("sites as s", "s.id", "ar.site_id")
    .leftJoin("analyses as an", "an.id", "f.analysis_id");
}
const findingSelect = (q: Knex.QueryBuilder) =>
  q.select("f.*", "a.tag as asset_tag", "a.name as asset_name", "a.criticality", "s.id as site_id", "s.name as site_name", "an.load_pct", "an.taken_at");

async function withVerdicts(db: Knex, rows: Record<string, any>[]) {
  const ids = rows.map((r) => r.id);
  const verdicts = ids.length
    ? await db("verdicts as v").leftJoin("users as u", "u.id", "v.analyst_id").whereIn("v.finding_id", ids).orderBy("v.created_at").select("v.*", "u.name as analyst_name")
    : [];
  return rows.map((r) => ({
    id: r.id,
    assetId: r.asset_id,
    assetTag: r.asset_tag,
    assetName: r.asset_name,
    siteId: r.site_id,
    siteName: r.site_name,
    kind: r.kind,
    level: r.level,
    previousLevel: r.previous_level,
    summary: r.summary,
    status: r.status,
    createdAt: r.created_at,
    takenAt: r.taken_at,
    captureId: r.capture_id,
    analysisId: r.analysis_id,
    loadPct: r.load_pct,
    criticality: r.criticality,
    verdicts: verdicts
      .filter((v) => v.finding_id === r.id)
      .map((v) => ({ id: v.id, verdict: v.verdict, note: v.note, analystId: v.analyst_id, analystName: v.analyst_name, createdAt: v.created_at })),
  }));
}

export function findingRoutes(ctx: AppContext) {
  const r = guardedRouter("/api");
  const { db } = ctx;

  r.get("/findings", "fleet.read", async (req, res) => {
    const q = listQuery(req.query, {
      status: z.string().optional().refine((s) => !s || s.split(",").every((x) => (FINDING_STATUSES as readonly string[]).includes(x)), `One or more of: ${FINDING_STATUSES.join(", ")}`),
      assetId: z.coerce.number().int().positive().optional(),
      siteId: z.coerce.number().int().positive().optional(),
      kind: z.enum(["rotor", "vibration"], { message: "kind is rotor or vibration" }).optional(),
      level: levelList.optional(),
      ...timeRangeFields, // on the finding's created_at
    }, { strict: true });
    const base = findingBase(db);
    if (q.status) base.whereIn("f.status", q.status.split(","));
    if (q.assetId) base.where("f.asset_id", q.assetId);
    if (q.siteId) base.where("s.id", q.siteId);
    if (q.kind) base.where("f.kind", q.kind);
    if (q.level) base.whereIn("f.level", q.level);
    applyTimeRange(base, "f.created_at", q);
    const page = await paginate(base, (b) => applySort(findingSelect(b), q.sort, FINDING_SORT, "-createdAt", "f.id"), q, (x) => x);
    res.json({ ...page, items: await withVerdicts(db, page.items) });
  });

  r.get("/findings/:id", "fleet.read", async (req, res) => {
    const id = idParam(req.params.id, "finding");
    const row = await findingSelect(findingBase(db).where("f.id", id)).first();
    if (!row) throw notFound("No such finding.");
    res.json((await withVerdicts(db, [row]))[0]);
  });

  r.post("/findings/:id/verdict", "verdicts.write", async (req, res) => {
    const id = idParam(req.params.id, "finding");
    const body = parseOr400(verdictBody, req.body, "Invalid verdict");
    await db.transaction(async (trx) => {
      const f = await trx("findings").where({ id }).forUpdate().first();
      if (!f) throw notFound("No such finding.");
      await trx("verdicts").insert({ finding_id: id, analyst_id: req.user!.id, verdict: body.verdict, note: body.note || null });
      await trx("findings").where({ id }).update({ status: body.verdict, updated_at: trx.fn.now() });
      // Recorded with the change it describes: both commit or neither.
      await audit(trx, { actor: req.user, action: "verdict.set", subjectType: "finding", subjectId: id, details: { from: f.status, to: body.verdict, note: body.note || undefined }, ip: req.ip });
    });
    const row = await findingSelect(findingBase(db).where("f.id", id)).first();
    // Other analysts' review queues, the plan's "needs action" list and the fleet counts change with it.
    await publishEvent(ctx, "finding:verdict", { id, assetId: row.asset_id, verdict: body.verdict });
    res.json((await withVerdicts(db, [row]))[0]);
  });

  /** Captures whose analysis raised a finding still waiting for a verdict (or any, with status=all), worst first. */
  r.get("/review", "review.read", async (req, res) => {
    const q = listQuery(req.query, {
      status: z.enum(["open", "all"]).default("open"),
      siteId: z.coerce.number().int().positive().optional(),
    });
    const grouped = db("findings as f")
      .join("assets as a", "a.id", "f.asset_id")
      .join("areas as ar", "ar.id", "a.area_id")
      .modify((b) => {
        if (q.status === "open") b.where("f.status", "open");
        if (q.siteId) b.where("ar.site_id", q.siteId);
      })
      .groupBy("f.capture_id")
      .select("f.capture_id", db.raw(`max(${SEVERITY}) as severity`), db.raw(`max(${CRITICALITY}) as criticality`), waitingSinceColumn(db)); // only findings still without a verdict
    const base = db.from(grouped.as("g")).join("captures as c", "c.id", "g.capture_id").join("assets as a", "a.id", "c.asset_id");
    const REVIEW_SORT = { severity: "g.severity", criticality: "g.criticality", raisedAt: "g.raised_at", takenAt: "c.taken_at", assetTag: "a.tag" };
    const page = await paginate(
      base,
      (b) => {
        const sel = b.select("g.*", "c.taken_at", "c.asset_id", "c.file_name", "c.status as capture_status", "a.tag as asset_tag", "a.name as asset_name");
        if (!q.sort) return sel.orderByRaw("g.severity desc, g.criticality desc, g.raised_at desc, g.capture_id desc");
        return applySort(sel, q.sort, REVIEW_SORT, "-severity", "g.capture_id");
      },
      q,
      (x) => x,
    );
    const captureIds = page.items.map((i: any) => i.capture_id);
    const findings = captureIds.length
      ? await withVerdicts(
          db,
          await findingSelect(findingBase(db).whereIn("f.capture_id", captureIds).modify((b) => (q.status === "open" ? b.where("f.status", "open") : b))).orderByRaw(`${SEVERITY} desc`),
        )
      : [];
    res.json({
      ...page,
      items: page.items.map((i: any) => ({
        captureId: i.capture_id,
        assetId: i.asset_id,
        assetTag: i.asset_tag,
        assetName: i.asset_name,
        takenAt: i.taken_at,
        fileName: i.file_name,
        captureStatus: i.capture_status,
        severity: Number(i.severity),
        raisedAt: i.raised_at,
        findings: findings.filter((f) => f.captureId === i.capture_id),
      })),
    });
  });

  return r.router;
}
