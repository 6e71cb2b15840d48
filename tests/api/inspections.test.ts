import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import os from "node:os";
import fs from "node:fs";
import path from "node:path";
import { makeTestEnv, signedIn, demoUser, waitForMail, type TestEnv } from "../helpers/context.ts";
import { contentLines, unescapeText, vevents } from "../helpers/ics.ts";
import { routeRegistry } from "../../server/http.ts";
import { can, ROLES, type Permission, type Role } from "../../server/permissions.ts";
import { computePriority, PRIORITY_TABLE } from "../../server/plan/priority.ts";
import { canTransition, STATUSES } from "../../server/plan/workflow.ts";
import { csvField, toCsv } from "../../server/plan/csv.ts";
import { buildCalendar, escapeText, foldLine } from "../../server/plan/ics.ts";
import { sniffAttachment } from "../../server/plan/attachments.ts";
import { permissionsOf } from "../../server/permissions.ts";
import { visibleNav } from "../../src/app/nav.ts";

// Inspection plan: priority rule, workflow, who may do what, assignment mail with calendar invitations, exports.
// Fixture rows carry the tag prefix "INSPT-" so they do not meet other test files' rows in the shared database.

let env: TestEnv;
let dataDir: string;
const agents = {} as Record<Role, request.Agent>;
const ids = { site: 0, area: 0, high: 0, medium: 0, low: 0, otherTech: 0, tech: 0, planner: 0, findingR5: 0, findingZoneC: 0 };

// ---------------------------------------------------------------------------------------------------------
// Helpers: an independent reading of the formats (not the server's own code) so the tests check the RFCs
// (RFC 5545 in tests/helpers/ics.ts).

/** RFC 4180 parser: quoted fields may hold commas, doubled quotes and line breaks. */
function parseCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let field = "";
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') (field += '"'), i++;
      else if (ch === '"') quoted = false;
      else field += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ",") row.push(field), (field = "");
    else if (ch === "\r" && text[i + 1] === "\n") (row.push(field), rows.push(row), (row = []), (field = "")), i++;
    else field += ch;
  }
  if (field || row.length) row.push(field), rows.push(row);
  return rows;
}

/** The one app link in a mail's text. */
const linkIn = (text: string) => {
  const m = text.match(/^https?:\/\/\S+$/m);
  expect(m, "a link in the mail").toBeTruthy();
  return m![0];
};
/** Whether a role's navigation (src/app/nav.ts, by the permission module) has the screen a link opens. */
const roleOpens = (role: Role, url: string) => {
  const { pathname } = new URL(url);
  return visibleNav(permissionsOf(role)).some((n) => pathname === n.to || pathname.startsWith(`${n.to}/`));
};
const appPath = (url: string) => {
  const u = new URL(url);
  return u.pathname + u.search;
};

const isoDay = (offsetDays: number) => new Date(Date.now() + offsetDays * 86_400_000).toISOString().slice(0, 10);
const attachmentsOf = (mail: { attachments: { filename: string; contentType: string; content: string }[] }) => mail.attachments ?? [];
function icsOf(mail: { attachments: { filename: string; contentType: string; content: string }[] }) {
  const a = attachmentsOf(mail).find((x) => x.filename.endsWith(".ics"));
  expect(a, "an .ics attachment").toBeTruthy();
  expect(a!.contentType).toMatch(/^text\/calendar/);
  return Buffer.from(a!.content, "base64").toString("utf8");
}

async function analysis(assetId: number, o: { grade?: string | null; zone?: string | null; db?: number | null; load?: number | null; at?: Date }) {
  const at = o.at ?? new Date();
  const [cap] = await env.db("captures").insert({ asset_id: assetId, taken_at: at, source: "upload", status: "analysed", format: "csv" }).returning("id");
  const [an] = await env
    .db("analyses")
    .insert({
      capture_id: cap.id,
      asset_id: assetId,
      version: 1,
      engine_version: "test",
      nameplate_version: 1,
      params: "{}",
      result: "{}",
      taken_at: at,
      rotor_grade: o.grade ?? null,
      rotor_assessable: !!o.grade,
      sideband_db: o.db ?? null,
      load_pct: o.load ?? null,
      vibration_zone: o.zone ?? null,
    })
    .returning("id");
  return { captureId: cap.id as number, analysisId: an.id as number };
}

async function finding(assetId: number, kind: "rotor" | "vibration", level: string) {
  const a = await analysis(assetId, kind === "rotor" ? { grade: level, db: 34, load: 80 } : { zone: level, load: 80 });
  const [f] = await env
    .db("findings")
    .insert({ asset_id: assetId, analysis_id: a.analysisId, capture_id: a.captureId, kind, level, summary: `${kind} ${level}`, status: "confirmed" })
    .returning("id");
  return f.id as number;
}

