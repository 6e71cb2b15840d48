import type { InspectionStatus } from "../lib/contracts.ts";
import { PRIORITIES, STATUS_LABEL } from "../lib/inspections.ts";

const STATUS_STYLE: Record<InspectionStatus, string> = {
  planned: "border-line-strong bg-surface text-ink",
  in_progress: "border-brand/40 bg-brand-soft text-brand-strong",
  done: "border-ok/30 bg-ok-soft text-ok",
  cancelled: "border-line bg-sunken text-ink-faint line-through",
};
const STATUS_MARK: Record<InspectionStatus, string> = { planned: "○", in_progress: "◐", done: "●", cancelled: "⊘" };

export function InspectionStatusPill({ status }: { status: InspectionStatus | string }) {
  const s = (status in STATUS_LABEL ? status : "planned") as InspectionStatus;
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap rounded-full border px-2 py-px text-caption font-medium ${STATUS_STYLE[s]}`} data-status={s}>
      <span aria-hidden="true">{STATUS_MARK[s]}</span>
      {STATUS_LABEL[s] ?? status}
    </span>
  );
}

/** Priority as a word with 1–4 chevrons, so it reads without colour. */
export function PriorityTag({ priority }: { priority: string }) {
  const i = PRIORITIES.findIndex((p) => p.value === priority);
  const label = i >= 0 ? PRIORITIES[i].label : priority;
  const level = i >= 0 ? 4 - i : 0;
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap text-caption ${level >= 4 ? "font-semibold text-danger" : level === 3 ? "font-medium text-ink" : "text-ink-muted"}`}>
      <span aria-hidden="true" className="num tracking-tighter">{"›".repeat(Math.max(1, level))}</span>
      {label}
    </span>
  );
}
