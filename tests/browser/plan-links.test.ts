// Plan and My work through the real UI and server:
//  - the link in an assignment mail opens that inspection for the technician on My work (and a withdrawal's link
//    still says what became of it); Plan opens its dialog from ?inspection=<id> for the planner;
//  - files kept with a finished inspection show (name, size, photo thumbnail, download link) on My work's done list
//    and in Plan's dialog; outcomes show their label;
//  - "Nobody" unassigns and the history says so; a past due date is refused on the field;
//  - the month view marks overdue without colour alone, and "+N more" lists the day;
//  - My work's done list has its own loading and error states;
//  - at 390 px Plan fits the screen and Needs action's Schedule button is on it.
// Screenshots: .screenshots/plan-links-*.png.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Knex } from "knex";
import { startHarness, demoUser, type Harness } from "./harness.ts";
import { waitForMail } from "../helpers/context.ts";
import { attachmentStore } from "../../server/plan/attachments.ts";

let h: Harness;
let db: Knex;
const fx = { site: 0, asset: 0, tech: 0, planner: 0, inspections: [] as number[], captures: [] as number[], mailFrom: 0, auditFrom: 0 };
const PNG = Buffer.from(
  "iVBORw0KGgoAAAANSUhEUgAAABAAAAAQCAIAAACQkWg2AAABlklEQVR4nBXR4RiFMQiG4Q9hCEMIYQghhDCEEIbwIIQQQgghDOHs9Lu7662+72N8zA/5WB/6YR/7wz/OBx/xkR/10R/34/sGYzAHMlgDHdhgD3xwBgxikIMa9OCOByZjMicyWROd2GRPfHImTGKSk5r05M4HhCFMQYQlqGDCFlw4AkIIKZTQwpUHFmMxF7JYC13YYi98cRYsYpGLWvTirgeUoUxFlKWoYspWXDkKSiiplNLK1QeMYUxDjGWoYcY23DgGRhhplNHGtQc2YzM3slkb3dhmb3xzNmxik5va9ObuB5zhTEec5ahjznbcOQ5OOOmU0871Bw7jMA9yWAc92GEf/HAOHOKQhzr04Z4H/s95534HfCd5S77YL8gb/Zr/FZBQ0HDf679gBDOQYAUaWLADD0782yPIoIIObjyQjGQmkqxEE0t24snJ//BIMqmkk5sPFKOYhRSr0MKKXXhx6h8liiyq6OLWA81oZiPNarSxZjfenP4Hjyabarq5/cBlXOZFLuuiF7vsi1/O/a8Zl7zUpS/38gNq4ZAQG74ASAAAAABJRU5ErkJggg==",
  "base64",
); // a 16 × 16 PNG
const p2 = (n: number) => String(n).padStart(2, "0");
const localIso = (d: Date) => `${d.getFullYear()}-${p2(d.getMonth() + 1)}-${p2(d.getDate())}`;
const isoDay = (offsetDays: number) => {
  const d = new Date();
  d.setDate(d.getDate() + offsetDays);
  return localIso(d);
};
const monthOf = (iso: string) => iso.slice(0, 7);
const linkIn = (text: string) => text.match(/^https?:\/\/\S+$/m)![0];

beforeAll(async () => {
  h = await startHarness();
  db = h.server.ctx.db as Knex;
  fx.mailFrom = Number((await db("caught_mail").max({ m: "id" }).first())?.m ?? 0);
  fx.auditFrom = Number((await db("audit_log").max({ m: "id" }).first())?.m ?? 0);
  fx.tech = (await db("users").where({ email: demoUser("technician").email }).first("id")).id;
  fx.planner = (await db("users").where({ email: demoUser("planner").email }).first("id")).id;
  const [site] = await db("sites").insert({ code: "PLNK", name: "Plan Links Test Works", timezone: "UTC" }).returning("id");
  const [area] = await db("areas").insert({ site_id: site.id, name: "Intake" }).returning("id");
  const [motor] = await db("assets").insert({ area_id: area.id, tag: "PLNK-P1", name: "Intake pump 1", criticality: "high", rated_rpm: 1480, poles: 4, rated_kw: 75 }).returning("id");
  fx.site = site.id;
  fx.asset = motor.id;
  // a confirmed finding with no inspection: a row in Needs action with its Schedule button
  const [cap] = await db("captures").insert({ asset_id: motor.id, taken_at: new Date(), source: "upload", status: "analysed", format: "csv" }).returning("id");
  fx.captures.push(cap.id);
  const [an] = await db("analyses")
    .insert({ capture_id: cap.id, asset_id: motor.id, version: 1, engine_version: "test", nameplate_version: 1, params: "{}", result: "{}", taken_at: new Date(), rotor_grade: "R4", rotor_assessable: true, sideband_db: 38, load_pct: 85 })
    .returning("id");
  await db("findings").insert({ asset_id: motor.id, analysis_id: an.id, capture_id: cap.id, kind: "rotor", level: "R4", summary: "PLNK rotor sidebands at R4 Serious, 38 dB below the supply", status: "confirmed" });
}, 120_000);