async function plan(body: Record<string, unknown>) {
  const res = await agents.planner.post("/api/inspections").send({ assetId: ids.medium, title: "Check rotor", dueDate: isoDay(14), assigneeId: ids.tech, ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body;
}

beforeAll(async () => {
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "bh-insp-"));
  env = await makeTestEnv({ loginRateLimit: 1000, dataDir, uploadLimitBytes: 64 * 1024 });
  for (const role of ROLES) agents[role] = await signedIn(env.app, role);
  const db = env.db;
  const [site] = await db("sites").insert({ code: "INSPT", name: "Inspection Test Works", timezone: "UTC" }).returning("id");
  const [area] = await db("areas").insert({ site_id: site.id, name: "Cooling water" }).returning("id");
  ids.site = site.id;
  ids.area = area.id;
  const motor = (tag: string, criticality: string) => ({ area_id: area.id, tag, name: `Pump ${tag}`, criticality, rated_rpm: 1480, poles: 4, rated_kw: 90 });
  const rows = await db("assets").insert([motor("INSPT-H1", "high"), motor("INSPT-M1", "medium"), motor("INSPT-L1", "low")]).returning(["id", "tag"]);
  ids.high = rows.find((r) => r.tag === "INSPT-H1")!.id;
  ids.medium = rows.find((r) => r.tag === "INSPT-M1")!.id;
  ids.low = rows.find((r) => r.tag === "INSPT-L1")!.id;
  const [other] = await db("users").insert({ email: "other.tech.inspt@northwend.example", name: "Arvid Lund", role: "technician", active: true }).returning("id");
  ids.otherTech = other.id;
  ids.tech = (await db("users").where({ email: demoUser("technician").email }).first("id")).id;
  ids.planner = (await db("users").where({ email: demoUser("planner").email }).first("id")).id;
  ids.findingR5 = await finding(ids.high, "rotor", "R5");
  ids.findingZoneC = await finding(ids.low, "vibration", "C");
});
afterAll(async () => {
  await env.close();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

// ---------------------------------------------------------------------------------------------------------

describe("priority rule (grade × criticality)", () => {
  // The table from server/plan/priority.ts, cell by cell: [grade, zone, criticality, expected].
  const cases: [string | null, string | null, string, string][] = [
    ["R5", null, "high", "urgent"], ["R5", null, "medium", "urgent"], ["R5", null, "low", "high"],
    [null, "D", "high", "urgent"], [null, "D", "medium", "urgent"], [null, "D", "low", "high"],
    ["R4", null, "high", "urgent"], ["R4", null, "medium", "high"], ["R4", null, "low", "normal"],
    [null, "C", "high", "urgent"], [null, "C", "medium", "high"], [null, "C", "low", "normal"],
    ["R3", null, "high", "high"], ["R3", null, "medium", "normal"], ["R3", null, "low", "low"],
    [null, "B", "high", "high"], [null, "B", "medium", "normal"], [null, "B", "low", "low"],
    ["R2", "A", "high", "normal"], ["R1", null, "medium", "low"], [null, null, "low", "low"], [null, null, "high", "normal"],
    // the worse of grade and zone decides
    ["R2", "D", "medium", "urgent"], ["R5", "A", "low", "high"], ["R3", "C", "low", "normal"],
  ];
  it.each(cases)("grade %s, zone %s, criticality %s → %s", (grade, zone, criticality, expected) => {
    expect(computePriority({ grade, zone, criticality })).toBe(expected);
  });

  it("treats an unknown criticality as medium and covers every cell of the table", () => {
    expect(computePriority({ grade: "R4", criticality: "bogus" })).toBe("high");
    expect(Object.keys(PRIORITY_TABLE)).toEqual(["severe", "serious", "developing", "minor"]);
  });

  it("the API computes the priority from the finding and the motor's criticality unless one is given", async () => {
    const a = await plan({ assetId: ids.high, findingId: ids.findingR5, title: "INSPT prio high R5" });
    expect(a.priority).toBe("urgent");
    const b = await plan({ assetId: ids.low, findingId: ids.findingZoneC, title: "INSPT prio low C" });
    expect(b.priority).toBe("normal");
    const c = await plan({ assetId: ids.low, title: "INSPT prio given", priority: "high" });
    expect(c.priority).toBe("high");
    // the finding already has an open inspection: a second one is a conflict
    const dup = await agents.planner.post("/api/inspections").send({ assetId: ids.high, findingId: ids.findingR5, title: "again", dueDate: isoDay(3), assigneeId: ids.tech });
    expect(dup.status).toBe(409);
    expect(dup.body.error).toMatch(/already open/);
  });

  it("rejects bad input with field messages", async () => {
    const res = await agents.planner.post("/api/inspections").send({ assetId: ids.medium, title: "", dueDate: "2026-02-30", assigneeId: ids.tech, priority: "asap" });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.fields)).toEqual(expect.arrayContaining(["title", "dueDate", "priority"]));
    const wrongFinding = await agents.planner.post("/api/inspections").send({ assetId: ids.medium, findingId: ids.findingR5, title: "x", dueDate: isoDay(3), assigneeId: ids.tech });
    expect(wrongFinding.status).toBe(400);
    expect(wrongFinding.body.fields.findingId).toMatch(/another motor/);
    const analyst = (await env.db("users").where({ email: demoUser("analyst").email }).first("id")).id;
    const notWorker = await agents.planner.post("/api/inspections").send({ assetId: ids.medium, title: "x", dueDate: isoDay(3), assigneeId: analyst });
    expect(notWorker.status).toBe(400);
    expect(notWorker.body.fields.assigneeId).toMatch(/technician or planner/);
  });

  it("refuses a due date in the past when scheduling and when moving one, but lets an overdue date stand", async () => {
    const past = await agents.planner.post("/api/inspections").send({ assetId: ids.medium, title: "INSPT past", dueDate: isoDay(-3), assigneeId: ids.tech });
    expect(past.status).toBe(400);
    expect(past.body.fields).toEqual({ dueDate: "The due date is in the past." });

    const i = await plan({ title: "INSPT past move", dueDate: isoDay(2) });
    const back = await agents.planner.patch(`/api/inspections/${i.id}`).send({ dueDate: isoDay(-3) });
    expect(back.status).toBe(400);
    expect(back.body.fields).toEqual({ dueDate: "The due date is in the past." });
    expect((await env.db("inspection_events").where({ inspection_id: i.id, kind: "rescheduled" })).length).toBe(0);

    // Overdue already: the same date comes back with other edits (the Plan dialog sends it) and is accepted.
    await env.db("inspections").where({ id: i.id }).update({ due_date: isoDay(-3) });
    const edit = await agents.planner.patch(`/api/inspections/${i.id}`).send({ dueDate: isoDay(-3), priority: "urgent" });
    expect(edit.status, JSON.stringify(edit.body)).toBe(200);
    expect(edit.body).toMatchObject({ dueDate: isoDay(-3), priority: "urgent" });
    // Out of the way of the list tests' overdue count.
    expect((await agents.planner.patch(`/api/inspections/${i.id}`).send({ status: "cancelled" })).status).toBe(200);
  });
});

