// Each role's main flow end to end, through the real UI, the real server, a REAL worker process and the SMTP fake:
//   1. technician uploads sample-data/broken-bars-2.wav to TWT-HLP-P03 (sample-data/README.md), acknowledges the
//      safety caution, sees the per-file progress, then the live status reach Analysed with the grade, no reload;
//   2. analyst opens it from Review, sees f, f − 2sf, f + 2sf on the spectrum and confirms the finding with a note;
//   3. planner schedules an inspection for that finding from Needs action, and one for the motor from "Schedule
//      inspection"; each assignee's mail carries an .ics with the due date;
//   4. manager, whose Fleet page has been open since before the upload, sees R5 go up by one and the motor's old
//      bucket go down by one, live (no reload), and the same after a reload.
// The tests run in order and share state (one capture travelling through the roles). Screenshots: .screenshots/flows/.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Knex } from "knex";
import { startHarness, demoUser, type Harness } from "./harness.ts";
import { seedFleet } from "../../server/seed/fleet.ts";
import { loadFleetHealth } from "../../server/reports/fleet-data.ts";
import { waitForMail } from "../helpers/context.ts";
import type { WorkerProcess } from "../helpers/pipeline.ts";
import {
  GRADE_LABEL, cleanupFlows, highWater, markPage, openSidePage, pageMark, parseGradeBar, recordSocketEvents, seenCaptureStatuses,
  shotsDir, startFlowWorker, watchCaptureStatuses, type SidePage, type SocketEvent,
} from "./flows-helpers.ts";

const ROOT = path.resolve(import.meta.dirname, "../..");
const SAMPLE = path.join(ROOT, "sample-data/broken-bars-2.wav");
const TAG = "TWT-HLP-P03"; // sample-data/README.md: broken-bars-2.wav → TWT-HLP-P03 High-lift pump 3, R5 Severe
const NOTE = "Sidebands at f ± 2sf stand 32 dB below the supply at 90 % load: two broken bars, confirmed.";

let h: Harness;
let db: Knex;
let worker: WorkerProcess | undefined;
let manager: SidePage | undefined;
let from: Record<string, number>;
let assetId: number;
let motor: { tag: string; name: string; area: string; siteCode: string; siteName: string };
let techEvents: SocketEvent[];
let managerEvents: SocketEvent[];
let managerMark: string;
let before: Record<string, number>;
let motorBucketBefore: string;
let captureId: number;
let findingId: number;

const shot = (name: string) => h.screenshot(`flows/${name}`);
const barLabel = (p: SidePage["page"]) => p.getByRole("img", { name: /^Motors per rotor grade: / }).getAttribute("aria-label").then((l) => l ?? "");

beforeAll(async () => {
  shotsDir();
  h = await startHarness();
  db = h.server.ctx.db as Knex;
  from = await highWater(db, ["captures", "inspections", "caught_mail", "audit_log"]);
  const ids = await seedFleet(db); // the scenario's sites, areas, motors with their nameplates, measurement points
  assetId = ids.get(TAG)!;
  const row = await db("assets as a").join("areas as ar", "ar.id", "a.area_id").join("sites as s", "s.id", "ar.site_id").where("a.id", assetId)
    .first("a.tag", "a.name", "ar.name as area", "s.code as siteCode", "s.name as siteName");
  motor = row;
  // The analysis runs in its own process, as in production; a short delay keeps "Analysing" on screen long enough to see.
  worker = await startFlowWorker(h, { BARHOUND_TEST_ANALYSIS_DELAY_MS: "800" });

  // The manager's Fleet page is open from before the upload and is never reloaded until test 4 says so.
  manager = await openSidePage(h, "manager");
  managerEvents = recordSocketEvents(manager.page);
  await manager.page.goto(`${h.baseUrl}/fleet`);
  await manager.page.getByRole("heading", { name: "Rotor grades across the fleet" }).waitFor();
  await manager.page.getByText("Live", { exact: true }).waitFor(); // its socket is connected before anything is uploaded
  before = parseGradeBar(await barLabel(manager.page));
  const fleet = await loadFleetHealth(db, {});
  motorBucketBefore = GRADE_LABEL[fleet.motors.find((m) => m.tag === TAG)!.gradeKey];
  managerMark = await markPage(manager.page);
  await manager.page.screenshot({ path: path.join(shotsDir(), "0-manager-fleet-before.png"), fullPage: true });
}, 120_000);

