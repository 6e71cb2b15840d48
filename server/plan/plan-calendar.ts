import type { AppContext } from "../context.ts";
import { buildCalendar } from "./ics.ts";
import { calendarDomain, icsInspection } from "./notify.ts";
import { isRole } from "../permissions.ts";
import { applyFilters, applySort, baseQuery, filterQuery, toInspection, type InspectionFilter, type InspectionRow } from "./store.ts";

// The open plan (planned and in progress) as one VCALENDAR with METHOD:PUBLISH, one all-day VEVENT per inspection on
// its due date. The download (GET /inspections.ics) and the subscription feed (GET /calendar/<token>.ics) both serve
// it, so a subscribed calendar holds exactly what the export gives.

const MAX_EVENTS = 10_000;
export const PLAN_CALENDAR_NAME = "Barhound inspection plan";

/** No filter at all: what the export answers without a query string. */
export const WHOLE_PLAN: InspectionFilter = filterQuery.parse({});

export async function planCalendar(
  ctx: AppContext,
  filter: InspectionFilter,
  userId: number,
  opts: { name?: string; refreshMinutes?: number } = {},
): Promise<string> {
  const [rows, viewer]: [InspectionRow[], { role?: string } | undefined] = await Promise.all([
    applySort(applyFilters(baseQuery(ctx.db), { ...filter, open: true }, userId), "dueDate").limit(MAX_EVENTS),
    ctx.db("users").where({ id: userId }).first("role"),
  ]);
  // Each event's URL opens the inspection on a screen the calendar's owner may open (server/plan/links.ts).
  const owner = viewer?.role;
  const role = isRole(owner) ? owner : null;
  const items = rows.map((row) => icsInspection(ctx, toInspection(row), row.assignee_email ? { name: row.assignee_name, email: row.assignee_email } : null, role));
  return buildCalendar(items, { domain: calendarDomain(ctx), method: "PUBLISH", name: opts.name ?? PLAN_CALENDAR_NAME, refreshMinutes: opts.refreshMinutes });
}
