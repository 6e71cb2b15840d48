// The "Calendar subscription" panel through the real UI and server: a planner on Plan creates a link, copies it,
// a calendar application (a bare fetch, no cookie) reads it, then rotates and revokes it; a technician does the same
// on My work and gets only her own inspections. Screenshots: .screenshots/calendar-feed-*.png.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Knex } from "knex";
import { startHarness, demoUser, type Harness } from "./harness.ts";

let h: Harness;
let db: Knex;
let feedsFrom = 0;
const fixture = { site: 0, inspections: [] as number[] };

/** What a calendar application does: GET the URL, no cookie. */
async function fetchFeed(url: string) {
  const res = await fetch(url, { redirect: "manual" });
  return { status: res.status, text: await res.text(), cacheControl: res.headers.get("cache-control") };
}
const uids = (ics: string) => [...ics.replace(/\r\n[ \t]/g, "").matchAll(/^UID:(.*)$/gm)].map((m) => m[1]).sort();
const isoDay = (offsetDays: number) => new Date(Date.now() + offsetDays * 86_400_000).toISOString().slice(0, 10);

beforeAll(async () => {
  h = await startHarness();
  db = h.server.ctx.db as Knex;
  feedsFrom = Number((await db("calendar_feeds").max({ m: "id" }))[0].m ?? 0);
  await h.context.grantPermissions(["clipboard-read", "clipboard-write"], { origin: h.baseUrl });
  const tech = await db("users").where({ email: demoUser("technician").email }).first("id");
  const planner = await db("users").where({ email: demoUser("planner").email }).first("id");
  const [site] = await db("sites").insert({ code: "CALB", name: "Calendar Browser Test Works", timezone: "UTC" }).returning("id");
  const [area] = await db("areas").insert({ site_id: site.id, name: "Outfall" }).returning("id");
  const [motor] = await db("assets").insert({ area_id: area.id, tag: "CALB-P1", name: "Outfall pump 1", criticality: "medium", rated_rpm: 1470, poles: 4, rated_kw: 55 }).returning("id");
  fixture.site = site.id;
  const rows = await db("inspections")
    .insert([
      { asset_id: motor.id, title: "CALB bearing check", due_date: isoDay(4), assignee_id: tech.id, priority: "high", status: "planned", created_by: planner.id },
      { asset_id: motor.id, title: "CALB planner walk-down", due_date: isoDay(6), assignee_id: planner.id, priority: "normal", status: "planned", created_by: planner.id },
    ])
    .returning("id");
  fixture.inspections = rows.map((r) => r.id);
}, 120_000);

afterAll(async () => {
  if (db) {
    await db("calendar_feeds").where("id", ">", feedsFrom).delete();
    if (fixture.inspections.length) await db("inspections").whereIn("id", fixture.inspections).delete();
    if (fixture.site) {
      const areas = db("areas").where({ site_id: fixture.site }).select("id");
      await db("assets").whereIn("area_id", areas).delete();
      await db("sites").where({ id: fixture.site }).delete();
    }
  }
  await h?.close();
});

describe("calendar subscription panel", () => {
  it("a planner creates, copies, rotates and revokes the link on Plan", async () => {
    const { page } = h;
    await h.signIn("planner");
    h.consoleErrors.length = 0; // the sign-in page's own 401 on /api/me is expected
    await db("calendar_feeds").where({ user_id: (await db("users").where({ email: demoUser("planner").email }).first("id")).id }).whereNull("revoked_at").update({ revoked_at: db.fn.now() });
    await page.goto(`${h.baseUrl}/plan`);
    const panel = page.getByTestId("calendar-feed");
    await page.getByRole("heading", { name: "Calendar subscription" }).waitFor();
    await panel.getByRole("button", { name: "Create link" }).click();
    const url = (await panel.getByTestId("calendar-feed-url").innerText()).trim();
    expect(url).toMatch(new RegExp(`^${h.baseUrl}/api/calendar/bhc_[0-9a-f]{8}_[A-Za-z0-9_-]{43}\\.ics$`));

    await panel.getByRole("button", { name: "Copy link" }).click();
    await panel.getByRole("button", { name: "Copied" }).waitFor();
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(url);
    expect(await panel.getByRole("link", { name: "Open in calendar app" }).getAttribute("href")).toBe(url.replace(/^http:\/\//, "webcal://"));
    await h.screenshot("calendar-feed-plan-created");

    const feed = await fetchFeed(url);
    expect(feed.status).toBe(200);
    expect(feed.text.startsWith("BEGIN:VCALENDAR\r\n")).toBe(true);
    expect(feed.cacheControl).toBe("private, max-age=1800");
    const open: number[] = await db("inspections").whereIn("status", ["planned", "in_progress"]).pluck("id");
    expect(uids(feed.text)).toEqual(open.map((id) => `inspection-${id}@barhound.local`).sort());

    // After a reload the secret is gone from the screen; the panel shows the prefix and the last fetch.
    await page.reload();
    await panel.getByTestId("calendar-feed-prefix").waitFor();
    expect(await panel.getByTestId("calendar-feed-url").count()).toBe(0);
    expect(await panel.getByTestId("calendar-feed-prefix").innerText()).toBe(`${url.split("/").pop()!.slice(0, 12)}_…`);
    expect(await panel.getByTestId("calendar-feed-last-used").innerText()).not.toBe("Not yet");

    page.once("dialog", (d) => void d.accept());
    await panel.getByRole("button", { name: "Rotate link" }).click();
    const rotated = (await panel.getByTestId("calendar-feed-url").innerText()).trim();
    expect(rotated).not.toBe(url);
    expect((await fetchFeed(url)).status).toBe(404);
    expect((await fetchFeed(rotated)).status).toBe(200);
    await panel.getByRole("button", { name: "I have stored it" }).click();
    expect(await panel.getByTestId("calendar-feed-url").count()).toBe(0);

    page.once("dialog", (d) => void d.accept());
    await panel.getByRole("button", { name: "Revoke" }).click();
    await panel.getByRole("button", { name: "Create link" }).waitFor();
    expect((await fetchFeed(rotated)).status).toBe(404);
    await h.screenshot("calendar-feed-plan-revoked");
    expect(h.consoleErrors).toEqual([]);
  });

  it("a technician subscribes on My work and her feed holds only her own open inspections", async () => {
    const { page } = h;
    await h.signOut();
    await h.signIn("technician");
    h.consoleErrors.length = 0;
    const tech = await db("users").where({ email: demoUser("technician").email }).first("id");
    await db("calendar_feeds").where({ user_id: tech.id }).whereNull("revoked_at").update({ revoked_at: db.fn.now() });
    await page.goto(`${h.baseUrl}/my-work`);
    const panel = page.getByTestId("calendar-feed");
    await panel.getByText("the open inspections assigned to you").waitFor();
    await panel.getByRole("button", { name: "Create link" }).click();
    const url = (await panel.getByTestId("calendar-feed-url").innerText()).trim();
    await h.screenshot("calendar-feed-my-work");

    const feed = await fetchFeed(url);
    expect(feed.status).toBe(200);
    const mine: number[] = await db("inspections").where({ assignee_id: tech.id }).whereIn("status", ["planned", "in_progress"]).pluck("id");
    expect(uids(feed.text)).toEqual(mine.map((id) => `inspection-${id}@barhound.local`).sort());
    expect(uids(feed.text)).toContain(`inspection-${fixture.inspections[0]}@barhound.local`);
    expect(uids(feed.text)).not.toContain(`inspection-${fixture.inspections[1]}@barhound.local`);
    expect(h.consoleErrors).toEqual([]);
  });
});