describe("candidates", () => {
  it("lists findings needing action without an open inspection, with the suggested priority", async () => {
    const fresh = await finding(ids.medium, "rotor", "R4");
    const res = await agents.planner.get(`/api/inspections/candidates?siteId=${ids.site}`);
    expect(res.status).toBe(200);
    const c = res.body.items.find((x: { findingId: number }) => x.findingId === fresh);
    expect(c).toMatchObject({ assetTag: "INSPT-M1", level: "R4", suggestedPriority: "high" });
    expect(res.body.items.some((x: { findingId: number }) => x.findingId === ids.findingR5)).toBe(false);
  });

  it("folds a motor's successive findings of one kind into one row; one inspection covers them all", async () => {
    const [m] = await env.db("assets").insert({ area_id: ids.area, tag: "INSPT-F1", name: "Pump INSPT-F1", criticality: "medium", rated_rpm: 1480, poles: 4, rated_kw: 90 }).returning("id");
    const r2 = await finding(m.id, "rotor", "R2");
    const r3 = await finding(m.id, "rotor", "R3");
    const zoneC = await finding(m.id, "vibration", "C");
    type Candidate = { findingId: number; assetId: number; kind: string; earlierFindings: { id: number; level: string }[]; openInspections: { id: number; title: string; status: string; dueDate: string }[] };
    const mine = async () => ((await agents.planner.get(`/api/inspections/candidates?siteId=${ids.site}`)).body.items as Candidate[]).filter((c) => c.assetId === m.id);
    let rows = await mine();
    expect(rows.map((c) => [c.kind, c.findingId]).sort()).toEqual([["rotor", r3], ["vibration", zoneC]]);
    expect(rows.find((c) => c.kind === "rotor")!.earlierFindings).toMatchObject([{ id: r2, level: "R2" }]);
    expect(rows.every((c) => c.openInspections.length === 0)).toBe(true);

    // An inspection for the latest rotor finding covers the earlier one too; the vibration finding still waits.
    const i = await plan({ assetId: m.id, findingId: r3, title: "Rotor check INSPT-F1" });
    rows = await mine();
    expect(rows.map((c) => c.findingId)).toEqual([zoneC]);
    expect(rows[0].openInspections).toEqual([{ id: i.id, title: "Rotor check INSPT-F1", status: "planned", dueDate: isoDay(14) }]);

    // A later, worse rotor finding needs a decision again, with the inspection already planned as a hint.
    const r4 = await finding(m.id, "rotor", "R4");
    rows = await mine();
    const rotor = rows.find((c) => c.kind === "rotor")!;
    expect(rotor).toMatchObject({ findingId: r4, earlierFindings: [], openInspections: [{ id: i.id }] });
    expect((await agents.planner.patch(`/api/inspections/${i.id}`).send({ status: "cancelled" })).status).toBe(200);
  });
});

describe("status workflow", () => {
  it("allows exactly planned → in_progress → done and planned/in_progress → cancelled", () => {
    const legal = new Set(["planned>in_progress", "planned>cancelled", "in_progress>done", "in_progress>cancelled"]);
    for (const from of STATUSES) for (const to of STATUSES) expect(canTransition(from, to), `${from} → ${to}`).toBe(legal.has(`${from}>${to}`));
  });

  it("walks an inspection through its states with history, and answers illegal moves with 409", async () => {
    const i = await plan({ title: "INSPT workflow" });
    const skip = await agents.technician.patch(`/api/inspections/${i.id}`).send({ status: "done", outcome: "repaired", completionNote: "x" });
    expect(skip.status).toBe(409);
    expect(skip.body.error).toMatch(/cannot go from planned to done.*in progress or cancelled/i);

    const start = await agents.technician.patch(`/api/inspections/${i.id}`).send({ status: "in_progress", note: "On site" });
    expect(start.status).toBe(200);
    expect(start.body.status).toBe("in_progress");

    const noOutcome = await agents.technician.patch(`/api/inspections/${i.id}`).send({ status: "done" });
    expect(noOutcome.status).toBe(400);
    expect(Object.keys(noOutcome.body.fields)).toEqual(expect.arrayContaining(["outcome", "completionNote"]));

    const done = await agents.technician.patch(`/api/inspections/${i.id}`).send({ status: "done", outcome: "fault_confirmed", completionNote: "Two cracked bars at the end ring." });
    expect(done.status).toBe(200);
    expect(done.body).toMatchObject({ status: "done", outcome: "fault_confirmed", completionNote: "Two cracked bars at the end ring." });
    expect(done.body.completedAt).toBeTruthy();

    for (const to of ["in_progress", "cancelled", "planned", "done"]) {
      const res = await agents.planner.patch(`/api/inspections/${i.id}`).send({ status: to, outcome: "other", completionNote: "again" });
      expect(res.status, `done → ${to}`).toBe(409);
      expect(res.body.error).toMatch(/final|already done/);
    }
    const edit = await agents.planner.patch(`/api/inspections/${i.id}`).send({ dueDate: isoDay(30) });
    expect(edit.status).toBe(409);

    const events = await env.db("inspection_events").where({ inspection_id: i.id, kind: "status" }).orderBy("id");
    expect(events.map((e) => [e.from_status, e.to_status, e.by_user_id])).toEqual([
      ["planned", "in_progress", ids.tech],
      ["in_progress", "done", ids.tech],
    ]);
    expect(events[0].note).toBe("On site");
    const detail = await agents.manager.get(`/api/inspections/${i.id}`);
    expect(detail.body.events.map((e: { kind: string }) => e.kind)).toEqual(["created", "status", "status"]);
    expect(detail.body.events[1]).toMatchObject({ from: "planned", to: "in_progress", byName: demoUser("technician").name });
    const audits = await env.db("audit_log").where({ subject_type: "inspection", subject_id: String(i.id) }).orderBy("id").pluck("action");
    expect(audits).toEqual(["inspection.planned", "inspection.status", "inspection.status"]);
  });

  it("a planner cancels from planned or in progress; cancelled is final", async () => {
    const a = await plan({ title: "INSPT cancel planned" });
    const c = await agents.planner.patch(`/api/inspections/${a.id}`).send({ status: "cancelled", note: "Motor replaced" });
    expect(c.status).toBe(200);
    expect(c.body.sequence).toBe(1); // a cancelled VEVENT must carry a higher SEQUENCE
    const again = await agents.planner.patch(`/api/inspections/${a.id}`).send({ status: "in_progress" });
    expect(again.status).toBe(409);
    expect(again.body.error).toMatch(/cancelled is final/i);
    const b = await plan({ title: "INSPT cancel running" });
    await agents.technician.patch(`/api/inspections/${b.id}`).send({ status: "in_progress" });
    expect((await agents.planner.patch(`/api/inspections/${b.id}`).send({ status: "cancelled" })).status).toBe(200);
    const mail = await waitForMail(env.db, demoUser("technician").email, "Inspection cancelled: INSPT-M1 – INSPT cancel running%");
    const [ev] = vevents(icsOf(mail));
    expect(ev.STATUS).toBe("CANCELLED");
    expect(contentLines(icsOf(mail))).toContain("METHOD:CANCEL");
  });
});