afterAll(async () => {
  if (db && fx.site) {
    const store = attachmentStore(h.server.ctx);
    const files: { blob_key: string }[] = fx.inspections.length ? await db("inspection_attachments").whereIn("inspection_id", fx.inspections).select("blob_key") : [];
    for (const f of files) await store.delete(f.blob_key).catch(() => undefined);
    await db("inspections").where({ asset_id: fx.asset }).delete();
    await db("captures").where({ asset_id: fx.asset }).delete(); // analyses and findings cascade
    await db("assets").where({ id: fx.asset }).delete();
    await db("areas").where({ site_id: fx.site }).delete();
    await db("sites").where({ id: fx.site }).delete();
    await db("caught_mail").where("id", ">", fx.mailFrom).delete();
    await db("audit_log").where("id", ">", fx.auditFrom).delete();
  }
  await h?.close();
});

/** An inspection row straight into the database (for states the API would not let us make now, e.g. overdue). */
async function insertInspection(o: { title: string; due: string; status?: string; outcome?: string; note?: string; assignee?: number | null }) {
  const [row] = await db("inspections")
    .insert({
      asset_id: fx.asset,
      title: o.title,
      due_date: o.due,
      assignee_id: o.assignee === undefined ? fx.tech : o.assignee,
      priority: "normal",
      status: o.status ?? "planned",
      outcome: o.outcome ?? null,
      completion_note: o.note ?? null,
      completed_at: o.status === "done" ? db.fn.now() : null,
      created_by: fx.planner,
    })
    .returning("id");
  fx.inspections.push(row.id);
  return row.id as number;
}

