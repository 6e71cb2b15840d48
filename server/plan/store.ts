import type { Knex } from "knex";
import { z } from "zod";
import { PRIORITIES, PRIORITY_RANK } from "./priority.ts";
import { OPEN_STATUSES, STATUSES } from "./workflow.ts";
import { isoDate } from "../../src/shared/schemas/inspections.ts";

// Reading inspections: the one joined query every list, export and detail uses, its filters and sort,
// and the row → API shape mapping. Dates of the `date` column are read as text so no time zone shifts them.

export { isoDate };

const flag = z
  .union([z.literal("1"), z.literal("true"), z.literal("0"), z.literal("false")])
  .optional()
  .transform((v) => v === "1" || v === "true");

/** Sortable columns of the list (API name → SQL). */
const SORTS: Record<string, string> = {
  id: "i.id",
  dueDate: "i.due_date",
  status: "i.status",
  title: "i.title",
  createdAt: "i.created_at",
  updatedAt: "i.updated_at",
  assetTag: "a.tag",
  siteName: "s.name",
  assigneeName: "u.name",
  priority: `(case i.priority ${PRIORITIES.map((p) => `when '${p}' then ${PRIORITY_RANK[p]}`).join(" ")} end)`,
};

const statusList = z
  .string()
  .transform((s) => s.split(",").map((x) => x.trim()).filter(Boolean))
  .pipe(z.array(z.enum(STATUSES, { message: `Status must be one of ${STATUSES.join(", ")}.` })));

export const filterQuery = z.object({
  status: statusList.optional(),
  assigneeId: z.coerce.number().int().positive().optional(),
  assetId: z.coerce.number().int().positive().optional(),
  siteId: z.coerce.number().int().positive().optional(),
  findingId: z.coerce.number().int().positive().optional(),
  from: isoDate.optional(),
  to: isoDate.optional(),
  overdue: flag,
  mine: flag,
  open: flag,
  q: z.string().trim().max(100).optional(),
  sort: z
    .string()
    .refine((s) => s.replace(/^-/, "") in SORTS, `Sort by one of ${Object.keys(SORTS).join(", ")} (prefix - for descending).`)
    .default("dueDate"),
});
export type InspectionFilter = z.infer<typeof filterQuery>;

export const listQuery = filterQuery.extend({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});

/** Today at the motor's site, as a date: "overdue" means due before the site's own today. */
const SITE_TODAY = "(now() at time zone s.timezone)::date";
const OPEN_SQL = `i.status in (${OPEN_STATUSES.map((s) => `'${s}'`).join(",")})`;

export function baseQuery(db: Knex) {
  return db("inspections as i")
    .join("assets as a", "a.id", "i.asset_id")
    .join("areas as ar", "ar.id", "a.area_id")
    .join("sites as s", "s.id", "ar.site_id")
    .leftJoin("users as u", "u.id", "i.assignee_id")
    .leftJoin("users as c", "c.id", "i.created_by")
    .leftJoin("findings as f", "f.id", "i.finding_id")
    .select(
      "i.*",
      db.raw("to_char(i.due_date, 'YYYY-MM-DD') as due_date"),
      db.raw(`(${OPEN_SQL} and i.due_date < ${SITE_TODAY}) as overdue`),
      "a.tag as asset_tag",
      "a.name as asset_name",
      "a.criticality as asset_criticality",
      "ar.id as area_id",
      "ar.name as area_name",
      "s.id as site_id",
      "s.name as site_name",
      "s.code as site_code",
      "u.name as assignee_name",
      "u.email as assignee_email",
      "c.name as created_by_name",
      "f.kind as finding_kind",
      "f.level as finding_level",
      "f.status as finding_status",
    );
}

export function applyFilters(q: Knex.QueryBuilder, f: InspectionFilter, userId: number): Knex.QueryBuilder {
  if (f.status?.length) q.whereIn("i.status", f.status);
  if (f.open) q.whereIn("i.status", OPEN_STATUSES as string[]);
  if (f.assigneeId) q.where("i.assignee_id", f.assigneeId);
  if (f.mine) q.where("i.assignee_id", userId);
  if (f.assetId) q.where("i.asset_id", f.assetId);
  if (f.siteId) q.where("s.id", f.siteId);
  if (f.findingId) q.where("i.finding_id", f.findingId);
  if (f.from) q.where("i.due_date", ">=", f.from);
  if (f.to) q.where("i.due_date", "<=", f.to);
  if (f.overdue) q.whereRaw(`${OPEN_SQL} and i.due_date < ${SITE_TODAY}`);
  if (f.q) {
    const like = `%${f.q.replace(/[\\%_]/g, (m) => `\\${m}`)}%`;
    q.where((w) => w.whereILike("i.title", like).orWhereILike("a.tag", like).orWhereILike("a.name", like));
  }
  return q;
}

export function applySort(q: Knex.QueryBuilder, sort: string): Knex.QueryBuilder {
  const desc = sort.startsWith("-");
  const col = SORTS[sort.replace(/^-/, "")];
  return q.orderByRaw(`${col} ${desc ? "desc" : "asc"} nulls last, i.id ${desc ? "desc" : "asc"}`);
}

export type InspectionRow = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

export function toInspection(r: InspectionRow) {
  return {
    id: r.id,
    assetId: r.asset_id,
    assetTag: r.asset_tag,
    assetName: r.asset_name,
    criticality: r.asset_criticality,
    areaId: r.area_id,
    areaName: r.area_name,
    siteId: r.site_id,
    siteName: r.site_name,
    findingId: r.finding_id,
    finding: r.finding_id ? { id: r.finding_id, kind: r.finding_kind, level: r.finding_level, status: r.finding_status } : null,
    title: r.title,
    instructions: r.instructions,
    dueDate: r.due_date,
    assigneeId: r.assignee_id,
    assigneeName: r.assignee_name ?? null,
    priority: r.priority,
    status: r.status,
    overdue: !!r.overdue,
    sequence: r.ics_sequence,
    createdBy: r.created_by,
    createdByName: r.created_by_name ?? null,
    completionNote: r.completion_note,
    outcome: r.outcome,
    completedAt: r.completed_at,
    createdAt: r.created_at,
    updatedAt: r.updated_at,
  };
}
export type Inspection = ReturnType<typeof toInspection>;

export async function findInspection(db: Knex | Knex.Transaction, id: number): Promise<InspectionRow | undefined> {
  return baseQuery(db as Knex).where("i.id", id).first();
}

/** The motor's current latest analysis: the one the fleet view and the priority rule look at. */
export async function latestAnalysis(db: Knex | Knex.Transaction, assetId: number) {
  return db("analyses")
    .where({ asset_id: assetId, is_current: true })
    .orderBy([{ column: "taken_at", order: "desc" }, { column: "id", order: "desc" }])
    .first("id", "rotor_grade", "rotor_assessable", "vibration_zone", "sideband_db", "load_pct", "taken_at");
}
