import { useQuery } from "@tanstack/react-query";
import type { Inspection } from "../../lib/contracts.ts";
import { isOverdue, todayIso } from "../../lib/inspections.ts";
import { Button } from "../../components/Button.tsx";
import { ErrorNote } from "../../components/Alert.tsx";
import { gridRange, monthGrid } from "./calendar.ts";
import { inspectionsQueryOptions } from "./api/inspections.ts";

const WEEKDAYS = ["Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"];
const MARK: Record<string, string> = { planned: "○", in_progress: "◐", done: "●", cancelled: "⊘" };

export function MonthView({ year, month, filters, onMonth, onOpen }: { year: number; month: number; filters: Record<string, string>; onMonth: (delta: number) => void; onOpen: (i: Inspection) => void }) {
  const weeks = monthGrid(year, month);
  const range = gridRange(weeks);
  const q = useQuery(inspectionsQueryOptions({ ...filters, from: range.from, to: range.to, pageSize: 200, sort: "dueDate" }));
  const byDay = new Map<string, Inspection[]>();
  for (const i of q.data?.items ?? []) {
    const d = i.dueDate.slice(0, 10);
    byDay.set(d, [...(byDay.get(d) ?? []), i]);
  }
  const today = todayIso();
  const title = new Date(year, month, 1).toLocaleDateString("en-GB", { month: "long", year: "numeric" });
  return (
    <div className="overflow-hidden rounded-md border border-line bg-surface shadow-card">
      <div className="flex items-center justify-between border-b border-line px-3 py-2">
        <Button size="sm" onClick={() => onMonth(-1)} aria-label="Previous month">‹ Previous</Button>
        <h3 className="font-semibold" aria-live="polite">{title}</h3>
        <Button size="sm" onClick={() => onMonth(1)} aria-label="Next month">Next ›</Button>
      </div>
      <ErrorNote error={q.error} />
      <div className="grid grid-cols-7 border-b border-line bg-sunken/60 text-caption font-semibold uppercase tracking-wide text-ink-muted">
        {WEEKDAYS.map((d) => (
          <div key={d} className="px-2 py-1.5">{d}</div>
        ))}
      </div>
      <div className="grid grid-cols-7" role="grid" aria-label={`Inspections due in ${title}`}>
        {weeks.flat().map((day) => {
          const items = byDay.get(day.iso) ?? [];
          return (
            <div key={day.iso} role="gridcell" className={`min-h-24 border-b border-r border-line p-1.5 [&:nth-child(7n)]:border-r-0 ${day.inMonth ? "" : "bg-canvas/70"}`}>
              <div className={`num mb-1 text-caption ${day.iso === today ? "inline-grid size-5 place-items-center rounded-full bg-brand font-semibold text-brand-ink" : day.inMonth ? "text-ink-muted" : "text-ink-faint"}`}>{day.day}</div>
              <ul className="flex flex-col gap-1">
                {items.slice(0, 4).map((i) => (
                  <li key={i.id}>
                    <button
                      type="button"
                      onClick={() => onOpen(i)}
                      title={`${i.title} · ${i.assigneeName ?? "unassigned"}`}
                      className={`w-full truncate rounded-sm border px-1 py-px text-left text-caption ${isOverdue(i) ? "border-danger/40 bg-danger-soft text-danger" : i.status === "done" ? "border-line bg-sunken text-ink-muted" : "border-brand/30 bg-brand-soft text-brand-strong"}`}
                    >
                      <span aria-hidden="true">{MARK[i.status] ?? "○"} </span>
                      <span className="num">{i.assetTag ?? `#${i.assetId}`}</span> {i.title}
                    </button>
                  </li>
                ))}
                {items.length > 4 && <li className="text-caption text-ink-muted">+{items.length - 4} more</li>}
              </ul>
            </div>
          );
        })}
      </div>
    </div>
  );
}
