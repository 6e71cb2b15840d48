import { conflict } from "../errors.ts";
import { INSPECTION_STATUSES } from "../../src/shared/schemas/inspections.ts";

// The inspection status workflow: planned → in_progress → done, and planned / in_progress → cancelled.
// done and cancelled are final: a finished inspection is history; new work is a new inspection.

/** The list lives with the request schemas (src/shared/schemas/inspections.ts), so the forms and the API agree. */
export const STATUSES = INSPECTION_STATUSES;
export type InspectionStatus = (typeof STATUSES)[number];

export const STATUS_LABELS: Record<InspectionStatus, string> = {
  planned: "planned",
  in_progress: "in progress",
  done: "done",
  cancelled: "cancelled",
};

export const TRANSITIONS: Record<InspectionStatus, readonly InspectionStatus[]> = {
  planned: ["in_progress", "cancelled"],
  in_progress: ["done", "cancelled"],
  done: [],
  cancelled: [],
};

/** Statuses still on someone's list (counted for overdue, exported to calendars). */
export const OPEN_STATUSES: readonly InspectionStatus[] = ["planned", "in_progress"];

/** Where a technician may move an inspection assigned to them. */
export const TECHNICIAN_TARGETS: readonly InspectionStatus[] = ["in_progress", "done"];

export function canTransition(from: InspectionStatus, to: InspectionStatus): boolean {
  return TRANSITIONS[from].includes(to);
}

/** Throw a 409 that says what is allowed from here. */
export function assertTransition(from: InspectionStatus, to: InspectionStatus): void {
  if (canTransition(from, to)) return;
  const next = TRANSITIONS[from];
  const allowed = next.length ? `From ${STATUS_LABELS[from]} it can go to ${next.map((s) => STATUS_LABELS[s]).join(" or ")}.` : `${cap(STATUS_LABELS[from])} is final.`;
  const what = from === to ? `The inspection is already ${STATUS_LABELS[from]}.` : `An inspection cannot go from ${STATUS_LABELS[from]} to ${STATUS_LABELS[to]}.`;
  throw conflict(`${what} ${allowed}`);
}

const cap = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);
