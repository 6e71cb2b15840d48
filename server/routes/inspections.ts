import { z } from "zod";
import type { Knex } from "knex";
import type { AppContext } from "../context.ts";
import { guardedRouter, type SessionUser } from "../http.ts";
import { badRequest, conflict, forbidden, notFound, parseOr400, HttpError, zodFields } from "../errors.ts";
import { can } from "../permissions.ts";
import { audit } from "../audit.ts";
import { computePriority, conditionClass } from "../plan/priority.ts";
import { OPEN_STATUSES, TECHNICIAN_TARGETS, assertTransition, type InspectionStatus } from "../plan/workflow.ts";
import { applyFilters, applySort, baseQuery, filterQuery, findInspection, isoDate, latestAnalysis, listQuery, toInspection, type Inspection, type InspectionRow } from "../plan/store.ts";
import { mailInspection } from "../plan/notify.ts";
import { planCalendar } from "../plan/plan-calendar.ts";
import { toCsv } from "../plan/csv.ts";
import { completeBody, inspectionPatchBody, isPastDueDate, PAST_DUE_DATE, scheduleBody, type InspectionPatchBody } from "../../src/shared/schemas/inspections.ts";
import { attachmentKey, attachmentStore, attachmentUpload, cleanFileName, sniffAttachment } from "../plan/attachments.ts";

// The inspection plan: planners turn findings into inspections, technicians work them, everyone reads them.

const idParam = z.coerce.number().int().positive();
/** Who can hold an inspection: the roles that may work one. */
const ASSIGNABLE_ROLES = ["technician", "planner"];

// Request bodies: src/shared/schemas/inspections.ts (the Plan and My work forms use the same rules).
type PatchBody = InspectionPatchBody;
/** Fields only a planner may change. */
const PLANNER_FIELDS = ["title", "dueDate", "assigneeId", "priority", "instructions"] as const;