describe("who may move an inspection", () => {
  it("a technician cannot move someone else's inspection (403)", async () => {
    const i = await plan({ title: "INSPT other", assigneeId: ids.otherTech });
    const res = await agents.technician.patch(`/api/inspections/${i.id}`).send({ status: "in_progress" });
    expect(res.status).toBe(403);
    expect(res.body.error).toMatch(/assigned to someone else/);
    const file = await agents.technician.post(`/api/inspections/${i.id}/attachments`).attach("file", PNG, "photo.png");
    expect(file.status).toBe(403);
    expect((await env.db("inspections").where({ id: i.id }).first()).status).toBe("planned");
  });

  it("a technician may not reschedule, reassign or cancel their own inspection (403)", async () => {
    const i = await plan({ title: "INSPT own" });
    for (const body of [{ dueDate: isoDay(40) }, { assigneeId: ids.otherTech }, { priority: "urgent" }, { status: "cancelled" }]) {
      const res = await agents.technician.patch(`/api/inspections/${i.id}`).send(body);
      expect(res.status, JSON.stringify(body)).toBe(403);
    }
  });

  it("other roles cannot plan or move inspections at all (403), nobody without a session (401)", async () => {
    const i = await plan({ title: "INSPT roles" });
    for (const role of ["analyst", "manager", "admin"] as Role[]) {
      expect((await agents[role].patch(`/api/inspections/${i.id}`).send({ status: "in_progress" })).status, role).toBe(403);
      expect((await agents[role].post("/api/inspections").send({})).status, role).toBe(403);
    }
    expect((await agents.technician.post("/api/inspections").send({})).status).toBe(403);
    expect((await request(env.app).patch(`/api/inspections/${i.id}`).send({ status: "in_progress" })).status).toBe(401);
  });
});

