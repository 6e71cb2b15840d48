// iCalendar (RFC 5545) for inspections: one VEVENT per inspection, all-day on its due date.
//  - content lines end in CRLF and are folded so no line is longer than 75 octets (§3.1), never inside a
//    UTF-8 sequence; continuation lines start with one space;
//  - TEXT values escape backslash, semicolon, comma and newline (§3.3.11);
//  - UID is stable per inspection and SEQUENCE grows when the due date moves or the inspection is cancelled
//    (§3.8.7.4), so a calendar replaces the event it already holds instead of adding a second one;
//  - a mail to an assignee carries METHOD:REQUEST (or CANCEL) as an iTIP message (RFC 5546), which needs
//    ORGANIZER and ATTENDEE; the subscription feed carries METHOD:PUBLISH.

const CRLF = "\r\n";
const MAX_OCTETS = 75;

/** Escape a TEXT value (RFC 5545 §3.3.11). */
export function escapeText(value: string): string {
  return value
    .replace(/\\/g, "\\\\")
    .replace(/;/g, "\\;")
    .replace(/,/g, "\\,")
    .replace(/\r\n|\r|\n/g, "\\n");
}

/** A parameter value (§3.2): quoted when it holds ':', ';' or ','; DQUOTE and control characters cannot appear. */
export function paramValue(value: string): string {
  // eslint-disable-next-line no-control-regex
  const v = value.replace(/["\u0000-\u001f\u007f]/g, "");
  return /[:;,]/.test(v) ? `"${v}"` : v;
}

/** Fold one content line at 75 octets (RFC 5545 §3.1), cutting only between UTF-8 characters. */
export function foldLine(line: string): string {
  const out: string[] = [];
  let current = "";
  let octets = 0;
  for (const ch of line) {
    const n = Buffer.byteLength(ch, "utf8");
    if (octets + n > MAX_OCTETS) {
      out.push(current);
      current = " "; // the leading space counts towards the continuation line's 75 octets
      octets = 1;
    }
    current += ch;
    octets += n;
  }
  out.push(current);
  return out.join(CRLF);
}

/** Undo folding (for tests and for reading feeds back). */
export function unfold(text: string): string {
  return text.replace(/\r\n[ \t]/g, "");
}

/** UTC DATE-TIME, form #2 of §3.3.5: 19980119T070000Z. */
export function icsDateTime(d: Date): string {
  return d.toISOString().replace(/[-:]/g, "").replace(/\.\d{3}/, "");
}

/** DATE value (§3.3.4) from an ISO date "2026-12-24". */
export function icsDate(isoDate: string): string {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(isoDate)) throw new Error(`not an ISO date: ${isoDate}`);
  return isoDate.replace(/-/g, "");
}

function nextDay(isoDate: string): string {
  const d = new Date(`${isoDate}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + 1);
  return d.toISOString().slice(0, 10);
}

export interface IcsInspection {
  id: number;
  title: string;
  instructions?: string | null;
  dueDate: string; // YYYY-MM-DD
  sequence: number;
  status: "planned" | "in_progress" | "done" | "cancelled";
  priority: "urgent" | "high" | "normal" | "low";
  assetTag: string;
  assetName: string;
  siteName?: string | null;
  areaName?: string | null;
  assignee?: { name: string; email: string } | null;
  updatedAt?: Date;
  url?: string;
}

export interface CalendarOptions {
  /** Host part of the UID, e.g. "barhound.local"; the UID is "inspection-<id>@<domain>". */
  domain: string;
  method?: "REQUEST" | "CANCEL" | "PUBLISH";
  organizer?: { name: string; email: string };
  now?: Date;
  name?: string;
  /** Subscription feeds: how often a calendar application should fetch again (RFC 7986 §5.7 REFRESH-INTERVAL). */
  refreshMinutes?: number;
}

export const inspectionUid = (id: number, domain: string) => `inspection-${id}@${domain}`;

// iCalendar PRIORITY (§3.8.1.9): 1 highest … 9 lowest, 5 medium.
const ICS_PRIORITY = { urgent: 1, high: 3, normal: 5, low: 9 } as const;

function eventLines(i: IcsInspection, opts: CalendarOptions): string[] {
  const now = opts.now ?? new Date();
  const where = [i.siteName, i.areaName].filter(Boolean).join(" / ");
  const description = [
    `Motor ${i.assetTag} – ${i.assetName}`,
    where ? `Where: ${where}` : "",
    `Priority: ${i.priority}`,
    i.instructions ? `\n${i.instructions}` : "",
    i.url ? `\n${i.url}` : "",
  ]
    .filter(Boolean)
    .join("\n");
  const cancelled = opts.method === "CANCEL" || i.status === "cancelled";
  const lines = [
    "BEGIN:VEVENT",
    `UID:${inspectionUid(i.id, opts.domain)}`,
    `SEQUENCE:${i.sequence}`,
    `DTSTAMP:${icsDateTime(now)}`,
    `DTSTART;VALUE=DATE:${icsDate(i.dueDate)}`,
    `DTEND;VALUE=DATE:${icsDate(nextDay(i.dueDate))}`,
    `SUMMARY:${escapeText(`${i.assetTag}: ${i.title}`)}`,
    `DESCRIPTION:${escapeText(description)}`,
    ...(where ? [`LOCATION:${escapeText(where)}`] : []),
    `PRIORITY:${ICS_PRIORITY[i.priority]}`,
    `STATUS:${cancelled ? "CANCELLED" : "CONFIRMED"}`,
    "TRANSP:TRANSPARENT",
    ...(i.updatedAt ? [`LAST-MODIFIED:${icsDateTime(i.updatedAt)}`] : []),
    ...(i.url ? [`URL:${i.url}`] : []),
  ];
  if (opts.organizer) lines.push(`ORGANIZER;CN=${paramValue(opts.organizer.name)}:mailto:${opts.organizer.email}`);
  if (i.assignee && opts.method && opts.method !== "PUBLISH")
    lines.push(`ATTENDEE;CN=${paramValue(i.assignee.name)};ROLE=REQ-PARTICIPANT;PARTSTAT=NEEDS-ACTION;RSVP=FALSE:mailto:${i.assignee.email}`);
  lines.push("END:VEVENT");
  return lines;
}

/** A whole VCALENDAR object with one VEVENT per inspection, folded, CRLF line endings. */
export function buildCalendar(items: IcsInspection[], opts: CalendarOptions): string {
  const lines = ["BEGIN:VCALENDAR", "VERSION:2.0", "PRODID:-//Barhound//Inspection plan//EN", "CALSCALE:GREGORIAN"];
  if (opts.method) lines.push(`METHOD:${opts.method}`);
  if (opts.name) lines.push(`NAME:${escapeText(opts.name)}`, `X-WR-CALNAME:${escapeText(opts.name)}`); // RFC 7986 §5.1; X-WR-CALNAME: common practice
  if (opts.refreshMinutes) {
    const every = `PT${Math.max(1, Math.round(opts.refreshMinutes))}M`;
    // X-PUBLISHED-TTL is the older, non-standard spelling that many calendar applications read (common practice).
    lines.push(`REFRESH-INTERVAL;VALUE=DURATION:${every}`, `X-PUBLISHED-TTL:${every}`);
  }
  for (const i of items) lines.push(...eventLines(i, opts));
  lines.push("END:VCALENDAR");
  return lines.map(foldLine).join(CRLF) + CRLF;
}
