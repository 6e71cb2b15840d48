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

/** Parse a list query: paging fields plus the route's own filters. */
export function listQuery<S extends z.ZodRawShape>(query: unknown, filters: S) {
  return parseOr400(z.object({ ...pageFields, ...filters }), query, "Invalid list query");
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