describe("assignment and reschedule mail", () => {
  it("mails the assignee an .ics invitation, then a replacement with SEQUENCE + 1 on reschedule", async () => {
    const due = isoDay(10);
    const i = await plan({ title: "INSPT mail; check, bars", dueDate: due, instructions: "Measure at > 70 % load.\nPhase A and B." });
    expect(i.mailed).toBe(true);
    const first = await waitForMail(env.db, demoUser("technician").email, "Inspection assigned: INSPT-M1 – INSPT mail; check, bars%");
    expect(first.text_body).toContain("Measure at > 70 % load.");
    const ics1 = icsOf(first);
    expect(ics1).toMatch(/\r\n$/);
    expect(ics1.replace(/\r\n/g, "")).not.toMatch(/[\r\n]/); // RFC 5545 §3.1: every line ends in CRLF
    const lines = contentLines(ics1);
    expect(lines).toContain("METHOD:REQUEST");
    const [ev1] = vevents(ics1);
    expect(ev1.UID).toBe(`inspection-${i.id}@barhound.local`);
    expect(ev1.SEQUENCE).toBe("0");
    expect(ev1["DTSTART;VALUE=DATE"]).toBe(due.replace(/-/g, ""));
    expect(unescapeText(ev1.SUMMARY)).toBe("INSPT-M1: INSPT mail; check, bars");
    expect(ev1.SUMMARY).toBe("INSPT-M1: INSPT mail\\; check\\, bars"); // §3.3.11 escaping
    expect(unescapeText(ev1.DESCRIPTION)).toContain("Measure at > 70 % load.\nPhase A and B.");
    expect(Object.keys(ev1).some((k) => k.startsWith("ATTENDEE") && ev1[k] === `mailto:${demoUser("technician").email}`)).toBe(true);
    expect(ev1.DTSTAMP).toMatch(/^\d{8}T\d{6}Z$/);

    const newDue = isoDay(17);
    const moved = await agents.planner.patch(`/api/inspections/${i.id}`).send({ dueDate: newDue, note: "Shutdown moved" });
    expect(moved.status).toBe(200);
    expect(moved.body.sequence).toBe(1);
    const second = await waitForMail(env.db, demoUser("technician").email, "Inspection rescheduled: INSPT-M1 – INSPT mail; check, bars%");
    expect(second.text_body).toContain(`from ${due} to ${newDue}`);
    const [ev2] = vevents(icsOf(second));
    expect(ev2.UID).toBe(ev1.UID);
    expect(ev2.SEQUENCE).toBe("1");
    expect(ev2["DTSTART;VALUE=DATE"]).toBe(newDue.replace(/-/g, ""));
    expect(await env.db("audit_log").where({ action: "inspection.rescheduled", subject_id: String(i.id) }).first()).toMatchObject({
      details: { from: due, to: newDue, note: "Shutdown moved" },
    });
    const ev = await env.db("inspection_events").where({ inspection_id: i.id, kind: "rescheduled" }).first();
    expect(ev.details).toEqual({ from: due, to: newDue });

    // a second reschedule: SEQUENCE 2
    await agents.planner.patch(`/api/inspections/${i.id}`).send({ dueDate: isoDay(20) });
    const third = await waitForMail(env.db, demoUser("technician").email, `Inspection rescheduled: %(now due ${isoDay(20)})`);
    expect(vevents(icsOf(third))[0].SEQUENCE).toBe("2");
  });

  it("reassigning invites the new assignee and withdraws the event from the old one", async () => {
    const i = await plan({ title: "INSPT reassign" });
    const res = await agents.planner.patch(`/api/inspections/${i.id}`).send({ assigneeId: ids.otherTech });
    expect(res.status).toBe(200);
    expect(res.body.assigneeName).toBe("Arvid Lund");
    const invite = await waitForMail(env.db, "other.tech.inspt@northwend.example", "Inspection assigned: INSPT-M1 – INSPT reassign%");
    expect(vevents(icsOf(invite))[0].UID).toBe(`inspection-${i.id}@barhound.local`);
    const withdrawn = await waitForMail(env.db, demoUser("technician").email, "Inspection reassigned: INSPT-M1 – INSPT reassign%");
    expect(contentLines(icsOf(withdrawn))).toContain("METHOD:CANCEL");
    expect(await env.db("audit_log").where({ action: "inspection.reassigned", subject_id: String(i.id) }).first()).toBeTruthy();
  });

  it("the mail's link and its calendar entry's URL open the inspection on a screen the recipient's role may open", async () => {
    const i = await plan({ title: "INSPT link target" });
    // technician: My work (Plan is not theirs: "Not available to your role")
    const invite = await waitForMail(env.db, demoUser("technician").email, "Inspection assigned: INSPT-M1 – INSPT link target%");
    const link = linkIn(invite.text_body);
    expect(appPath(link)).toBe(`/my-work?inspection=${i.id}`);
    expect(roleOpens("technician", link)).toBe(true);
    expect(roleOpens("technician", link.replace("/my-work", "/plan"))).toBe(false); // the old link was a dead end
    const [ev] = vevents(icsOf(invite));
    expect(ev.URL).toBe(link);
    expect(unescapeText(ev.DESCRIPTION)).toContain(link);

    // given to a planner: Plan, which opens the dialog from ?inspection=; the technician's withdrawal still opens on My work
    const moved = await agents.planner.patch(`/api/inspections/${i.id}`).send({ assigneeId: ids.planner });
    expect(moved.status).toBe(200);
    const plannerMail = await waitForMail(env.db, demoUser("planner").email, "Inspection assigned: INSPT-M1 – INSPT link target%");
    expect(appPath(linkIn(plannerMail.text_body))).toBe(`/plan?inspection=${i.id}`);
    expect(roleOpens("planner", linkIn(plannerMail.text_body))).toBe(true);
    expect(vevents(icsOf(plannerMail))[0].URL).toBe(linkIn(plannerMail.text_body));
    const withdrawn = await waitForMail(env.db, demoUser("technician").email, "Inspection reassigned: INSPT-M1 – INSPT link target%");
    expect(appPath(linkIn(withdrawn.text_body))).toBe(`/my-work?inspection=${i.id}`);
    expect(vevents(icsOf(withdrawn))[0].URL).toBe(linkIn(withdrawn.text_body));

    // the export's events link for whoever downloads it: a manager has neither Plan nor My work, so the motor's page
    const urlFor = async (role: Role) => {
      const res = await agents[role].get(`/api/inspections.ics?siteId=${ids.site}`).buffer(true).parse((r, cb) => {
        let t = "";
        r.on("data", (c: Buffer) => (t += c.toString("utf8")));
        r.on("end", () => cb(null, t));
      });
      expect(res.status).toBe(200);
      return vevents(res.body as string).find((e) => e.UID === `inspection-${i.id}@barhound.local`)!.URL;
    };
    for (const [role, path] of [["planner", `/plan?inspection=${i.id}`], ["manager", `/motors/${ids.medium}`], ["admin", `/motors/${ids.medium}`]] as const) {
      const url = await urlFor(role);
      expect(appPath(url), role).toBe(path);
      expect(roleOpens(role, url), role).toBe(true);
    }
    // and a technician's subscribed calendar (own inspections) links to My work
    await agents.planner.patch(`/api/inspections/${i.id}`).send({ assigneeId: ids.tech });
    const feed = await agents.technician.post("/api/calendar-feed");
    expect(feed.status).toBe(201);
    const ics = await request(env.app).get(new URL(feed.body.url).pathname);
    expect(ics.status).toBe(200);
    const feedUrl = vevents(ics.text).find((e) => e.UID === `inspection-${i.id}@barhound.local`)!.URL;
    expect(appPath(feedUrl)).toBe(`/my-work?inspection=${i.id}`);
    await agents.technician.delete("/api/calendar-feed");
  });

  it("a planner unassigns (Nobody): the holder's event is withdrawn, it is audited and the history names who lost it", async () => {
    const i = await plan({ title: "INSPT unassign" });
    // only a planner; and 0 is still not a person
    expect((await agents.technician.patch(`/api/inspections/${i.id}`).send({ assigneeId: null })).status).toBe(403);
    expect((await agents.planner.patch(`/api/inspections/${i.id}`).send({ assigneeId: 0 })).status).toBe(400);

    const res = await agents.planner.patch(`/api/inspections/${i.id}`).send({ assigneeId: null, note: "Waiting for the shutdown window" });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toMatchObject({ assigneeId: null, assigneeName: null, mailed: true });
    expect(await env.db("inspections").where({ id: i.id }).first("assignee_id")).toEqual({ assignee_id: null });
    const audit = await env.db("audit_log").where({ action: "inspection.reassigned", subject_id: String(i.id) }).first();
    expect(audit.details).toEqual({ from: ids.tech, to: null, note: "Waiting for the shutdown window" });
    const withdrawn = await waitForMail(env.db, demoUser("technician").email, "Inspection unassigned: INSPT-M1 – INSPT unassign%");
    expect(withdrawn.text_body).toContain("nobody holds it for now");
    expect(contentLines(icsOf(withdrawn))).toContain("METHOD:CANCEL");

    const detail = await agents.planner.get(`/api/inspections/${i.id}`);
    const ev = detail.body.events.find((e: { kind: string }) => e.kind === "reassigned");
    expect(ev).toMatchObject({ note: "Waiting for the shutdown window", details: { from: ids.tech, to: null, fromName: demoUser("technician").name, toName: null } });
    // off the technician's list, and no longer theirs to move
    const mine = await agents.technician.get(`/api/inspections?mine=1&siteId=${ids.site}&pageSize=200`);
    expect(mine.body.items.map((x: { id: number }) => x.id)).not.toContain(i.id);
    expect((await agents.technician.patch(`/api/inspections/${i.id}`).send({ status: "in_progress" })).status).toBe(403);
    // nobody again is no change; giving it to someone works from nobody
    expect((await agents.planner.patch(`/api/inspections/${i.id}`).send({ assigneeId: null })).status).toBe(400);
    const back = await agents.planner.patch(`/api/inspections/${i.id}`).send({ assigneeId: ids.otherTech });
    expect(back.body).toMatchObject({ assigneeId: ids.otherTech, assigneeName: "Arvid Lund" });
    const again = (await agents.planner.get(`/api/inspections/${i.id}`)).body.events.filter((e: { kind: string }) => e.kind === "reassigned");
    expect(again[1].details).toMatchObject({ from: null, to: ids.otherTech, fromName: null, toName: "Arvid Lund" });
  });
});

