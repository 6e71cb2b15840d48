// Inspection rules shared by Plan and My work: statuses, allowed moves, priorities and their suggested due dates.
import { computePriority } from "../../server/plan/priority.ts";
import { z } from "zod";
import type { InspectionStatus, Priority } from "./contracts.ts";
import { parseGrade } from "./grades.ts";

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

const idField = (msg: string) => z.preprocess((v) => (v === "" || v === undefined || v === null ? undefined : Number(v)), z.number({ message: msg }).int().positive(msg));

/** The planner's schedule form (POST /inspections). */
export const scheduleSchema = z.object({
  assetId: idField("Pick a motor."),
  findingId: z.preprocess((v) => (v === "" || v === undefined || v === null ? undefined : Number(v)), z.number().int().positive().optional()),
  title: z.string().trim().min(1, "Give the inspection a title.").max(200, "Keep the title under 200 characters."),
  instructions: z.string().trim().max(10_000, "Keep instructions under 10,000 characters."),
  dueDate: z
    .string()
    .regex(/^\d{4}-\d{2}-\d{2}$/, "Pick a due date.")
    .refine((d) => d >= todayIso(), "The due date is in the past."),
  assigneeId: idField("Pick a technician."),
  priority: z.enum(["low", "normal", "high", "urgent"], { message: "Pick a priority." }),
});
export type ScheduleInput = z.output<typeof scheduleSchema>;

export const OUTCOMES: { value: string; label: string }[] = [
  { value: "no_fault_found", label: "No fault found" },
  { value: "fault_confirmed", label: "Fault confirmed" },
  { value: "repaired", label: "Repaired on site" },
  { value: "remeasure", label: "Measure again" },
  { value: "other", label: "Other (see note)" },
];

/** The technician's completion form (PATCH /inspections/:id with status done). */
export const completeSchema = z
  .object({
    outcome: z.enum(["no_fault_found", "fault_confirmed", "repaired", "remeasure", "other"], { message: "Pick an outcome." }),
    completionNote: z.string().trim().min(1, "Say what was found and done.").max(10_000, "Keep the note under 10,000 characters."),
  });
export type CompleteInput = z.output<typeof completeSchema>;
