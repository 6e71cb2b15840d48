// The inspection plan: the request bodies of POST /api/inspections (schedule) and PATCH /api/inspections/:id
// (edit, reschedule, move, complete), and the date rule both share.
import { z } from "zod";
import { PRIORITIES } from "../../../server/plan/priority.ts"; // a pure module: the priority rule and its list

export const INSPECTION_STATUSES = ["planned", "in_progress", "done", "cancelled"] as const;
export const OUTCOMES = ["fault_confirmed", "no_fault_found", "repaired", "remeasure", "other"] as const;

const isCalendarDate = (s: string) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s);

/** A calendar date as YYYY-MM-DD (also for query parameters). */
export const isoDate = z.string({ message: "Use a date like 2026-12-24." }).regex(/^\d{4}-\d{2}-\d{2}$/, "Use a date like 2026-12-24.").refine(isCalendarDate, "Not a calendar date.");

/**
 * The earliest date that is still today somewhere (UTC−12). The server does not know the planner's time zone,
 * so it refuses only dates that are over everywhere; the form also refuses yesterday in the planner's own zone.
 */
export function earliestToday(now: number = Date.now()): string {
  return new Date(now - 12 * 3_600_000).toISOString().slice(0, 10);
}
export const PAST_DUE_DATE = "The due date is in the past.";
export const isPastDueDate = (d: string, now: number = Date.now()) => d < earliestToday(now);

/** A due date for a new inspection (or a move): a real date, not in the past. */
export const dueDate = z
  .string({ message: "Pick a due date." })
  .min(1, "Pick a due date.")
  .regex(/^\d{4}-\d{2}-\d{2}$/, "Use a date like 2026-12-24.")
  .refine(isCalendarDate, "Not a calendar date.")
  .refine((d) => !isPastDueDate(d), PAST_DUE_DATE);

const id = (message: string) => z.number({ message }).int(message).positive(message);
export const title = z.string({ message: "Give the inspection a title." }).trim().min(1, "Give the inspection a title.").max(200, "Keep the title under 200 characters.");
export const instructions = z.string({ message: "Instructions are text." }).trim().max(10_000, "Keep instructions under 10,000 characters.");
export const priority = z.enum(PRIORITIES, { message: `Pick a priority: ${PRIORITIES.join(", ")}.` });
export const outcome = z.enum(OUTCOMES, { message: "Pick an outcome." });
export const completionNote = z.string({ message: "Say what was found and done." }).trim().min(1, "Say what was found and done.").max(10_000, "Keep the note under 10,000 characters.");

/** POST /inspections. Without a priority the server suggests one from the motor's condition and criticality. */
export const scheduleBody = z.object({
  assetId: id("Pick a motor."),
  findingId: z.number({ message: "Not a finding." }).int("Not a finding.").positive("Not a finding.").nullish(),
  title,
  instructions: instructions.nullish(),
  dueDate,
  assigneeId: id("Pick a technician."),
  priority: priority.nullish(),
});
export type ScheduleBody = z.output<typeof scheduleBody>;

/**
 * PATCH /inspections/:id. The due date is checked against the past only when it moves (the route does that),
 * so an overdue inspection can still be reassigned with its date unchanged. `assigneeId: null` takes the inspection
 * off its holder's list (nobody holds it until a planner gives it to someone).
 */
export const inspectionPatchBody = z
  .object({
    title: title.optional(),
    dueDate: isoDate.optional(),
    assigneeId: id("Pick a technician.").nullable().optional(),
    priority: priority.optional(),
    instructions: instructions.nullable().optional(),
    status: z.enum(INSPECTION_STATUSES, { message: `Status must be one of ${INSPECTION_STATUSES.join(", ")}.` }).optional(),
    note: z.string({ message: "The note is text." }).trim().max(2000, "Keep the note under 2000 characters.").optional(),
    completionNote: completionNote.optional(),
    outcome: outcome.optional(),
  })
  .strict();
export type InspectionPatchBody = z.output<typeof inspectionPatchBody>;

/** What a move to done needs on top: an outcome and what was found and done. */
export const completeBody = z.object({ outcome, completionNote });
export type CompleteBody = z.output<typeof completeBody>;
