// Admin → Sites and areas through the real UI: a deletion asks first (cancel keeps everything), the server's
// refusal of an area or site that still holds motors is shown in the site's card with nothing removed, an edit
// keeps the fields not touched, and once the motor is moved away on its own page the site can be deleted.
// Screenshots: .screenshots/admin-sites-*.png.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Knex } from "knex";
import type { Locator } from "playwright-core";
import { startHarness, type Harness, confirmAnd as answerConfirm } from "./harness.ts";

let h: Harness;
let db: Knex;
const sfx = Date.now().toString(36).slice(-5).toUpperCase();
const site = { code: `LF${sfx}`, name: `Larkfield works ${sfx}` };
const other = { code: `MR${sfx}`, name: `Millrace depot ${sfx}` };
let siteId: number;
let otherId: number;
const areaIds: Record<string, number> = {};
let motorId: number;

beforeAll(async () => {
  h = await startHarness();
  db = h.server.ctx.db as Knex;
  [{ id: siteId }] = await db("sites").insert({ ...site, timezone: "Europe/Lisbon" }).returning("id");
  [{ id: otherId }] = await db("sites").insert({ ...other, timezone: "Europe/Lisbon" }).returning("id");
  for (const [siteRef, name] of [[siteId, "Empty bay"], [siteId, "Pump hall"], [otherId, "Store"]] as const)
    [{ id: areaIds[name] }] = await db("areas").insert({ site_id: siteRef, name }).returning("id");
  [{ id: motorId }] = await db("assets")
    .insert({ area_id: areaIds["Pump hall"], tag: `LF-${sfx}-P1`, name: "Raw water pump 1", rated_rpm: 1475, poles: 4, rated_kw: 37 })
    .returning("id");
  await h.signIn("admin");
});
afterAll(async () => {
  await h?.close();
});

const card = (name: string): Locator => h.page.locator("section").filter({ has: h.page.getByRole("heading", { name }) });
const confirmAnd = (answer: "accept" | "dismiss", button: Locator) => answerConfirm(h.page, answer, button);

describe("admin deletes sites and areas", () => {
  it("asks before deleting an area: cancel keeps it, OK deletes it and the list refreshes", async () => {
    await h.page.goto(`${h.baseUrl}/admin/sites`);
    const areas = card(site.name).getByRole("list", { name: `Areas of ${site.name}` });
    await areas.getByText("Empty bay").waitFor();
    const del = card(site.name).getByRole("button", { name: "Delete area Empty bay" });

    expect(await confirmAnd("dismiss", del)).toBe(`Delete area Empty bay of ${site.name}? Only an area without motors can be deleted.`);
    await h.page.waitForLoadState("networkidle");
    expect(await areas.getByText("Empty bay").count()).toBe(1);
    expect(await db("areas").where({ id: areaIds["Empty bay"] }).first()).toBeTruthy();

    await confirmAnd("accept", del);
    await areas.getByText("Empty bay").waitFor({ state: "detached" });
    expect(await db("areas").where({ id: areaIds["Empty bay"] }).first()).toBeUndefined();
    expect(await areas.getByRole("listitem").allInnerTexts()).toEqual([expect.stringContaining("Pump hall")]);
  });

  it("shows the refusal of an area or site that still holds motors in the card; nothing is removed", async () => {
    const c = card(site.name);
    await confirmAnd("accept", c.getByRole("button", { name: "Delete area Pump hall" }));
    await c.getByRole("alert").getByText(`Area Pump hall (${site.name}) was not deleted. It still holds 1 motor: move it to another area or delete it first.`).waitFor();

    expect(await confirmAnd("accept", c.getByRole("button", { name: `Delete site ${site.name}` }))).toBe(
      `Delete site ${site.code} · ${site.name} and its area? Only a site without motors can be deleted.`,
    );
    await c.getByRole("alert").getByText(/was not deleted\. It still holds 1 motor \(Pump hall: 1\): move it to an area of another site or delete it first\.$/).waitFor();
    await h.screenshot("admin-sites-refused");
    expect(await db("sites").where({ id: siteId }).first()).toBeTruthy();
    expect(await db("areas").where({ id: areaIds["Pump hall"] }).first()).toBeTruthy();
    expect((await db("assets").where({ id: motorId }).first()).area_id).toBe(areaIds["Pump hall"]);
  });

  it("edits a site: the name changes, the time zone not touched stays", async () => {
    await card(site.name).getByRole("button", { name: `Edit site ${site.name}` }).click();
    const form = h.page.getByRole("form", { name: `Edit site ${site.name}` });
    await form.getByLabel("Name").fill(`${site.name} north`);
    await form.getByRole("button", { name: "Save site" }).click();
    site.name = `${site.name} north`;
    await card(site.name).waitFor();
    expect(await db("sites").where({ id: siteId }).first()).toMatchObject({ name: site.name, code: site.code, timezone: "Europe/Lisbon" });
  });

  it("after the motor is moved to another site on its page, the site is deleted", async () => {
    await h.page.goto(`${h.baseUrl}/motors/${motorId}`);
    await h.page.getByRole("button", { name: "Move to another area" }).click();
    const dialog = h.page.getByRole("dialog");
    await dialog.getByText(`Now in ${site.name} · Pump hall.`).waitFor();
    await dialog.getByLabel("Site").selectOption(String(otherId));
    await dialog.getByLabel("Area").selectOption(String(areaIds.Store));
    await h.screenshot("admin-sites-move-motor");
    await dialog.getByRole("button", { name: "Move", exact: true }).click();
    await dialog.waitFor({ state: "hidden" });
    await h.page.getByText(`Motors · ${other.name} · Store`, { exact: true }).waitFor();
    expect((await db("assets").where({ id: motorId }).first()).area_id).toBe(areaIds.Store);

    await h.page.goto(`${h.baseUrl}/admin/sites`);
    await confirmAnd("accept", card(site.name).getByRole("button", { name: `Delete site ${site.name}` }));
    await card(site.name).waitFor({ state: "detached" });
    expect(await db("sites").where({ id: siteId }).first()).toBeUndefined();
    expect(await db("areas").where({ site_id: siteId })).toEqual([]);
    expect(await db("audit_log").where({ action: "site.deleted", subject_id: String(siteId) }).first()).toBeTruthy();
    await h.screenshot("admin-sites-after-delete");
  });
});
