import type { AppContext } from "../context.ts";
import { audit } from "../audit.ts";
import { buildCalendar, type IcsInspection } from "./ics.ts";
import type { Inspection } from "./store.ts";
import { inspectionLink } from "./links.ts";
import { isRole, type Role } from "../permissions.ts";

// Mail to the person who holds an inspection, with a calendar invitation they can accept into their own
// calendar. Sent after the change is committed; a mail failure is recorded, not turned into a failed change.

export type MailReason = "assigned" | "rescheduled" | "unassigned" | "cancelled";

/** "Barhound <no-reply@barhound.local>" → name and address. */
export function parseMailbox(from: string): { name: string; email: string } {
  const m = /^\s*"?([^"<]*?)"?\s*<([^>]+)>\s*$/.exec(from);
  return m ? { name: m[1] || m[2], email: m[2] } : { name: from.trim(), email: from.trim() };
}

/** Host part for calendar UIDs: the sender's domain, so UIDs stay the same for the life of a deployment. */
export function calendarDomain(ctx: AppContext): string {
  return parseMailbox(ctx.config.mailFrom).email.split("@")[1] || "barhound.local";
}

/**
 * The link to one inspection for the person who gets it (mail, calendar entry): Plan for a planner, My work for a
 * technician, the motor's page for anyone else (server/plan/links.ts).
 */
export const inspectionUrl = (ctx: AppContext, i: { id: number; assetId: number }, viewer: Role | null | undefined) => inspectionLink(ctx.config.publicUrl, viewer, i);

/** One inspection as a calendar event; its URL opens the inspection for `viewer`, the person whose calendar it goes to. */
export function icsInspection(ctx: AppContext, i: Inspection, assignee: { name: string; email: string } | null | undefined, viewer: Role | null | undefined): IcsInspection {
  return {
    id: i.id,
    title: i.title,
    instructions: i.instructions,
    dueDate: i.dueDate,
    sequence: i.sequence,
    status: i.status,
    priority: i.priority,
    assetTag: i.assetTag,
    assetName: i.assetName,
    siteName: i.siteName,
    areaName: i.areaName,
    assignee: assignee ?? null,
    updatedAt: i.updatedAt ? new Date(i.updatedAt) : undefined,
    url: inspectionUrl(ctx, i, viewer),
  };
}

const SUBJECTS: Record<MailReason, (i: Inspection) => string> = {
  assigned: (i) => `Inspection assigned: ${i.assetTag} – ${i.title} (due ${i.dueDate})`,
  rescheduled: (i) => `Inspection rescheduled: ${i.assetTag} – ${i.title} (now due ${i.dueDate})`,
  unassigned: (i) => (i.assigneeId ? `Inspection reassigned: ${i.assetTag} – ${i.title}` : `Inspection unassigned: ${i.assetTag} – ${i.title}`),
  cancelled: (i) => `Inspection cancelled: ${i.assetTag} – ${i.title}`,
};

function body(reason: MailReason, i: Inspection, to: { name: string }, by: string, link: string, previousDue?: string): string {
  const lead: Record<MailReason, string> = {
    assigned: `${by} has assigned you an inspection.`,
    rescheduled: `${by} has moved your inspection from ${previousDue ?? "its old date"} to ${i.dueDate}.`,
    unassigned: i.assigneeId
      ? `${by} has given this inspection to someone else; it is no longer on your list.`
      : `${by} has taken this inspection off your list; nobody holds it for now.`,
    cancelled: `${by} has cancelled this inspection.`,
  };
  return [
    `Hello ${to.name},`,
    "",
    lead[reason],
    "",
    `Motor: ${i.assetTag} – ${i.assetName} (${i.siteName} / ${i.areaName})`,
    `Task: ${i.title}`,
    `Due: ${i.dueDate}`,
    `Priority: ${i.priority}`,
    ...(i.instructions && reason !== "unassigned" && reason !== "cancelled" ? ["", "Instructions:", i.instructions] : []),
    "",
    "Measuring on energised equipment: qualified persons only, with the right protective equipment, following local codes and site rules.",
    "",
    link,
    "",
    "The attached calendar entry replaces any earlier one for this inspection.",
  ].join("\n");
}

export async function mailInspection(
  ctx: AppContext,
  reason: MailReason,
  i: Inspection,
  to: { id: number; name: string; email: string; role?: string | null },
  by: string,
  previousDue?: string,
): Promise<boolean> {
  const method = reason === "unassigned" || reason === "cancelled" ? "CANCEL" : "REQUEST";
  try {
    // The link (in the text and the calendar entry) opens the inspection on a screen the recipient's role may open.
    const role = to.role !== undefined ? to.role : (await ctx.db("users").where({ id: to.id }).first("role"))?.role;
    const viewer = isRole(role) ? role : null;
    // The ATTENDEE is the recipient of an invitation; a withdrawal names the one it is withdrawn from.
    const ics = buildCalendar([icsInspection(ctx, i, to, viewer)], { domain: calendarDomain(ctx), method, organizer: parseMailbox(ctx.config.mailFrom) });
    await ctx.mailer.send({
      to: to.email,
      subject: SUBJECTS[reason](i),
      text: body(reason, i, to, by, inspectionUrl(ctx, i, viewer), previousDue),
      attachments: [{ filename: `inspection-${i.id}.ics`, content: ics, contentType: `text/calendar; charset=utf-8; method=${method}` }],
    });
    return true;
  } catch (err) {
    await audit(ctx.db, {
      actorLabel: "mailer",
      action: "inspection.mail-failed",
      subjectType: "inspection",
      subjectId: i.id,
      details: { reason, to: to.email, error: String((err as Error)?.message ?? err) },
    }).catch(() => {});
    return false;
  }
}