describe("links to one inspection", () => {
  it("technician: the assignment mail's link opens that inspection on My work; the withdrawal's link says it is no longer hers", async () => {
    const { page } = h;
    await h.signIn("planner");
    const made = await page.request.post(`${h.baseUrl}/api/inspections`, {
      data: { assetId: fx.asset, title: "PLNK check the terminal box", instructions: "Look for heat marks on the terminals.", dueDate: isoDay(9), assigneeId: fx.tech, priority: "high" },
    });
    expect(made.status()).toBe(201);
    const id = (await made.json()).id as number;
    fx.inspections.push(id);
    const mail = await waitForMail(db, demoUser("technician").email, "Inspection assigned: PLNK-P1 – PLNK check the terminal box%");
    const link = linkIn(mail.text_body);
    expect(new URL(link).pathname + new URL(link).search).toBe(`/my-work?inspection=${id}`);

    await h.signOut();
    await h.signIn("technician");
    h.consoleErrors.length = 0; // the sign-in page's own 401 on /api/me is expected
    await page.goto(link);
    const dialog = page.getByRole("dialog");
    await dialog.getByRole("heading", { name: "PLNK check the terminal box" }).waitFor();
    expect(await dialog.getByTestId("inspection-detail").getAttribute("data-inspection-id")).toBe(String(id));
    await dialog.getByText("Look for heat marks on the terminals.").waitFor();
    await dialog.getByRole("button", { name: "Complete…" }).waitFor();
    expect(await page.getByText("Not available to your role").count()).toBe(0);
    await h.screenshot("plan-links-my-work-from-mail");
    // closing leaves the card marked in the list
    await dialog.getByRole("button", { name: "Close" }).click();
    await page.locator(`[data-testid="my-inspection"][data-highlighted]`).filter({ hasText: "PLNK check the terminal box" }).waitFor();
    expect(new URL(page.url()).search).toBe("");

    // the planner takes it off her list; the withdrawal's link still lands on something that says so
    await h.signOut();
    await h.signIn("planner");
    expect((await page.request.patch(`${h.baseUrl}/api/inspections/${id}`, { data: { assigneeId: null } })).status()).toBe(200);
    const withdrawn = await waitForMail(db, demoUser("technician").email, "Inspection unassigned: PLNK-P1 – PLNK check the terminal box%");
    await h.signOut();
    await h.signIn("technician");
    h.consoleErrors.length = 0; // the sign-in page's own 401 on /api/me is expected
    await page.goto(linkIn(withdrawn.text_body));
    await page.getByRole("dialog").getByText("no longer assigned to you").waitFor();
    expect(await page.getByRole("dialog").getByRole("button", { name: "Complete…" }).count()).toBe(0);
    expect(h.consoleErrors).toEqual([]);
  });

  it("technician: a finished inspection's photo and capture file show on My work's done list, with the outcome's label", async () => {
    const { page } = h;
    const id = await insertInspection({ title: "PLNK bearing noise", due: isoDay(1), status: "in_progress" });
    const up = async (name: string, mimeType: string, buffer: Buffer) =>
      expect((await page.request.post(`${h.baseUrl}/api/inspections/${id}/attachments`, { multipart: { file: { name, mimeType, buffer } } })).status()).toBe(201);
    await up("terminal box.png", "image/png", PNG);
    await up("phase-a.csv", "text/csv", Buffer.from("t,ia\n0,1\n0.001,2\n"));
    expect((await page.request.patch(`${h.baseUrl}/api/inspections/${id}`, { data: { status: "done", outcome: "remeasure", completionNote: "Noise at the drive end; measure again at full load." } })).status()).toBe(200);

    await page.goto(`${h.baseUrl}/my-work`);
    const row = page.getByTestId("done-inspection").filter({ hasText: "PLNK bearing noise" });
    await row.waitFor();
    expect(await row.innerText()).toContain("Re-measure");
    expect(await row.innerText()).not.toMatch(/\bremeasure\b/);
    const files = row.getByTestId("attachment");
    expect(await files.count()).toBe(2);
    expect(await files.nth(0).innerText()).toMatch(/terminal box\.png[\s\S]*\d+ B · photo/);
    expect(await files.nth(1).innerText()).toMatch(/phase-a\.csv[\s\S]*\d+ B · CSV capture/);
    const img = files.nth(0).locator("img");
    await expect.poll(() => img.evaluate((el: HTMLImageElement) => el.complete && el.naturalWidth)).toBe(16);
    const csvHref = await files.nth(1).getByRole("link", { name: "phase-a.csv" }).getAttribute("href");
    expect(csvHref).toMatch(new RegExp(`^/api/inspections/${id}/attachments/\\d+\\?download=1$`));
    const dl = await page.request.get(`${h.baseUrl}${csvHref}`);
    expect(dl.headers()["content-disposition"]).toMatch(/^attachment;/);
    await h.screenshot("plan-links-my-work-done-files");

    await row.getByRole("button", { name: /^Details of/ }).click();
    const dialog = page.getByRole("dialog");
    await dialog.getByRole("heading", { name: "PLNK bearing noise" }).waitFor();
    await dialog.getByText("Noise at the drive end; measure again at full load.").waitFor();
    expect(await dialog.getByTestId("attachment").count()).toBe(2);
    await dialog.getByRole("button", { name: "Close" }).click();
  });

  it("technician: My work's done list shows loading, then an error, instead of 'No finished inspections yet'", async () => {
    const { page } = h;
    let release!: () => void;
    const held = new Promise<void>((r) => (release = r));
    await page.route(/\/api\/inspections\?.*status=done/, async (route) => {
      await held;
      await route.fulfill({ status: 500, contentType: "application/json", body: JSON.stringify({ error: "The server could not read the inspections." }) });
    });
    await page.goto(`${h.baseUrl}/my-work`);
    const section = page.locator("section").filter({ has: page.getByRole("heading", { name: "Recently done" }) });
    await section.getByText("Loading finished inspections…").waitFor();
    expect(await section.getByText("No finished inspections yet").count()).toBe(0);
    release();
    await section.getByRole("alert").filter({ hasText: "The server could not read the inspections." }).waitFor({ timeout: 20_000 });
    expect(await section.getByText("No finished inspections yet").count()).toBe(0);
    await h.screenshot("plan-links-my-work-done-error");
    await page.unroute(/\/api\/inspections\?.*status=done/);
  });

  it("planner: /plan?inspection=<id> opens its dialog with the files; Nobody unassigns; a past date is refused on the field", async () => {
    const { page } = h;
    await h.signOut();
    await h.signIn("planner");
    h.consoleErrors.length = 0; // the sign-in page's own 401 on /api/me is expected
    const done = fx.inspections[fx.inspections.length - 1]; // PLNK bearing noise, done with two files
    await page.goto(`${h.baseUrl}/plan?inspection=${done}`);
    let dialog = page.getByRole("dialog");
    await dialog.getByRole("heading", { name: "PLNK bearing noise" }).waitFor();
    await dialog.getByText("Re-measure", { exact: true }).waitFor();
    expect(await dialog.getByTestId("attachment").count()).toBe(2);
    await expect.poll(() => dialog.locator("img").evaluate((el: HTMLImageElement) => el.naturalWidth)).toBe(16);
    await h.screenshot("plan-links-plan-dialog-files");
    await dialog.getByRole("button", { name: "Close" }).click();
    expect(new URL(page.url()).searchParams.get("inspection")).toBeNull();

    const open = await insertInspection({ title: "PLNK alignment check", due: isoDay(6) });
    await page.goto(`${h.baseUrl}/plan?inspection=${open}`);
    dialog = page.getByRole("dialog");
    await dialog.getByRole("heading", { name: "PLNK alignment check" }).waitFor();
    const form = dialog.getByRole("form", { name: "Reschedule or reassign" });
    const due = form.getByLabel("Due date");
    expect(await due.getAttribute("min")).toBe(isoDay(0));
    await due.fill(isoDay(-1));
    await form.getByText("The due date is in the past.").waitFor();
    expect(await form.getByRole("button", { name: "Save changes" }).isDisabled()).toBe(true);
    await due.fill(isoDay(6));

    await form.getByLabel("Technician").selectOption({ label: "Nobody" });
    await form.getByText("Takes it off their list").waitFor();
    await form.getByRole("button", { name: "Save changes" }).click();
    const history = dialog.getByRole("list", { name: "History" });
    await history.getByText(`${demoUser("technician").name} → nobody`).waitFor();
    expect((await db("inspections").where({ id: open }).first("assignee_id")).assignee_id).toBeNull();
    await h.screenshot("plan-links-plan-unassigned");
    await dialog.getByRole("button", { name: "Close" }).click();
    expect(h.consoleErrors).toEqual([]);
  });

  it("planner: the month view marks overdue with a word, and '+N more' lists the whole day", async () => {
    const { page } = h;
    const overdueDay = isoDay(-2);
    const overdue = await insertInspection({ title: "PLNK overdue insulation test", due: overdueDay });
    await page.goto(`${h.baseUrl}/plan?view=month&month=${monthOf(overdueDay)}`);
    const grid = page.getByRole("grid");
    const item = grid.getByRole("button", { name: /PLNK overdue insulation test/ });
    await item.waitFor();
    expect(await item.getAttribute("data-overdue")).toBe("true");
    expect((await item.innerText()).trim().startsWith("!")).toBe(true);
    expect(await item.textContent()).toContain("Overdue:"); // the spoken word, not only red
    await item.click();
    await page.getByRole("dialog").getByRole("heading", { name: "PLNK overdue insulation test" }).waitFor();
    expect(new URL(page.url()).searchParams.get("inspection")).toBe(String(overdue));
    await page.getByRole("dialog").getByRole("button", { name: "Close" }).click();

    const busyDay = isoDay(3);
    for (let n = 1; n <= 6; n++) await insertInspection({ title: `PLNK walk-down ${n}`, due: busyDay });
    await page.goto(`${h.baseUrl}/plan?view=month&month=${monthOf(busyDay)}`);
    const more = page.getByRole("grid").getByRole("button", { name: /more due on .*: show all/ });
    await more.first().waitFor();
    const label = (await more.first().getAttribute("aria-label")) ?? "";
    expect(label).toMatch(/^\d+ more due on/);
    await h.screenshot("plan-links-month");
    await more.first().click();
    const day = page.getByRole("dialog").filter({ has: page.getByRole("heading", { name: /^Due on / }) });
    await day.getByRole("heading", { name: /^Due on / }).waitFor();
    for (let n = 1; n <= 6; n++) await day.getByRole("button", { name: new RegExp(`PLNK walk-down ${n}\\b`) }).waitFor();
    await h.screenshot("plan-links-month-day-list");
    await day.getByRole("button", { name: /PLNK walk-down 6\b/ }).click();
    await page.getByRole("dialog").getByRole("heading", { name: "PLNK walk-down 6" }).waitFor();
    await page.getByRole("dialog").getByRole("button", { name: "Close" }).click();
  });

  it("planner: at 390 px Plan fits the screen and Needs action's Schedule button is on it", async () => {
    const { page } = h;
    await h.signOut();
    await h.signIn("planner");
    await page.setViewportSize({ width: 390, height: 844 });
    try {
      await page.goto(`${h.baseUrl}/plan`);
      const row = page.getByRole("row").filter({ hasText: "PLNK-P1" }).first();
      await row.waitFor();
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
      const button = row.getByRole("button", { name: "Schedule" });
      const box = (await button.boundingBox())!;
      expect(box.x).toBeGreaterThanOrEqual(0);
      expect(box.x + box.width).toBeLessThanOrEqual(390);
      await h.screenshot("plan-links-plan-390");
      await button.click();
      await page.getByRole("dialog").getByRole("heading", { name: "Schedule an inspection" }).waitFor();
      await page.getByRole("dialog").getByRole("button", { name: "Close" }).click();
      await page.goto(`${h.baseUrl}/plan?view=month`);
      await page.getByRole("grid").waitFor();
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
      await h.screenshot("plan-links-month-390");
    } finally {
      await page.setViewportSize({ width: 1360, height: 860 });
    }
  });
});