describe("list, filters and calendar", () => {
  let overdueId: number;
  beforeAll(async () => {
    const o = await plan({ title: "INSPT overdue", assetId: ids.low, dueDate: isoDay(5) });
    await env.db("inspections").where({ id: o.id }).update({ due_date: isoDay(-3) });
    overdueId = o.id;
    await plan({ title: "INSPT far", assetId: ids.low, dueDate: isoDay(90), assigneeId: ids.otherTech });
  });

  it("filters by status, assignee, asset, site, due range, overdue and mine; paginates; sorts", async () => {
    const all = await agents.manager.get(`/api/inspections?siteId=${ids.site}&pageSize=200`);
    expect(all.status).toBe(200);
    expect(all.body.total).toBe(all.body.items.length);
    const dues = all.body.items.map((x: { dueDate: string }) => x.dueDate);
    expect(dues).toEqual([...dues].sort()); // default: due date ascending

    const overdue = await agents.manager.get(`/api/inspections?siteId=${ids.site}&overdue=1`);
    expect(overdue.body.items.map((x: { id: number }) => x.id)).toEqual([overdueId]);
    expect(overdue.body.items[0].overdue).toBe(true);

    const mine = await agents.technician.get(`/api/inspections?mine=1&siteId=${ids.site}&pageSize=200`);
    expect(mine.body.items.length).toBeGreaterThan(0);
    expect(mine.body.items.every((x: { assigneeId: number }) => x.assigneeId === ids.tech)).toBe(true);
    const theirs = await agents.manager.get(`/api/inspections?assigneeId=${ids.otherTech}&pageSize=200`);
    expect(theirs.body.items.every((x: { assigneeId: number }) => x.assigneeId === ids.otherTech)).toBe(true);

    const byAsset = await agents.manager.get(`/api/inspections?assetId=${ids.low}&status=planned,in_progress`);
    expect(byAsset.body.items.every((x: { assetId: number; status: string }) => x.assetId === ids.low && ["planned", "in_progress"].includes(x.status))).toBe(true);

    const range = await agents.manager.get(`/api/inspections?siteId=${ids.site}&from=${isoDay(60)}&to=${isoDay(120)}`);
    expect(range.body.items.map((x: { title: string }) => x.title)).toEqual(["INSPT far"]);

    const page = await agents.manager.get(`/api/inspections?siteId=${ids.site}&pageSize=2&page=2&sort=-dueDate`);
    expect(page.body).toMatchObject({ page: 2, pageSize: 2, total: all.body.total });
    expect(page.body.items).toHaveLength(2);
    const byPrio = await agents.manager.get(`/api/inspections?siteId=${ids.site}&sort=priority&pageSize=200`);
    const rank = { urgent: 0, high: 1, normal: 2, low: 3 } as Record<string, number>;
    const ranks = byPrio.body.items.map((x: { priority: string }) => rank[x.priority]);
    expect(ranks).toEqual([...ranks].sort((a: number, b: number) => a - b));

    expect((await agents.manager.get("/api/inspections?sort=nonsense")).status).toBe(400);
    expect((await agents.manager.get("/api/inspections?status=finished")).status).toBe(400);
  });

  it("calendar data groups inspections by due date over a range", async () => {
    const res = await agents.technician.get(`/api/inspections/calendar?siteId=${ids.site}&from=${isoDay(-5)}&to=${isoDay(100)}`);
    expect(res.status).toBe(200);
    const dates = res.body.days.map((d: { date: string }) => d.date);
    expect(dates).toEqual([...dates].sort());
    expect(dates).toContain(isoDay(-3));
    expect(dates).toContain(isoDay(90));
    for (const d of res.body.days) for (const i of d.items) expect(i.dueDate).toBe(d.date);
    expect(res.body.days.flatMap((d: { items: { status: string }[] }) => d.items).some((i: { status: string }) => i.status === "cancelled")).toBe(false);
    expect((await agents.technician.get(`/api/inspections/calendar?from=${isoDay(5)}&to=${isoDay(1)}`)).status).toBe(400);
  });
});