afterAll(async () => {
  await manager?.close();
  await worker?.stop();
  if (h && assetId && from) await cleanupFlows(h, assetId, from);
  await h?.close();
});

describe("role flows: one capture from upload to inspection", () => {
  it("technician: uploads broken-bars-2.wav to TWT-HLP-P03, sees progress, then Analysed with R5 live", async () => {
    const { page } = h;
    techEvents = recordSocketEvents(page);
    await h.signIn("technician");
    h.consoleErrors.length = 0; // the sign-in page's own 401 on /api/me is expected
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Upload" }).click();
    await page.waitForURL(/\/upload$/);
    await page.getByText("Live", { exact: true }).waitFor(); // the header says live updates are connected

    // the caution first; files cannot be chosen before it is acknowledged
    await page.getByTestId("safety-caution").waitFor();
    expect(await page.getByRole("button", { name: "Choose files…" }).isDisabled()).toBe(true);
    await shot("1a-technician-caution");
    await page.getByRole("button", { name: /I understand/ }).click();

    await page.getByLabel("Site").selectOption({ label: `${motor.siteCode} · ${motor.siteName}` });
    await page.getByLabel("Motor").selectOption({ label: `${motor.tag} · ${motor.name} (${motor.area})` });
    const chooser = page.waitForEvent("filechooser");
    await page.getByRole("button", { name: "Choose files…" }).click();
    await (await chooser).setFiles(SAMPLE);
    const row = page.getByTestId("upload-row").filter({ hasText: "broken-bars-2.wav" });
    await row.getByText("Ready to upload").waitFor();
    const mark = await markPage(page);
    await watchCaptureStatuses(page);

    // Slow the upload down (DevTools network emulation) so the per-file progress bar can be seen moving.
    const cdp = await page.context().newCDPSession(page);
    await cdp.send("Network.enable");
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: 700 * 1024 });
    let answeredAt = Infinity;
    const answer = page
      .waitForResponse((r) => r.url().endsWith("/api/captures") && r.request().method() === "POST")
      .then((r) => ((answeredAt = Date.now()), r));
    await page.getByRole("button", { name: "Upload", exact: true }).click();
    const bar = row.getByRole("progressbar", { name: "Uploading broken-bars-2.wav" });
    await bar.waitFor();
    const seenPct = new Set<number>();
    let shotTaken = false;
    while (await bar.isVisible()) {
      const v = Number(await bar.getAttribute("aria-valuenow").catch(() => null));
      if (Number.isFinite(v)) seenPct.add(v);
      if (!shotTaken && v > 0 && v < 100) {
        await shot("1b-technician-upload-progress");
        shotTaken = true;
      }
      await page.waitForTimeout(50);
    }
    const res = await answer;
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    expect(res.status()).toBe(202); // accepted: analysis follows
    captureId = (await res.json()).captures[0].id;
    expect([...seenPct].some((v) => v > 0 && v < 100)).toBe(true); // it moved through intermediate values

    // the live status line: received/queued → analysing → analysed, then the grade
    const status = row.getByTestId("capture-status");
    await status.waitFor();
    await expect.poll(() => status.getAttribute("data-status"), { timeout: 30_000 }).toBe("analysed");
    await status.getByRole("img", { name: /Rotor grade R5 Severe/ }).waitFor();
    expect(await status.getByRole("list", { name: `Capture ${captureId}: analysed` }).count()).toBe(1);
    // It came over socket.io, without a reload: the worker's capture:status events reached this page's websocket,
    // analysing before analysed.
    const live = techEvents.filter((e) => e.name === "capture:status" && e.payload.id === captureId);
    const liveSteps = live.map((e) => e.payload.status);
    expect(liveSteps.indexOf("analysing")).toBeGreaterThanOrEqual(0);
    expect(liveSteps.lastIndexOf("analysed")).toBeGreaterThan(liveSteps.indexOf("analysing"));
    // The line only ever stepped forward and ended at analysed. When the page held the capture id (the 202 answer)
    // and "analysing" long enough before "analysed" for a frame to be drawn, it showed "analysing" too (a fast
    // analysis may finish within one frame, or before the throttled answer reached the page).
    const statuses = await seenCaptureStatuses(page);
    const order = ["received", "queued", "analysing", "analysed"];
    expect(statuses.every((s, i) => i === 0 || order.indexOf(s) > order.indexOf(statuses[i - 1]))).toBe(true);
    expect(statuses.at(-1)).toBe("analysed");
    const analysingAt = live.find((e) => e.payload.status === "analysing")!.at;
    const analysedAt = live.find((e) => e.payload.status === "analysed")!.at;
    if (analysedAt - Math.max(analysingAt, answeredAt) >= 250) expect(statuses).toContain("analysing");
    expect(await pageMark(page)).toBe(mark);
    await shot("1c-technician-analysed");

    const cap = await db("captures").where({ id: captureId }).first("status", "asset_id", "taken_by_user_id");
    expect(cap.status).toBe("analysed");
    expect(cap.asset_id).toBe(assetId);
    expect(h.consoleErrors.filter((e) => !/favicon/.test(e))).toEqual([]);
  });

  it("analyst: opens the capture from Review, sees f, f − 2sf, f + 2sf, and confirms the finding with a note", async () => {
    const { page } = h;
    await h.signOut();
    await h.signIn("analyst");
    h.consoleErrors.length = 0;
    await page.waitForURL(/\/review$/);
    const row = page.getByRole("row").filter({ hasText: TAG }).filter({ has: page.getByRole("img", { name: /Rotor grade R5 Severe/ }) });
    await row.first().waitFor();
    await shot("2a-analyst-review");
    await row.first().getByRole("link", { name: /Review spectrum/ }).click();
    await page.waitForURL(new RegExp(`/captures/${captureId}$`));

    const viewer = page.getByTestId("spectrum-current");
    await viewer.locator("canvas").first().waitFor();
    await viewer.getByText(/every bin shown|min\/max of/).waitFor();
    for (const name of [/Supply f/, /Broken-bar sidebands/]) expect(await viewer.getByRole("checkbox", { name }).isChecked()).toBe(true);
    // The view opens around the supply; the engine's f, f − 2sf and f + 2sf markers all fall inside it.
    const range = (await viewer.getByText(/^\s*[\d.]+ – [\d.]+ Hz\s*$/).innerText()).match(/([\d.]+) – ([\d.]+)/)!;
    const [lo, hi] = [Number(range[1]), Number(range[2])];
    const detail = await (await page.request.get(`${h.baseUrl}/api/captures/${captureId}`)).json();
    const byName = new Map<string, number>((detail.analysis.markers as { name: string; hz: number }[]).map((m) => [m.name, m.hz]));
    for (const name of ["f", "f − 2sf", "f + 2sf"]) {
      expect(byName.has(name), `marker ${name}`).toBe(true);
      expect(byName.get(name)!).toBeGreaterThan(lo);
      expect(byName.get(name)!).toBeLessThan(hi);
    }
    expect(byName.get("f − 2sf")!).toBeLessThan(byName.get("f")!);
    expect(byName.get("f + 2sf")!).toBeGreaterThan(byName.get("f")!);
    // Readings beside the plot name both sidebands with their frequency.
    const readings = page.getByRole("heading", { name: "Readings" }).locator("xpath=ancestor::section[1]");
    const text = await readings.innerText();
    expect(text).toMatch(/Lower sideband\s*f − 2sf/);
    expect(text).toMatch(/Upper sideband\s*f \+ 2sf/);
    expect(text).toContain(`at ${byName.get("f − 2sf")!.toFixed(3)} Hz`);
    await readings.getByRole("img", { name: /Rotor grade R5 Severe/ }).waitFor();
    await shot("2b-analyst-spectrum-markers");

    const form = page.getByTestId("verdict-form").first();
    await form.getByRole("radio", { name: /Confirm/ }).check();
    await form.getByLabel("Note").fill(NOTE);
    await form.getByRole("button", { name: "Record verdict" }).click();
    await page.getByRole("status").filter({ hasText: "Confirmed: saved." }).waitFor();
    await page.getByText(`“${NOTE}”`).waitFor(); // the verdict history shows the note
    await shot("2c-analyst-confirmed");

    const finding = await db("findings").where({ capture_id: captureId }).first("id", "status", "level");
    expect(finding).toMatchObject({ status: "confirmed", level: "R5" });
    findingId = finding.id;
    const verdict = await db("verdicts").where({ finding_id: findingId }).first("verdict", "note");
    expect(verdict).toMatchObject({ verdict: "confirmed", note: NOTE });
    const auditRow = await db("audit_log").where({ action: "verdict.set", subject_type: "finding", subject_id: String(findingId) }).first("details");
    expect(auditRow).toBeTruthy();
    expect(auditRow.details).toMatchObject({ from: "open", to: "confirmed" });
    expect(h.consoleErrors.filter((e) => !/favicon/.test(e))).toEqual([]);
  });

  // Needs action lists findings without an open inspection whether they wait for a verdict, are confirmed or
  // asked to be re-measured (GET /api/inspections/candidates), so a confirmed finding can be scheduled.
  it("planner: schedules an inspection for the confirmed finding from Needs action; the mail has an .ics with the due date", async () => {
    const { page } = h;
    await h.signOut();
    await h.signIn("planner");
    h.consoleErrors.length = 0;
    const needs = page.getByRole("heading", { name: "Needs action" }).locator("xpath=ancestor::section[1]");
    const row = needs.getByRole("row").filter({ hasText: TAG }).filter({ has: page.getByRole("img", { name: /Rotor grade R5 Severe/ }) });
    await row.first().waitFor({ timeout: 5000 });
    await shot("3a-planner-needs-action");
    await row.first().getByRole("button", { name: "Schedule" }).click();

    const dialog = page.getByRole("dialog");
    await dialog.getByRole("heading", { name: "Schedule an inspection" }).waitFor();
    await dialog.getByText("From finding").waitFor();
    const { dueIso, tech } = await fillAndSchedule(dialog);
    await shot("3c-planner-scheduled");

    const insp = await db("inspections").where({ finding_id: findingId }).first("id", "status");
    expect(insp).toMatchObject({ status: "planned" });
    await expectInvitation(insp.id, tech.email, dueIso);
  });

  // The planner's other way in: "Schedule inspection" for the motor (dialog, assignee, due date, mail with the
  // calendar invitation). The inspection is not linked to the finding here.
  it("planner: schedules an inspection for the motor from 'Schedule inspection'; the technician's mail has an .ics with the due date", async () => {
    const { page } = h;
    await h.signOut();
    await h.signIn("planner");
    h.consoleErrors.length = 0;
    const needs = page.getByRole("heading", { name: "Needs action" }).locator("xpath=ancestor::section[1]");
    await needs.getByRole("table").or(needs.getByText("No open findings")).first().waitFor();
    await page.waitForLoadState("networkidle").catch(() => undefined);
    await shot("3a-planner-needs-action");
    await page.getByRole("button", { name: "Schedule inspection" }).click();

    const dialog = page.getByRole("dialog");
    await dialog.getByRole("heading", { name: "Schedule an inspection" }).waitFor();
    await dialog.getByLabel("Find a motor").fill(TAG);
    const label = `${motor.tag} · ${motor.name} (${motor.siteName})`;
    const motorSelect = dialog.getByRole("combobox", { name: "Motor", exact: true });
    await motorSelect.locator("option", { hasText: label }).waitFor({ state: "attached" });
    await motorSelect.selectOption({ label });
    await dialog.getByLabel("Title").fill(`Inspect ${TAG}: confirmed R5 rotor finding, about two broken bars`);
    const { dueIso, tech } = await fillAndSchedule(dialog);
    const inspections = page.getByRole("heading", { name: "Inspections" }).locator("xpath=ancestor::section[1]");
    await inspections.getByRole("row").filter({ hasText: TAG }).filter({ hasText: tech.name }).first().waitFor();
    await shot("3c-planner-scheduled");

    const insp = await db("inspections").where({ asset_id: assetId }).andWhere("id", ">", from.inspections).orderBy("id", "desc").first("id", "status", "due_date", "assignee_id");
    expect(insp).toMatchObject({ status: "planned" });
    await expectInvitation(insp.id, tech.email, dueIso);
    expect(h.consoleErrors.filter((e) => !/favicon/.test(e))).toEqual([]);
  });

  it("manager: the Fleet page open since before the upload shows R5 up by one and the motor's old bucket down by one", async () => {
    const p = manager!.page;
    const expected = { ...before, "R5 Severe": before["R5 Severe"] + 1, [motorBucketBefore]: before[motorBucketBefore] - 1 };
    expect(motorBucketBefore).not.toBe("R5 Severe"); // else the counts could not move
    // Live: no reload since the baseline (the mark is still on the window), the counts moved by themselves.
    await expect.poll(async () => parseGradeBar(await barLabel(p)), { timeout: 15_000 }).toEqual(expected);
    expect(await pageMark(p)).toBe(managerMark);
    expect(managerEvents.some((e) => e.name === "capture:status" && e.payload.id === captureId && e.payload.status === "analysed")).toBe(true);
    const worst = p.getByRole("heading", { name: "Worst first" }).locator("xpath=ancestor::section[1]");
    await worst.getByRole("link", { name: TAG }).waitFor();
    const totals = p.getByRole("heading", { name: "Rotor grades across the fleet" }).locator("xpath=ancestor::section[1]");
    const r5 = totals.getByRole("listitem").filter({ has: p.getByRole("img", { name: /Rotor grade R5 Severe/ }) });
    expect((await r5.innerText()).trim()).toMatch(new RegExp(`${expected["R5 Severe"]}$`));
    await p.screenshot({ path: path.join(shotsDir(), "4a-manager-fleet-after-live.png"), fullPage: true });
    // And the same after a reload.
    await p.reload();
    await p.getByRole("heading", { name: "Rotor grades across the fleet" }).waitFor();
    expect(parseGradeBar(await barLabel(p))).toEqual(expected);
    expect(fs.existsSync(path.join(shotsDir(), "4a-manager-fleet-after-live.png"))).toBe(true);
  });
});

