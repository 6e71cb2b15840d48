// Inspection rules shared by Plan and My work: statuses, allowed moves, priorities and their suggested due dates.
import { computePriority } from "../../server/plan/priority.ts";
import { z } from "zod";
import type { InspectionStatus, Priority } from "./contracts.ts";
import { parseGrade } from "./grades.ts";
import { inputNumber as numberInputValue, numberInput } from "./forms.ts";
import { completeBody, dueDate, inspectionPatchBody, instructions, PAST_DUE_DATE, priority, scheduleBody, type OUTCOMES as OUTCOME_VALUES } from "../shared/schemas/inspections.ts";

export const STATUS_LABEL: Record<InspectionStatus, string> = {
  planned: "Planned",
  in_progress: "In progress",
  done: "Done",
  cancelled: "Cancelled",
};

/** planned → in progress → done, and planned / in progress → cancelled. Done and cancelled are final (as on the server). */
export const TRANSITIONS: Record<InspectionStatus, InspectionStatus[]> = {
  planned: ["in_progress", "cancelled"],
  in_progress: ["done", "cancelled"],
  done: [],
  cancelled: [],
};

export const TRANSITION_LABEL: Record<string, string> = {
  "planned>in_progress": "Start",
  "planned>cancelled": "Cancel",
  "in_progress>done": "Mark done",
  "in_progress>cancelled": "Cancel",
};

export function allowedMoves(status: InspectionStatus, role: "planner" | "technician"): InspectionStatus[] {
  const moves = TRANSITIONS[status] ?? [];
  // A technician only moves their own work forward: start it, finish it.
  return role === "technician" ? moves.filter((s) => (status === "planned" && s === "in_progress") || (status === "in_progress" && s === "done")) : moves;
}

export const PRIORITIES: { value: Priority; label: string; days: number }[] = [
  { value: "urgent", label: "Urgent", days: 2 },
  { value: "high", label: "High", days: 7 },
  { value: "normal", label: "Normal", days: 21 },
  { value: "low", label: "Low", days: 42 },
];

/** A starting priority for a finding: the server's priority rule (grade or zone × criticality), so both agree. */
export function suggestPriority(finding: { kind?: string; level?: unknown; criticality?: unknown }): Priority {
  const level = typeof finding.level === "string" ? finding.level.trim().toUpperCase() : "";
  const criticality = typeof finding.criticality === "string" ? finding.criticality.trim().toLowerCase() : null;
  return computePriority(parseGrade(level) ? { grade: level, criticality } : { zone: level, criticality });
}

/** Due date (YYYY-MM-DD, local) for a priority, counted from `from`. */
export function suggestDueDate(priority: Priority, from: Date = new Date()): string {
  const days = PRIORITIES.find((p) => p.value === priority)?.days ?? 21;
  const d = new Date(from.getFullYear(), from.getMonth(), from.getDate() + days);
  const p2 = (n: number) => String(n).padStart(2, "0");
  return `${d.getFullYear()}-${p2(d.getMonth() + 1)}-${p2(d.getDate())}`;
}

export function todayIso(now: Date = new Date()): string {
  const p2 = (n: number) => String(n).padStart(2, "0");
  return `${now.getFullYear()}-${p2(now.getMonth() + 1)}-${p2(now.getDate())}`;
}

export function isOverdue(i: { dueDate: string; status: string }, now: Date = new Date()): boolean {
  return (i.status === "planned" || i.status === "in_progress") && i.dueDate.slice(0, 10) < todayIso(now);
}

/**
 * The planner's schedule form: the server's POST /inspections schema (src/shared/schemas/inspections.ts) with the
 * selects' strings as numbers. The form always sends instructions and a priority (the suggestion), and refuses
 * yesterday in the planner's own time zone too (the server only knows what is past everywhere).
 */
export const scheduleSchema = scheduleBody.extend({
  assetId: numberInput(scheduleBody.shape.assetId),
  findingId: numberInput(scheduleBody.shape.findingId),
  instructions,
  dueDate: dueDate.refine((d) => d >= todayIso(), PAST_DUE_DATE),
  assigneeId: numberInput(scheduleBody.shape.assigneeId),
  priority,
});
export type ScheduleInput = z.output<typeof scheduleSchema>;

/** The outcomes of a finished inspection (the server's list), with the words the screens show for them. */
export const OUTCOMES: { value: (typeof OUTCOME_VALUES)[number]; label: string }[] = [
  { value: "no_fault_found", label: "No fault found" },
  { value: "fault_confirmed", label: "Fault confirmed" },
  { value: "repaired", label: "Repaired on site" },
  { value: "remeasure", label: "Re-measure" },
  { value: "other", label: "Other (see note)" },
];

/**
 * The inspection a page is asked to open (`/plan?inspection=<id>`, `/my-work?inspection=<id>`: the links in mail and
 * calendar entries, server/plan/links.ts), or null when the parameter is missing or not an id.
 */
export function inspectionParam(sp: URLSearchParams): number | null {
  const v = sp.get("inspection");
  return v && /^[1-9]\d{0,14}$/.test(v) ? Number(v) : null;
}

/** An outcome's label for a screen ("remeasure" → "Re-measure"); an unknown value is shown as it is, none as "". */
export function outcomeLabel(value: string | null | undefined): string {
  if (!value) return "";
  return OUTCOMES.find((o) => o.value === value)?.label ?? value;
}

/** The due date a planner moves an inspection to: the schedule form's rule (the server's, and not before today here). */
const movedDueDate = dueDate.refine((d) => d >= todayIso(), PAST_DUE_DATE);

/**
 * The planner's reschedule / reassign form on an open inspection: the server's PATCH /inspections/:id fields with the
 * inputs' strings. A due date that moves follows the schedule rule (not in the past); the date it already has may
 * stand even when overdue, as on the server. The technician select's "" is nobody (null: off everyone's list).
 */
export function rescheduleSchema(currentDueDate: string) {
  return z.object({
    dueDate: z.string().superRefine((d, ctx) => {
      if (d === currentDueDate) return;
      const r = movedDueDate.safeParse(d);
      if (!r.success) ctx.addIssue({ code: "custom", message: r.error.issues[0]?.message ?? PAST_DUE_DATE });
    }),
    assigneeId: z.preprocess((v) => (v === "" ? null : numberInputValue(v)), inspectionPatchBody.shape.assigneeId.unwrap()),
    priority: inspectionPatchBody.shape.priority.unwrap(),
  });
}
export type RescheduleInput = z.output<ReturnType<typeof rescheduleSchema>>;

/** The technician's completion form (PATCH /inspections/:id with status done): what the server requires for done. */
export const completeSchema = completeBody;
export type CompleteInput = z.output<typeof completeSchema>;