describe("CSV export (RFC 4180)", () => {
  it("quotes fields holding commas, quotes and line breaks", () => {
    expect(csvField("plain")).toBe("plain");
    expect(csvField("a,b")).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField("two\nlines")).toBe('"two\nlines"');
    expect(csvField("cr\rlf")).toBe('"cr\rlf"');
    expect(csvField(null)).toBe("");
    expect(csvField(-12.5)).toBe("-12.5");
    expect(csvField("=HYPERLINK(1)")).toBe("'=HYPERLINK(1)"); // not run as a formula by a spreadsheet
    expect(toCsv(["a", "b"], [["1", "x,y"]])).toBe('a,b\r\n1,"x,y"\r\n');
  });

  it("GET /inspections.csv round-trips awkward text", async () => {
    const title = 'INSPT csv, "quoted"';
    const instructions = "Line one\nLine two, with comma";
    const i = await plan({ title, instructions });
    const res = await agents.planner.get(`/api/inspections.csv?siteId=${ids.site}`);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^text\/csv/);
    expect(res.headers["content-disposition"]).toMatch(/^attachment; filename="?inspections\.csv"?$/);
    expect(res.text).toContain('"INSPT csv, ""quoted"""');
    const rows = parseCsv(res.text);
    const header = rows[0];
    expect(header.slice(0, 4)).toEqual(["id", "status", "priority", "due_date"]);
    const row = rows.find((r) => r[0] === String(i.id))!;
    expect(row[header.indexOf("title")]).toBe(title);
    expect(row[header.indexOf("instructions")]).toBe(instructions);
    expect(row[header.indexOf("motor_tag")]).toBe("INSPT-M1");
    expect(new Set(rows.map((r) => r.length)).size).toBe(1);
    expect((await agents.technician.get("/api/inspections.csv")).status).toBe(403);
  });
});

describe("iCalendar (RFC 5545)", () => {
  it("§3.3.11: escapes backslash, semicolon, comma and newline in TEXT", () => {
    expect(escapeText("a\\b;c,d\ne\r\nf")).toBe("a\\\\b\\;c\\,d\\ne\\nf");
    expect(escapeText("colon: stays")).toBe("colon: stays");
  });

  it("§3.1: folds lines longer than 75 octets with CRLF + space, never inside a UTF-8 character", () => {
    const long = "DESCRIPTION:" + "Prüfung der Läuferstäbe – ".repeat(10);
    const folded = foldLine(long);
    const parts = folded.split("\r\n");
    expect(parts.length).toBeGreaterThan(1);
    for (const p of parts) expect(Buffer.byteLength(p, "utf8")).toBeLessThanOrEqual(75);
    for (const p of parts.slice(1)) expect(p.startsWith(" ")).toBe(true);
    expect(folded.replace(/\r\n /g, "")).toBe(long);
    expect(parts.join("")).not.toContain("\uFFFD");
    expect(foldLine("SHORT:x")).toBe("SHORT:x");
    const exact = "X:" + "a".repeat(73);
    expect(foldLine(exact)).toBe(exact); // exactly 75 octets: no fold
    expect(foldLine(exact + "b")).toBe(exact + "\r\n b");
  });

  it("builds a VCALENDAR whose every line is ≤ 75 octets and ends in CRLF", () => {
    const ics = buildCalendar(
      [
        {
          id: 7, title: "Rotor; bars, end ring \\ check", instructions: "ö".repeat(100), dueDate: "2027-01-05", sequence: 3, status: "planned",
          priority: "urgent", assetTag: "P-1", assetName: "Pump", siteName: "Works", areaName: "Hall 2", assignee: { name: "Doe, Jo", email: "jo@x.example" },
        },
      ],
      { domain: "barhound.local", method: "REQUEST", organizer: { name: "Barhound", email: "no-reply@barhound.local" }, now: new Date("2026-12-01T10:00:00Z") },
    );
    expect(ics.endsWith("\r\n")).toBe(true);
    for (const raw of ics.split("\r\n")) expect(Buffer.byteLength(raw, "utf8")).toBeLessThanOrEqual(75);
    const [ev] = vevents(ics);
    expect(ev).toMatchObject({ UID: "inspection-7@barhound.local", SEQUENCE: "3", "DTSTART;VALUE=DATE": "20270105", "DTEND;VALUE=DATE": "20270106", DTSTAMP: "20261201T100000Z", PRIORITY: "1" });
    expect(unescapeText(ev.SUMMARY)).toBe("P-1: Rotor; bars, end ring \\ check");
    expect(unescapeText(ev.DESCRIPTION)).toContain("ö".repeat(100));
    expect(Object.keys(ev)).toContain('ATTENDEE;CN="Doe, Jo";ROLE=REQ-PARTICIPANT;PARTSTAT=NEEDS-ACTION;RSVP=FALSE'); // §3.2: quoted param
  });

  it("GET /inspections.ics is a feed with one VEVENT per open inspection", async () => {
    const res = await agents.manager.get(`/api/inspections.ics?siteId=${ids.site}`);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^text\/calendar/);
    const text = res.text;
    expect(contentLines(text)[0]).toBe("BEGIN:VCALENDAR");
    expect(contentLines(text)).toContain("METHOD:PUBLISH");
    const open = await env
      .db("inspections as i")
      .join("assets as a", "a.id", "i.asset_id")
      .where("a.tag", "like", "INSPT-%")
      .whereIn("i.status", ["planned", "in_progress"])
      .pluck("i.id");
    const uids = vevents(text).map((e) => e.UID);
    expect(uids.sort()).toEqual(open.map((id: number) => `inspection-${id}@barhound.local`).sort());
    for (const raw of text.split("\r\n")) expect(Buffer.byteLength(raw, "utf8")).toBeLessThanOrEqual(75);
    expect((await agents.technician.get("/api/inspections.ics")).status).toBe(403);
  });
});

const PNG = Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), Buffer.alloc(64, 1)]);