const calendarQuery = filterQuery.omit({ sort: true, from: true, to: true }).extend({ from: isoDate.optional(), to: isoDate.optional() });
const CALENDAR_DEFAULT_DAYS = 42; // six weeks: a month view with its leading and trailing days
const addDays = (iso: string, n: number) => new Date(Date.parse(`${iso}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10);

/** Attachment types a browser may show in the page rather than download. */
const INLINE_TYPES = ["image/png", "image/jpeg"];

/** Content-Disposition with the file name for old and new clients (RFC 6266: filename and filename*). */
function contentDisposition(type: "inline" | "attachment", fileName: string): string {
  const ascii = fileName.replace(/[^\x20-\x7e]/g, "_").replace(/["\\]/g, "_");
  const encoded = encodeURIComponent(fileName).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);
  return `${type}; filename="${ascii}"; filename*=UTF-8''${encoded}`;
}

type AttachmentRow = { id: number; inspection_id: number; file_name: string; content_type: string; byte_size: string | number; capture_id: number | null; created_at: string };
/** An attachment in the API's shape; `url` downloads it (photos open inline, `?download=1` forces a download). */
const toAttachment = (a: AttachmentRow) => ({
  id: a.id,
  fileName: a.file_name,
  contentType: a.content_type,
  size: Number(a.byte_size),
  captureId: a.capture_id,
  createdAt: a.created_at,
  url: `/api/inspections/${a.inspection_id}/attachments/${a.id}`,
});

function publish(ctx: AppContext, id: number) {
  const fn = ctx.services.publish as ((event: string, payload: unknown) => void) | undefined;
  try {
    fn?.("inspection:changed", { id });
  } catch {
    /* live updates are best effort */
  }
}

async function assignee(db: Knex | Knex.Transaction, id: number) {
  const u = await db("users").where({ id }).first("id", "name", "email", "role", "active");
  if (!u || !u.active) throw badRequest("Invalid assignee", { assigneeId: "No such active user." });
  if (!ASSIGNABLE_ROLES.includes(u.role)) throw badRequest("Invalid assignee", { assigneeId: `Inspections go to a technician or planner, not a ${u.role}.` });
  return u as { id: number; name: string; email: string; role: string };
}

/** The condition the priority rule looks at: the finding's own level and the motor's latest analysis, worst of each. */
async function conditionOf(db: Knex, assetId: number, finding?: { kind: string; level: string } | null) {
  const latest = await latestAnalysis(db, assetId);
  const worse = (a: string | null | undefined, b: string | null | undefined) => (!a ? b : !b ? a : a > b ? a : b); // R1<R5, A<D
  const grade = worse(finding?.kind === "rotor" ? finding.level : null, latest?.rotor_assessable ? latest.rotor_grade : null) ?? null;
  const zone = worse(finding?.kind === "vibration" ? finding.level : null, latest?.vibration_zone) ?? null;
  return { grade, zone, latest };
}

export function inspectionRoutes(ctx: AppContext) {
  const { db } = ctx;
  const r = guardedRouter("/api");
  const store = attachmentStore(ctx);

  const detail = async (id: number) => {
    const row = await findInspection(db, id);
    if (!row) throw notFound("No such inspection.");
    const [events, attachments] = await Promise.all([
      db("inspection_events as e").leftJoin("users as u", "u.id", "e.by_user_id").where("e.inspection_id", id).orderBy("e.id").select("e.*", "u.name as by_name"),
      db("inspection_attachments").where({ inspection_id: id }).orderBy("id"),
    ]);
    // A reassignment's history line names the people (details hold their ids; null is nobody).
    const personIds = [...new Set(events.filter((e) => e.kind === "reassigned").flatMap((e) => [e.details?.from, e.details?.to]).filter((v): v is number => typeof v === "number"))];
    const names = new Map<number, string>(personIds.length ? (await db("users").whereIn("id", personIds).select("id", "name")).map((u) => [u.id as number, u.name as string]) : []);
    const nameOf = (v: unknown) => (typeof v === "number" ? (names.get(v) ?? null) : null);
    return {
      ...toInspection(row),
      events: events.map((e) => ({
        id: e.id,
        at: e.at,
        kind: e.kind,
        from: e.from_status,
        to: e.to_status,
        byId: e.by_user_id,
        byName: e.by_name ?? null,
        note: e.note,
        details: e.kind === "reassigned" && e.details ? { ...e.details, fromName: nameOf(e.details.from), toName: nameOf(e.details.to) } : e.details,
      })),
      attachments: attachments.map(toAttachment),
    };
  };

  // --- reading -------------------------------------------------------------------------------------------

  r.get("/inspections", "fleet.read", async (req, res) => {
    const q = parseOr400(listQuery, req.query);
    const base = applyFilters(baseQuery(db), q, req.user!.id);
    const [{ count }] = await applyFilters(db("inspections as i").join("assets as a", "a.id", "i.asset_id").join("areas as ar", "ar.id", "a.area_id").join("sites as s", "s.id", "ar.site_id"), q, req.user!.id).count({ count: "*" });
    const rows = await applySort(base, q.sort).limit(q.pageSize).offset((q.page - 1) * q.pageSize);
    // Each item carries its files (photos and captures kept with it), so a list of finished work can show them.
    const ids = rows.map((x: InspectionRow) => x.id as number);
    const files = ids.length ? await db("inspection_attachments").whereIn("inspection_id", ids).orderBy("id") : [];
    const items = rows.map((x: InspectionRow) => ({ ...toInspection(x), attachments: files.filter((a) => a.inspection_id === x.id).map(toAttachment) }));
    res.json({ items, total: Number(count), page: q.page, pageSize: q.pageSize });
  });

  // Calendar view: inspections by due date over a range, grouped per day (cancelled ones left out unless asked for).
  r.get("/inspections/calendar", "fleet.read", async (req, res) => {
    const parsed = parseOr400(calendarQuery, req.query);
    const from = parsed.from ?? (parsed.to ? addDays(parsed.to, -CALENDAR_DEFAULT_DAYS) : new Date().toISOString().slice(0, 10));
    const q = { ...parsed, from, to: parsed.to ?? addDays(from, CALENDAR_DEFAULT_DAYS) };
    if (q.from > q.to) throw badRequest("Invalid range", { to: "The end comes before the start." });
    if ((Date.parse(q.to) - Date.parse(q.from)) / 86_400_000 > 400) throw badRequest("Invalid range", { to: "Ask for at most 400 days at a time." });
    const filter = { ...q, sort: "dueDate", status: q.status ?? (["planned", "in_progress", "done"] as InspectionStatus[]) };
    const rows = await applySort(applyFilters(baseQuery(db), filter, req.user!.id), "priority").orderBy("i.due_date");
    const byDay = new Map<string, Inspection[]>();
    for (const row of rows.map(toInspection)) byDay.set(row.dueDate, [...(byDay.get(row.dueDate) ?? []), row]);
    const days = [...byDay.entries()].sort(([a], [b]) => a.localeCompare(b)).map(([date, items]) => ({ date, count: items.length, items }));
    res.json({ from: q.from, to: q.to, total: rows.length, days });
  });

  // Findings that need action and have no open inspection yet, with the priority the rule would give. One row per
  // motor and kind: the latest such finding, the earlier ones of the same motor and kind folded into it (a motor that
  // went R2 → R3 → R4 needs one visit, not three). Open inspections already on the motor are given as a hint.
  r.get("/inspections/candidates", "inspections.plan", async (req, res) => {
    const siteId = req.query.siteId === undefined ? undefined : parseOr400(idParam, req.query.siteId);
    const q = db("findings as f")
      .join("assets as a", "a.id", "f.asset_id")
      .join("areas as ar", "ar.id", "a.area_id")
      .join("sites as s", "s.id", "ar.site_id")
      .whereIn("f.status", ["open", "confirmed", "remeasure"])
      // covered: an open inspection for this finding or a later one of the same motor and kind
      .whereNotExists(
        db("inspections as i")
          .join("findings as f2", "f2.id", "i.finding_id")
          .whereRaw("f2.asset_id = f.asset_id and f2.kind = f.kind and f2.created_at >= f.created_at")
          .whereIn("i.status", OPEN_STATUSES as string[]),
      )
      .select("f.*", "a.tag as asset_tag", "a.name as asset_name", "a.criticality", "s.id as site_id", "s.name as site_name", "ar.name as area_name")
      .orderBy([{ column: "f.created_at", order: "desc" }, { column: "f.id", order: "desc" }])
      .limit(500);
    if (siteId) q.where("s.id", siteId);
    const rows = await q;
    const groups = new Map<string, { lead: (typeof rows)[number]; earlier: (typeof rows)[number][] }>();
    for (const f of rows) {
      const key = `${f.asset_id}:${f.kind}`;
      const g = groups.get(key);
      if (g) g.earlier.push(f);
      else groups.set(key, { lead: f, earlier: [] });
    }
    const assetIds = [...new Set(rows.map((f) => f.asset_id as number))];
    const [latest, open] = assetIds.length
      ? await Promise.all([
          db("analyses")
            .whereIn("asset_id", assetIds)
            .where({ is_current: true })
            .distinctOn("asset_id")
            .orderBy([{ column: "asset_id" }, { column: "taken_at", order: "desc" }, { column: "id", order: "desc" }])
            .select("asset_id", "rotor_grade", "rotor_assessable", "vibration_zone"),
          db("inspections").whereIn("asset_id", assetIds).whereIn("status", OPEN_STATUSES as string[]).orderBy("due_date").select("id", "asset_id", "title", "status", db.raw("to_char(due_date, 'YYYY-MM-DD') as due_date")),
        ])
      : [[], []];
    const latestByAsset = new Map(latest.map((a) => [a.asset_id as number, a]));
    const worse = (a: string | null | undefined, b: string | null | undefined) => (!a ? b : !b ? a : a > b ? a : b); // R1<R5, A<D
    const items = [...groups.values()].map(({ lead: f, earlier }) => {
      const a = latestByAsset.get(f.asset_id);
      const grade = worse(f.kind === "rotor" ? f.level : null, a?.rotor_assessable ? a.rotor_grade : null) ?? null;
      const zone = worse(f.kind === "vibration" ? f.level : null, a?.vibration_zone) ?? null;
      return {
        findingId: f.id,
        assetId: f.asset_id,
        assetTag: f.asset_tag,
        assetName: f.asset_name,
        siteId: f.site_id,
        siteName: f.site_name,
        areaName: f.area_name,
        criticality: f.criticality,
        kind: f.kind,
        level: f.level,
        summary: f.summary,
        status: f.status,
        createdAt: f.created_at,
        rotorGrade: grade,
        vibrationZone: zone,
        condition: conditionClass(grade, zone),
        suggestedPriority: computePriority({ grade, zone, criticality: f.criticality }),
        earlierFindings: earlier.map((e) => ({ id: e.id, level: e.level, status: e.status, createdAt: e.created_at })),
        openInspections: open
          .filter((i) => i.asset_id === f.asset_id)
          .map((i) => ({ id: i.id, title: i.title, status: i.status, dueDate: i.due_date as string })),
      };
    });
    const rank = { urgent: 0, high: 1, normal: 2, low: 3 };
    items.sort((a, b) => rank[a.suggestedPriority] - rank[b.suggestedPriority]);
    res.json({ items });
  });

  r.get("/inspections.csv", "reports.read", async (req, res) => {
    const q = parseOr400(filterQuery, req.query);
    const rows = ((await applySort(applyFilters(baseQuery(db), q, req.user!.id), q.sort).limit(50_000)) as InspectionRow[]).map(toInspection);
    const csv = toCsv(
      ["id", "status", "priority", "due_date", "overdue", "site", "area", "motor_tag", "motor_name", "title", "instructions", "assignee", "finding", "outcome", "completion_note", "completed_at", "created_at"],
      rows.map((i) => [
        i.id,
        i.status,
        i.priority,
        i.dueDate,
        i.overdue ? "yes" : "no",
        i.siteName,
        i.areaName,
        i.assetTag,
        i.assetName,
        i.title,
        i.instructions,
        i.assigneeName,
        i.finding ? `${i.finding.kind} ${i.finding.level}` : "",
        i.outcome,
        i.completionNote,
        i.completedAt ? new Date(i.completedAt) : null,
        i.createdAt ? new Date(i.createdAt) : null,
      ]),
    );
    res.type("text/csv; charset=utf-8").attachment("inspections.csv").send(csv);
  });

  // A calendar file of the open plan (planned and in progress), one VEVENT per inspection; the subscription feed
  // (routes/calendar-feed.ts) serves the same calendar.
  r.get("/inspections.ics", "reports.read", async (req, res) => {
    const q = parseOr400(filterQuery, req.query);
    const ics = await planCalendar(ctx, q, req.user!.id);
    res.type("text/calendar; charset=utf-8").attachment("inspections.ics").send(ics);
  });

  r.get("/inspections/:id", "fleet.read", async (req, res) => {
    res.json(await detail(parseOr400(idParam, req.params.id)));
  });

  // --- planning ------------------------------------------------------------------------------------------

  r.post("/inspections", "inspections.plan", async (req, res) => {
    const body = parseOr400(scheduleBody, req.body);
    const asset = await db("assets").where({ id: body.assetId }).first("id", "criticality");
    if (!asset) throw badRequest("Invalid inspection", { assetId: "No such motor." });
    let finding: { id: number; asset_id: number; kind: string; level: string } | undefined;
    if (body.findingId) {
      finding = await db("findings").where({ id: body.findingId }).first("id", "asset_id", "kind", "level");
      if (!finding) throw badRequest("Invalid inspection", { findingId: "No such finding." });
      if (finding.asset_id !== body.assetId) throw badRequest("Invalid inspection", { findingId: "The finding belongs to another motor." });
      const open = await db("inspections").where({ finding_id: finding.id }).whereIn("status", OPEN_STATUSES as string[]).first("id");
      if (open) throw conflict(`Inspection #${open.id} is already open for this finding.`);
    }
    const person = await assignee(db, body.assigneeId);
    const c = await conditionOf(db, body.assetId, finding);
    const priority = body.priority ?? computePriority({ grade: c.grade, zone: c.zone, criticality: asset.criticality });

    const id = await db.transaction(async (trx) => {
      const [row] = await trx("inspections")
        .insert({
          asset_id: body.assetId,
          finding_id: finding?.id ?? null,
          title: body.title,
          instructions: body.instructions || null,
          due_date: body.dueDate,
          assignee_id: person.id,
          priority,
          status: "planned",
          created_by: req.user!.id,
        })
        .returning("id");
      await trx("inspection_events").insert({ inspection_id: row.id, by_user_id: req.user!.id, kind: "created", from_status: null, to_status: "planned", details: JSON.stringify({ dueDate: body.dueDate, assigneeId: person.id, priority }) });
      await audit(trx, {
        actor: req.user,
        action: "inspection.planned",
        subjectType: "inspection",
        subjectId: row.id,
        details: { assetId: body.assetId, findingId: finding?.id ?? null, dueDate: body.dueDate, assigneeId: person.id, priority, priorityGiven: !!body.priority },
        ip: req.ip,
      });
      return row.id as number;
    }).catch((err) => {
      // The partial unique index: someone planned the same finding a moment ago.
      if (err?.code === "23505" && String(err?.constraint ?? err?.message).includes("inspections_one_open_per_finding"))
        throw conflict("Another inspection was just planned for this finding.");
      throw err;
    });
    const out = await detail(id);
    const mailed = await mailInspection(ctx, "assigned", out, person, req.user!.name);
    publish(ctx, id);
    res.status(201).json({ ...out, mailed });
  });

  r.patch("/inspections/:id", "inspections.work", async (req, res) => {
    const id = parseOr400(idParam, req.params.id);
    const body = parseOr400(inspectionPatchBody, req.body);
    if (Object.keys(body).length === 0) throw badRequest("Nothing to change.");
    const user = req.user!;
    const planner = can(user.role, "inspections.plan");

    const result = await db.transaction(async (trx) => {
      const before = await trx("inspections").where({ id }).forUpdate().first();
      if (!before) throw notFound("No such inspection.");
      checkMayChange(user, planner, before, body);

      const changes: Record<string, unknown> = {};
      const events: Record<string, unknown>[] = [];
      const event = (e: Record<string, unknown>) => events.push({ inspection_id: id, by_user_id: user.id, from_status: before.status, to_status: before.status, ...e });
      const dueBefore: string = (await trx.raw(`select to_char(due_date, 'YYYY-MM-DD') as d from inspections where id = ?`, [id])).rows[0].d;
      const finished = before.status === "done" || before.status === "cancelled";
      const edits = PLANNER_FIELDS.filter((k) => body[k] !== undefined);
      if (finished && edits.length) throw conflict(`The inspection is ${before.status === "done" ? "done" : "cancelled"}; it can no longer be changed.`);

      let rescheduled = false;
      let reassigned: { from: number | null; to: { id: number; name: string; email: string; role: string } | null } | null = null;
      if (body.dueDate !== undefined && body.dueDate !== dueBefore) {
        // Moving it into the past is refused as on scheduling; an unchanged (overdue) date is fine.
        if (isPastDueDate(body.dueDate)) throw badRequest("Invalid inspection", { dueDate: PAST_DUE_DATE });
        changes.due_date = body.dueDate;
        rescheduled = true;
        event({ kind: "rescheduled", note: body.note ?? null, details: JSON.stringify({ from: dueBefore, to: body.dueDate }) });
      }
      if (body.assigneeId !== undefined && body.assigneeId !== before.assignee_id) {
        // null: nobody holds it until a planner gives it to someone.
        const person = body.assigneeId === null ? null : await assignee(trx, body.assigneeId);
        changes.assignee_id = person?.id ?? null;
        reassigned = { from: before.assignee_id, to: person };
        event({ kind: "reassigned", note: body.note ?? null, details: JSON.stringify({ from: before.assignee_id, to: person?.id ?? null }) });
      }
      const other: Record<string, unknown> = {};
      if (body.title !== undefined && body.title !== before.title) other.title = body.title;
      if (body.priority !== undefined && body.priority !== before.priority) other.priority = body.priority;
      if (body.instructions !== undefined && (body.instructions || null) !== before.instructions) other.instructions = body.instructions || null;
      if (Object.keys(other).length) {
        Object.assign(changes, other);
        event({ kind: "changed", details: JSON.stringify({ fields: Object.keys(other) }) });
      }

      let statusTo: InspectionStatus | null = null;
      if (body.status !== undefined) {
        assertTransition(before.status, body.status);
        statusTo = body.status;
        if (statusTo === "done") {
          const complete = completeBody.safeParse(body);
          if (!complete.success) throw badRequest("An inspection is done with an outcome and a completion note.", zodFields(complete.error));
          changes.outcome = body.outcome;
          changes.completion_note = body.completionNote;
          changes.completed_at = trx.fn.now();
        }
        changes.status = statusTo;
        event({ kind: "status", to_status: statusTo, note: body.note ?? body.completionNote ?? null });
      } else if (body.outcome !== undefined || body.completionNote !== undefined) {
        throw badRequest("Outcome and completion note go with the move to done.", { status: "Set status to done." });
      }
      if (!events.length) throw badRequest("Nothing to change: the values are the same as before.");

      // SEQUENCE (RFC 5545 §3.8.7.4) grows when the date moves or the event goes away, so calendars replace it.
      if (rescheduled || statusTo === "cancelled") changes.ics_sequence = before.ics_sequence + 1;
      changes.updated_at = trx.fn.now();
      await trx("inspections").where({ id }).update(changes);
      await trx("inspection_events").insert(events);

      const actor = { actor: user, subjectType: "inspection", subjectId: id, ip: req.ip };
      if (rescheduled) await audit(trx, { ...actor, action: "inspection.rescheduled", details: { from: dueBefore, to: body.dueDate, note: body.note ?? null } });
      if (reassigned) await audit(trx, { ...actor, action: "inspection.reassigned", details: { from: reassigned.from, to: reassigned.to?.id ?? null, note: body.note ?? null } });
      if (Object.keys(other).length) await audit(trx, { ...actor, action: "inspection.changed", details: { fields: Object.keys(other) } });
      if (statusTo)
        await audit(trx, { ...actor, action: "inspection.status", details: { from: before.status, to: statusTo, note: body.note ?? null, outcome: body.outcome ?? null } });
      return { before, dueBefore, rescheduled, reassigned, statusTo };
    });

    const out = await detail(id);
    // Tell the people whose calendar this touches; each gets at most one mail for one change.
    const mails: Promise<boolean>[] = [];
    const holder = out.assigneeId ? await db("users").where({ id: out.assigneeId }).first("id", "name", "email", "role") : null;
    if (result.reassigned) {
      if (result.reassigned.to) mails.push(mailInspection(ctx, "assigned", out, result.reassigned.to, user.name));
      if (result.reassigned.from) {
        const old = await db("users").where({ id: result.reassigned.from }).first("id", "name", "email", "role");
        if (old) mails.push(mailInspection(ctx, "unassigned", out, old, user.name));
      }
    } else if (result.statusTo === "cancelled" && holder && holder.id !== user.id) {
      mails.push(mailInspection(ctx, "cancelled", out, holder, user.name));
    } else if (result.rescheduled && holder) {
      mails.push(mailInspection(ctx, "rescheduled", out, holder, user.name, result.dueBefore));
    }
    const mailed = (await Promise.all(mails)).every(Boolean);
    publish(ctx, id);
    res.json({ ...out, mailed });
  });

  // --- attachments ---------------------------------------------------------------------------------------

  r.post("/inspections/:id/attachments", "inspections.work", async (req, _res, next) => {
    // Check who and what before reading a possibly large body.
    const id = parseOr400(idParam, req.params.id);
    const row = await db("inspections").where({ id }).first("id", "assignee_id", "status", "asset_id");
    if (!row) throw notFound("No such inspection.");
    if (!can(req.user!.role, "inspections.plan") && row.assignee_id !== req.user!.id)
      throw forbidden("Only the inspection's assignee or a planner may add files to it.");
    if (row.status === "cancelled") throw conflict("The inspection is cancelled; files can no longer be added.");
    next();
  }, attachmentUpload(Math.min(ctx.config.uploadLimitBytes, 25 * 1024 * 1024)), async (req, res) => {
    const id = Number(req.params.id);
    const file = req.file;
    if (!file) throw badRequest("Attach one file in the form field named file.", { file: "Choose a file." });
    const kind = sniffAttachment(file.buffer, file.originalname);
    if (!kind) throw new HttpError(415, "Attach a photo (PNG or JPEG) or a capture file (CSV or WAV).", undefined, "unsupported-type");
    let captureId: number | null = null;
    if (req.body?.captureId) {
      captureId = parseOr400(idParam, req.body.captureId, "Invalid capture");
      const cap = await db("captures").where({ id: captureId }).first("asset_id");
      const insp = await db("inspections").where({ id }).first("asset_id");
      if (!cap || cap.asset_id !== insp.asset_id) throw badRequest("Invalid capture", { captureId: "No such capture of this motor." });
    }
    const key = attachmentKey(id, kind.ext);
    await store.put(key, file.buffer, kind.contentType);
    try {
      const [att] = await db("inspection_attachments")
        .insert({ inspection_id: id, file_name: cleanFileName(file.originalname, kind.ext), content_type: kind.contentType, blob_key: key, byte_size: file.size, capture_id: captureId })
        .returning("*");
      await audit(db, {
        actor: req.user,
        action: "inspection.attachment-added",
        subjectType: "inspection",
        subjectId: id,
        details: { attachmentId: att.id, fileName: att.file_name, contentType: kind.contentType, size: file.size },
        ip: req.ip,
      });
      publish(ctx, id);
      res.status(201).json(toAttachment(att));
    } catch (err) {
      await store.delete(key).catch(() => {});
      throw err;
    }
  });

  r.get("/inspections/:id/attachments/:attachmentId", "fleet.read", async (req, res) => {
    const id = parseOr400(idParam, req.params.id);
    const attId = parseOr400(idParam, req.params.attachmentId);
    const att = await db("inspection_attachments").where({ id: attId, inspection_id: id }).first();
    if (!att) throw notFound("No such attachment.");
    const bytes = await store.get(att.blob_key);
    // A photo may be shown in the page (thumbnail, a new tab); everything else, and `?download=1`, is a download. The
    // type was decided from the bytes on upload, so an inline image is an image; nosniff keeps the browser to it.
    const inline = INLINE_TYPES.includes(att.content_type) && req.query.download !== "1";
    res.set("X-Content-Type-Options", "nosniff");
    res.set("Cache-Control", "private, max-age=3600");
    res.type(att.content_type);
    res.set("Content-Disposition", contentDisposition(inline ? "inline" : "attachment", att.file_name));
    res.send(bytes);
  });

  return r.router;
}

/** Planners change anything; a technician only moves an inspection assigned to them, to in progress or done. */
function checkMayChange(user: SessionUser, planner: boolean, row: { assignee_id: number | null }, body: PatchBody) {
  if (planner) return;
  if (row.assignee_id !== user.id) throw forbidden("This inspection is assigned to someone else; only its assignee or a planner may change it.");
  const plannerOnly = PLANNER_FIELDS.filter((k) => body[k] !== undefined);
  if (plannerOnly.length) throw forbidden(`Only a planner may reschedule, reassign or edit an inspection (${plannerOnly.join(", ")}).`);
  if (body.status && !TECHNICIAN_TARGETS.includes(body.status))
    throw forbidden("You may start or finish your inspections; ask a planner to cancel one.");
}
