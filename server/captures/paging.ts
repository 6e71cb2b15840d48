import { z } from "zod";
import type { Knex } from "knex";
import { badRequest, notFound, parseOr400 } from "../errors.ts";

// Server-side paging and sorting for list routes: `page` (1-based), `pageSize` (≤ 200), `sort` (a whitelisted
// column, "-" prefix for descending). Answers { items, total, page, pageSize }.

export const pageFields = {
  page: z.coerce.number().int().min(1, "page starts at 1").default(1),
  pageSize: z.coerce.number().int().min(1).max(200, "pageSize is at most 200").default(50),
  sort: z.string().max(60).optional(),
};

export interface Page<T> {
  items: T[];
  total: number;
  page: number;
  pageSize: number;
}

/**
 * Parse a list query: paging fields plus the route's own filters. With `strict`, a parameter the route does not
 * take is a 400 naming it (`{ "colour": "Unknown field \"colour\"." }`) instead of being dropped. A `from`/`to`
 * pair (see `timeRangeFields`) is checked to be in order.
 */
export function listQuery<S extends z.ZodRawShape>(query: unknown, filters: S, opts: { strict?: boolean } = {}) {
  const shape = z.object({ ...pageFields, ...filters });
  return parseOr400((opts.strict ? shape.strict() : shape).superRefine(rangeInOrder), query, "Invalid list query");
}

// ---- from/to filters on a timestamp column ----

const INSTANT = /^(\d{4}-\d{2}-\d{2})(?:T(\d{2}):(\d{2})(?::(\d{2})(?:\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})?)?$/;
export const TIME_PARAM_MESSAGE = "Use a date (2026-10-01) or a date and time with Z or an offset (2026-10-01T08:00:00Z).";

const isCalendarDate = (d: string) => {
  const t = Date.parse(`${d}T00:00:00Z`);
  return !Number.isNaN(t) && new Date(t).toISOString().startsWith(d);
};

/** The problem with a from/to value, or null when it is a date or an ISO 8601 date-time with Z or an offset. */
export function timeParamProblem(s: string): string | null {
  const m = INSTANT.exec(s);
  if (!m) return TIME_PARAM_MESSAGE;
  if (!isCalendarDate(m[1])) return `${m[1]} is not a calendar date.`;
  if (m[2] === undefined) return null;
  if (Number(m[2]) > 23 || Number(m[3]) > 59 || Number(m[4] ?? 0) > 59) return `Not a time of day. ${TIME_PARAM_MESSAGE}`;
  if (!m[5]) return "Give the time zone: Z for UTC or an offset such as +02:00 (2026-10-01T08:00:00Z).";
  return Number.isNaN(Date.parse(s)) ? TIME_PARAM_MESSAGE : null;
}

const isDateOnly = (s: string) => s.length === 10;
const DAY_MS = 86_400_000;

/** The first instant a `from` value takes in: the time given, or the start of the day (UTC). */
export const rangeStart = (from: string) => new Date(Date.parse(isDateOnly(from) ? `${from}T00:00:00Z` : from));
/** The instant just after the last one a `to` value takes in: a date means the whole day (UTC). Exclusive when date-only. */
function rangeEnd(to: string): { at: Date; inclusive: boolean } {
  if (isDateOnly(to)) return { at: new Date(Date.parse(`${to}T00:00:00Z`) + DAY_MS), inclusive: false };
  return { at: new Date(Date.parse(to)), inclusive: true };
}

export const timeParam = z.string().superRefine((s, ctx) => {
  const problem = timeParamProblem(s);
  if (problem) ctx.addIssue({ code: "custom", message: problem });
});

/** `from` and `to` query fields: a date takes in the whole day (UTC), a date-time is an instant (both ends included). */
export const timeRangeFields = { from: timeParam.optional(), to: timeParam.optional() };

function rangeInOrder(v: Record<string, unknown>, ctx: z.RefinementCtx) {
  if (typeof v.from !== "string" || typeof v.to !== "string") return;
  const start = rangeStart(v.from).getTime();
  const end = rangeEnd(v.to);
  if (end.inclusive ? start > end.at.getTime() : start >= end.at.getTime()) ctx.addIssue({ code: "custom", path: ["to"], message: "to is before from: give from ≤ to." });
}

/** Check a parsed from/to pair outside listQuery (a query that is not a list). */
export const timeRangeQuery = <S extends z.ZodRawShape>(fields: S) => z.object({ ...timeRangeFields, ...fields }).strict().superRefine(rangeInOrder);

/** Filter `column` to the from/to range (either may be missing). */
export function applyTimeRange(q: Knex.QueryBuilder, column: string, r: { from?: string; to?: string }) {
  if (r.from) q.where(column, ">=", rangeStart(r.from));
  if (r.to) {
    const end = rangeEnd(r.to);
    q.where(column, end.inclusive ? "<=" : "<", end.at);
  }
  return q;
}

/**
 * Order by a whitelisted column. `columns` maps API names to SQL expressions; anything else is a 400 that names
 * the columns one may sort by. `tieBreak` keeps pages stable.
 */
export function applySort(q: Knex.QueryBuilder, sort: string | undefined, columns: Record<string, string>, fallback: string, tieBreak: string) {
  const spec = sort || fallback;
  const desc = spec.startsWith("-");
  const name = desc ? spec.slice(1) : spec;
  const expr = columns[name];
  if (!expr) throw badRequest("Unknown sort column", { sort: `Sort by one of: ${Object.keys(columns).join(", ")} (prefix "-" for descending).` });
  q.orderByRaw(`${expr} ${desc ? "desc" : "asc"} nulls last, ${tieBreak} ${desc ? "desc" : "asc"}`);
  return q;
}

/** Count the filtered rows, then fetch one page. `base` carries joins and filters, no select or order. */
export async function paginate<T>(
  base: Knex.QueryBuilder,
  select: (q: Knex.QueryBuilder) => Knex.QueryBuilder,
  p: { page: number; pageSize: number },
  map: (row: any) => T,
): Promise<Page<T>> {
  const [{ count }] = await base.clone().clearSelect().clearOrder().count({ count: "*" });
  const rows = await select(base.clone()).limit(p.pageSize).offset((p.page - 1) * p.pageSize);
  return { items: rows.map(map), total: Number(count), page: p.page, pageSize: p.pageSize };
}

/** Route id parameter as a positive integer, or a 404 that names the thing. */
export function idParam(value: unknown, what: string): number {
  const id = Number(value);
  if (!Number.isInteger(id) || id <= 0 || id > 2147483647) throw notFound(`No such ${what}.`);
  return id;
}