describe("attachments", () => {
  it("sniffs PNG, JPEG, WAV and CSV from the bytes", () => {
    expect(sniffAttachment(PNG, "x.bin")?.contentType).toBe("image/png");
    expect(sniffAttachment(Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0, 0]), "x")?.contentType).toBe("image/jpeg");
    const wav = Buffer.alloc(44);
    wav.write("RIFF", 0, "latin1");
    wav.write("WAVE", 8, "latin1");
    expect(sniffAttachment(wav, "c.wav")?.contentType).toBe("audio/wav");
    expect(sniffAttachment(Buffer.from("t,ia\n0,1\n"), "c.csv")?.contentType).toBe("text/csv");
    expect(sniffAttachment(Buffer.from("t,ia\n0,1\n"), "c.png")).toBeNull();
    expect(sniffAttachment(Buffer.from([0x4d, 0x5a, 0x90, 0]), "photo.png")).toBeNull();
  });

  it("the assignee attaches a photo and a capture file; others are refused; size and type are checked", async () => {
    const i = await plan({ title: "INSPT files" });
    const photo = await agents.technician.post(`/api/inspections/${i.id}/attachments`).attach("file", PNG, "bars.png");
    expect(photo.status, JSON.stringify(photo.body)).toBe(201);
    expect(photo.body).toMatchObject({ fileName: "bars.png", contentType: "image/png", size: PNG.length });
    const csv = await agents.planner.post(`/api/inspections/${i.id}/attachments`).attach("file", Buffer.from("t,ia\n0,1\n"), "capture.csv");
    expect(csv.status).toBe(201);
    const fake = await agents.technician.post(`/api/inspections/${i.id}/attachments`).attach("file", Buffer.from("MZ not a picture"), "evil.png");
    expect(fake.status).toBe(415);
    const big = await agents.technician.post(`/api/inspections/${i.id}/attachments`).attach("file", Buffer.concat([PNG, Buffer.alloc(70 * 1024)]), "big.png");
    expect(big.status).toBe(413);
    const none = await agents.technician.post(`/api/inspections/${i.id}/attachments`).field("note", "x");
    expect(none.status).toBe(400);
    expect((await agents.analyst.post(`/api/inspections/${i.id}/attachments`).attach("file", PNG, "a.png")).status).toBe(403);

    const detail = await agents.manager.get(`/api/inspections/${i.id}`);
    expect(detail.body.attachments.map((a: { fileName: string }) => a.fileName)).toEqual(["bars.png", "capture.csv"]);
    const dl = await agents.manager.get(detail.body.attachments[0].url).buffer(true).parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => cb(null, Buffer.concat(chunks)));
    });
    expect(dl.status).toBe(200);
    expect(Buffer.compare(dl.body as Buffer, PNG)).toBe(0);
    expect(await env.db("audit_log").where({ action: "inspection.attachment-added", subject_id: String(i.id) }).count({ n: "*" })).toEqual([{ n: "2" }]);
  });

  it("GET /inspections/:id/attachments/:attachmentId: a photo inline, a capture file as a download, for anyone who may read the inspection", async () => {
    const i = await plan({ title: "INSPT download" });
    const other = await plan({ title: "INSPT download other" });
    const photo = (await agents.technician.post(`/api/inspections/${i.id}/attachments`).attach("file", PNG, "rotor bars ü.png")).body;
    const csv = (await agents.technician.post(`/api/inspections/${i.id}/attachments`).attach("file", Buffer.from("t,ia\n0,1\n"), "phase-a.csv")).body;
    expect(photo.url).toBe(`/api/inspections/${i.id}/attachments/${photo.id}`);

    for (const role of ROLES) {
      const res = await agents[role].get(photo.url);
      expect(res.status, role).toBe(200); // fleet.read: every role reads inspections
    }
    const shown = await agents.analyst.get(photo.url);
    expect(shown.headers["content-type"]).toBe("image/png");
    expect(shown.headers["content-disposition"]).toMatch(/^inline; filename="rotor bars _.png"; filename\*=UTF-8''rotor%20bars%20%C3%BC\.png$/);
    expect(shown.headers["x-content-type-options"]).toBe("nosniff");
    expect((await agents.analyst.get(`${photo.url}?download=1`)).headers["content-disposition"]).toMatch(/^attachment;/);
    const file = await agents.manager.get(csv.url);
    expect(file.status).toBe(200);
    expect(file.headers["content-type"]).toMatch(/^text\/csv/);
    expect(file.headers["content-disposition"]).toMatch(/^attachment; filename="phase-a.csv"/);
    expect(file.text).toBe("t,ia\n0,1\n");

    // only under its own inspection; unknown ids are 404; no session is 401
    expect((await agents.manager.get(`/api/inspections/${other.id}/attachments/${photo.id}`)).status).toBe(404);
    expect((await agents.manager.get(`/api/inspections/${i.id}/attachments/99999999`)).status).toBe(404);
    expect((await request(env.app).get(photo.url)).status).toBe(401);

    // the list carries each inspection's files, so finished work can show them
    const list = await agents.technician.get(`/api/inspections?mine=1&q=INSPT download&pageSize=200`);
    const row = list.body.items.find((x: { id: number }) => x.id === i.id);
    expect(row.attachments.map((a: { fileName: string; size: number }) => [a.fileName, a.size])).toEqual([["rotor bars ü.png", PNG.length], ["phase-a.csv", 9]]);
    expect(list.body.items.find((x: { id: number }) => x.id === other.id).attachments).toEqual([]);
  });
});

describe("role checks on every inspection route", () => {
  const mine = () => routeRegistry.filter((r) => r.path.startsWith("/api/inspections"));
  const concrete = (p: string) => p.replace(/:\w+/g, "999999");
  const call = (agent: request.Agent | ReturnType<typeof request>, method: string, p: string) => {
    const t = (agent as unknown as Record<string, (p: string) => request.Test>)[method](concrete(p));
    return method === "get" ? t : t.send({});
  };

  it("registers the contract's routes", () => {
    const names = mine().map((r) => `${r.method} ${r.path}`);
    for (const n of ["get /api/inspections", "post /api/inspections", "patch /api/inspections/:id", "post /api/inspections/:id/attachments", "get /api/inspections/:id/attachments/:attachmentId", "get /api/inspections.csv", "get /api/inspections.ics"])
      expect(names).toContain(n);
  });

  it("401 without a session; 403 for every role the permission leaves out", async () => {
    for (const route of mine()) {
      const label = `${route.method} ${route.path}`;
      expect((await call(request(env.app), route.method, route.path)).status, label).toBe(401);
      for (const role of ROLES) {
        const res = await call(agents[role], route.method, route.path);
        if (can(role, route.permission as Permission)) expect([401, 403], `${role} ${label}`).not.toContain(res.status);
        else expect(res.status, `${role} ${label}`).toBe(403);
      }
    }
  });
});
