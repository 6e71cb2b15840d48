import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import type { Inspection } from "../../lib/contracts.ts";
import { isOverdue, STATUS_LABEL, todayIso } from "../../lib/inspections.ts";
import { formatDate } from "../../lib/format.ts";
import { Button } from "../../components/Button.tsx";
import { Dialog } from "../../components/Dialog.tsx";
import { ErrorNote } from "../../components/Alert.tsx";
import { InspectionStatusPill, PriorityTag } from "../../components/InspectionBits.tsx";
import { gridRange, monthGrid } from "./calendar.ts";
import { inspectionsQueryOptions } from "./api/inspections.ts";

const WEEKDAYS = ["Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"];
const MARK: Record<string, string> = { planned: "○", in_progress: "◐", done: "●", cancelled: "⊘" };
/** How many inspections a day's cell lists before "+N more". */
const PER_DAY = 4;

/** Overdue is not red alone: a "!" mark, and the word for screen readers and in the tooltip. */
function OverdueMark({ spoken = true }: { spoken?: boolean }) {
  return (
    <>
      <span aria-hidden="true" className="mr-0.5 inline-grid size-3.5 place-items-center rounded-full bg-danger align-[-0.15em] text-[0.625rem] font-bold leading-none text-white">!</span>
      {spoken && <span className="sr-only">Overdue: </span>}
    </>
  );
}

function itemClass(i: Inspection) {
  return isOverdue(i) ? "border-danger/40 bg-danger-soft text-danger" : i.status === "done" ? "border-line bg-sunken text-ink-muted" : "border-brand/30 bg-brand-soft text-brand-strong";
}

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
  const [day, setDay] = useState<string | null>(null);
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
                {items.slice(0, PER_DAY).map((i) => (
                  <li key={i.id}>
                    <button
                      type="button"
                      onClick={() => onOpen(i)}
                      title={`${isOverdue(i) ? "Overdue · " : ""}${i.title} · ${i.assigneeName ?? "unassigned"}`}
                      data-overdue={isOverdue(i) || undefined}
                      className={`w-full truncate rounded-sm border px-1 py-px text-left text-caption ${itemClass(i)}`}
                    >
                      {isOverdue(i) && <OverdueMark />}
                      <span aria-hidden="true">{MARK[i.status] ?? "○"} </span>
                      <span className="sr-only">{STATUS_LABEL[i.status] ?? i.status}: </span>
                      <span className="num">{i.assetTag ?? `#${i.assetId}`}</span> {i.title}
                    </button>
                  </li>
                ))}
                {items.length > PER_DAY && (
                  <li>
                    <button
                      type="button"
                      onClick={() => setDay(day.iso)}
                      aria-label={`${items.length - PER_DAY} more due on ${formatDate(day.iso)}: show all ${items.length}`}
                      className="rounded-sm px-1 text-caption font-medium text-brand-strong underline-offset-2 hover:bg-sunken hover:underline"
                    >
                      +{items.length - PER_DAY} more
                    </button>
                  </li>
                )}
              </ul>
            </div>
          );
        })}
      </div>
      <p className="flex flex-wrap gap-x-4 gap-y-1 border-t border-line px-3 py-2 text-caption text-ink-muted">
        <span><span aria-hidden="true">○</span> planned</span>
        <span><span aria-hidden="true">◐</span> in progress</span>
        <span><span aria-hidden="true">●</span> done</span>
        <span className="text-danger"><OverdueMark spoken={false} />overdue</span>
      </p>
      <DayList
        date={day}
        items={day ? (byDay.get(day) ?? []) : []}
        onClose={() => setDay(null)}
        onOpen={(i) => {
          setDay(null);
          onOpen(i);
        }}
      />
    </div>
  );
}

/** Every inspection due on one day, from the cell's "+N more". */
function DayList({ date, items, onClose, onOpen }: { date: string | null; items: Inspection[]; onClose: () => void; onOpen: (i: Inspection) => void }) {
  return (
    <Dialog open={!!date} onClose={onClose} title={date ? `Due on ${formatDate(date)}` : ""}>
      <ul className="flex flex-col gap-2" aria-label={date ? `Inspections due on ${formatDate(date)}` : undefined}>
        {items.map((i) => (
          <li key={i.id}>
            <button type="button" onClick={() => onOpen(i)} className={`flex w-full flex-wrap items-center gap-x-2 gap-y-1 rounded-md border px-2 py-1.5 text-left ${itemClass(i)}`}>
              {isOverdue(i) && <OverdueMark />}
              <span className="num font-medium">{i.assetTag ?? `#${i.assetId}`}</span>
              <span className="min-w-0 flex-1 text-ink">{i.title}</span>
              <span className="text-caption text-ink-muted">{i.assigneeName ?? "Nobody"}</span>
              <PriorityTag priority={String(i.priority)} />
              <InspectionStatusPill status={i.status} />
            </button>
          </li>
        ))}
      </ul>
    </Dialog>
  );
}