/** Technician and due date (nine days out) in the open Schedule dialog, then Schedule; waits for it to close. */
async function fillAndSchedule(dialog: ReturnType<Harness["page"]["getByRole"]>) {
  const due = new Date(Date.now() + 9 * 86_400_000);
  const dueIso = `${due.getFullYear()}-${String(due.getMonth() + 1).padStart(2, "0")}-${String(due.getDate()).padStart(2, "0")}`;
  const tech = demoUser("technician");
  await dialog.getByLabel("Technician").selectOption({ label: tech.name });
  await dialog.getByLabel("Due date").fill(dueIso);
  await shot("3b-planner-schedule-dialog");
  await dialog.getByRole("button", { name: "Schedule", exact: true }).click();
  await dialog.waitFor({ state: "hidden" });
  return { dueIso, tech };
}

/** The assignee's mail in the SMTP fake, with inspection-<id>.ics whose VEVENT starts on the due date. */
async function expectInvitation(inspectionId: number, email: string, dueIso: string) {
  const mail = await waitForMail(db, email, `Inspection assigned: ${TAG}%`, 10_000);
  const ics = (mail.attachments as { filename: string; contentType: string; content: string }[]).find((a) => a.filename.endsWith(".ics"));
  expect(ics, "an .ics attachment").toBeTruthy();
  expect(ics!.filename).toBe(`inspection-${inspectionId}.ics`);
  expect(ics!.contentType).toMatch(/^text\/calendar/);
  const cal = Buffer.from(ics!.content, "base64").toString("utf8").replace(/\r\n[ \t]/g, ""); // unfolded (RFC 5545 §3.1)
  expect(cal).toContain("METHOD:REQUEST");
  const vevent = cal.match(/BEGIN:VEVENT[\s\S]*?END:VEVENT/)?.[0] ?? "";
  expect(vevent).toContain(`DTSTART;VALUE=DATE:${dueIso.replaceAll("-", "")}`);
  expect(vevent).toContain(`UID:inspection-${inspectionId}@`);
  expect(vevent.split("\r\n").find((l) => l.startsWith("ATTENDEE"))).toContain(`mailto:${email}`);
}
