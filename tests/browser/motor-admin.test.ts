// An admin keeps the register through the real UI: adds a motor on Motors (a bad pole count and a taken tag are
// refused on their fields, nothing stored), lands on its page, corrects the full-load speed and has the stored
// captures analysed again, adds, edits and deletes a measurement point, is refused deleting a motor with captures
// (the message says what to do instead) and deletes one without history. Other roles see none of it.
// Screenshots: .screenshots/motor-admin-*.png.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Knex } from "knex";
import type { Locator } from "playwright-core";
import { startHarness, type Harness, confirmAnd as answerConfirm } from "./harness.ts";
import { ANALYSIS_QUEUE, PGBOSS_SCHEMA } from "../../server/queue.ts";

let h: Harness;
let db: Knex;
const sfx = Date.now().toString(36).slice(-5).toUpperCase();
const site = { code: `HW${sfx}`, name: `Hollin weir ${sfx}` };
const tag = `HW-${sfx}-P1`;
const oldTag = `HW-${sfx}-P0`;
let siteId: number;
let areaId: number;
let oldId: number;
let motorId: number;
const captureIds: number[] = [];

beforeAll(async () => {
  h = await startHarness();
  db = h.server.ctx.db as Knex;
  [{ id: siteId }] = await db("sites").insert({ ...site, timezone: "Europe/London" }).returning("id");
  [{ id: areaId }] = await db("areas").insert({ site_id: siteId, name: "Intake pumps" }).returning("id");
  [{ id: oldId }] = await db("assets").insert({ area_id: areaId, tag: oldTag, name: "Old intake pump", rated_rpm: 1470, poles: 4 }).returning("id");
  await h.signIn("admin");
  h.consoleErrors.length = 0; // the sign-in page's own 401 on /api/me is expected
});
afterAll(async () => {
  if (db) {
    if (captureIds.length) {
      await db.raw(`delete from ${PGBOSS_SCHEMA}.job where name = ? and (data->>'captureId')::int = any(?)`, [ANALYSIS_QUEUE, captureIds]).catch(() => undefined);
      await db("analyses").whereIn("capture_id", captureIds).delete();
      await db("captures").whereIn("id", captureIds).delete();
    }
    await db("assets").where({ area_id: areaId }).delete();
    await db("sites").where({ id: siteId }).delete();
  }
  await h?.close();
});

const confirmAnd = (answer: "accept" | "dismiss", button: Locator) => answerConfirm(h.page, answer, button);
const dialog = () => h.page.getByRole("dialog");

describe("admin edits motors and their measurement points", () => {
  it("adds a motor on the register: poles 3 and a taken tag are refused on their fields, then it opens on its page", async () => {
    await h.page.goto(`${h.baseUrl}/motors?siteId=${siteId}`);
    await h.page.getByRole("button", { name: "Add motor" }).click();
    const d = dialog();
    await d.getByRole("heading", { name: "Add a motor" }).waitFor();
    // the register's site filter is preselected
    expect(await d.getByLabel("Site").inputValue()).toBe(String(siteId));
    await d.getByLabel("Tag", { exact: true }).fill(oldTag);
    await d.getByLabel("Name", { exact: true }).fill("Intake pump 1");
    await d.getByLabel("Area").selectOption(String(areaId));
    await d.getByLabel("Rated power").fill("55");
    await d.getByLabel("Rated voltage").fill("400");
    await d.getByLabel("Rated current").fill("98");
    await d.getByLabel("Full-load speed").fill("1480");
    await d.getByLabel("Poles").fill("3");
    await d.getByLabel("Rotor bars").fill("28");
    await d.getByLabel("Power factor").fill("0,86");
    // units stand beside the inputs
    expect(await d.locator("span[aria-hidden=true]").allInnerTexts()).toEqual(expect.arrayContaining(["kW", "V", "A", "Hz", "rpm", "%", "cos φ"]));
    await h.screenshot("motor-admin-add");

    await d.getByRole("button", { name: "Add motor" }).click();
    await d.getByText("Poles must be an even number (2, 4, 6, …)").waitFor();
    expect(await d.getByLabel("Poles").getAttribute("aria-invalid")).toBe("true");
    await h.screenshot("motor-admin-add-poles");

    // Fixed poles: the synchronous speed shows under the full-load speed; the tag is another motor's (409 on the field).
    await d.getByLabel("Poles").fill("4");
    await d.getByText("Below the synchronous 1500 rpm of 4 poles at 50 Hz").waitFor();
    await d.getByRole("button", { name: "Add motor" }).click();
    await d.getByText("Another motor already has this tag").waitFor();
    expect(await d.getByLabel("Tag", { exact: true }).getAttribute("aria-invalid")).toBe("true");
    expect(await db("assets").where({ area_id: areaId }).count<{ count: string }[]>({ count: "*" })).toEqual([{ count: "1" }]);

    await d.getByLabel("Tag", { exact: true }).fill(tag);
    await d.getByRole("button", { name: "Add motor" }).click();
    await h.page.waitForURL(/\/motors\/\d+$/);
    await h.page.getByRole("heading", { name: `${tag} · Intake pump 1` }).waitFor();
    const row = await db("assets").where({ tag }).first();
    motorId = row.id;
    expect(h.page.url()).toBe(`${h.baseUrl}/motors/${motorId}`);
    expect(row).toMatchObject({ area_id: areaId, rated_kw: 55, rated_rpm: 1480, poles: 4, rotor_bars: 28, power_factor: 0.86, rated_hz: 50, nameplate_version: 1 });
    await h.page.getByText(`Motors · ${site.name} · Intake pumps`, { exact: true }).waitFor();
    expect(h.consoleErrors.filter((e) => !/\b409\b/.test(e))).toEqual([]); // the taken tag's answer
  });

  it("corrects the full-load speed and analyses the stored captures again; the page says how many were queued", async () => {
    const capture = { asset_id: motorId, taken_at: new Date(Date.now() - 86_400_000), source: "upload", status: "analysed", format: "wav", file_name: "intake-1.wav" };
    for (const n of [1, 2]) {
      const [{ id }] = await db("captures").insert({ ...capture, file_name: `intake-${n}.wav`, blob_key: `captures/ui-test/${sfx}/${n}.wav` }).returning("id");
      captureIds.push(id);
    }
    await h.page.reload();
    await h.page.getByRole("button", { name: "Edit motor" }).click();
    const d = dialog();
    await d.getByRole("heading", { name: `Edit ${tag}` }).waitFor();
    expect(await d.getByLabel("Full-load speed").inputValue()).toBe("1480");
    // No nameplate change yet: no offer.
    await d.getByLabel("Name", { exact: true }).fill("Intake pump 1 (north)");
    expect(await d.getByTestId("nameplate-change").count()).toBe(0);
    await d.getByLabel("Full-load speed").fill("1475");
    const offer = d.getByTestId("nameplate-change");
    await offer.getByText("You changed the full-load speed: saving starts nameplate version 2.").waitFor();
    const again = offer.getByRole("checkbox", { name: "Analyse the 2 stored captures again with the corrected nameplate" });
    expect(await again.isChecked()).toBe(true);
    await offer.scrollIntoViewIfNeeded();
    await h.screenshot("motor-admin-edit");

    await d.getByRole("button", { name: "Save motor" }).click();
    await d.waitFor({ state: "hidden" });
    await h.page
      .getByTestId("motor-notice")
      .getByText("Motor saved with nameplate version 2. 2 stored captures are queued for analysis with it; the history updates as each one is done.")
      .waitFor();
    await h.page.getByRole("heading", { name: `${tag} · Intake pump 1 (north)` }).waitFor();
    await h.page.getByText("nameplate version 2", { exact: true }).waitFor();
    const history = h.page.getByRole("table", { name: /Captures of this motor/ });
    await expect.poll(() => history.innerText()).toMatch(/intake-1\.wav[\s\S]*queued[\s\S]*|queued[\s\S]*intake-1\.wav/);
    expect(await db("assets").where({ id: motorId }).first()).toMatchObject({ rated_rpm: 1475, nameplate_version: 2, name: "Intake pump 1 (north)" });
    expect((await db("captures").whereIn("id", captureIds).select("status")).map((c) => c.status)).toEqual(["queued", "queued"]);
    await h.screenshot("motor-admin-saved");
  });

  it("adds, edits and deletes a measurement point (the deletion asks first)", async () => {
    const section = h.page.getByTestId("measurement-points");
    await section.getByText("None recorded.").waitFor();
    await section.getByRole("button", { name: "Add point" }).click();
    let d = dialog();
    await d.getByRole("heading", { name: `New measurement point on ${tag}` }).waitFor();
    await d.getByLabel("Name", { exact: true }).fill("Phase A current");
    await d.getByLabel("CT ratio").fill("0");
    await d.getByRole("button", { name: "Add point" }).click();
    await d.getByText("The CT ratio must be above 0").waitFor();
    await d.getByLabel("CT ratio").fill("100");
    await d.getByRole("button", { name: "Add point" }).click();
    await d.waitFor({ state: "hidden" });
    const list = section.getByRole("list", { name: `Measurement points of ${tag}` });
    await expect.poll(() => list.innerText()).toMatch(/Phase A current\s+Edit\s+Delete\s+current \(CT\) · phase A\s+CT 100:1/);

    // Edited into a vibration point: axis, sensitivity and unit follow the kind, the CT ratio goes.
    await section.getByRole("button", { name: "Edit point Phase A current" }).click();
    d = dialog();
    await d.getByLabel("Kind").selectOption("vibration");
    expect(await d.getByLabel("CT ratio").count()).toBe(0);
    await d.getByLabel("Name", { exact: true }).fill("Drive end horizontal");
    await d.getByLabel("Unit").selectOption("m/s2");
    await d.getByLabel("Sensitivity").fill("100");
    await h.screenshot("motor-admin-point-edit");
    await d.getByRole("button", { name: "Save point" }).click();
    await d.waitFor({ state: "hidden" });
    await expect.poll(() => list.innerText()).toMatch(/Drive end horizontal\s+Edit\s+Delete\s+vibration · axis H\s+100 mV\/\(m\/s2\)/);
    const [point] = await db("measurement_points").where({ asset_id: motorId });
    expect(point).toMatchObject({ name: "Drive end horizontal", kind: "vibration", position: "H", ct_ratio: null, sensitivity: 100, unit: "m/s2" });

    const del = section.getByRole("button", { name: "Delete point Drive end horizontal" });
    expect(await confirmAnd("dismiss", del)).toBe(
      `Delete measurement point Drive end horizontal of ${tag}? Captures taken on it keep their data; they are no longer linked to a point.`,
    );
    await h.page.waitForLoadState("networkidle");
    expect(await db("measurement_points").where({ asset_id: motorId })).toHaveLength(1);
    await confirmAnd("accept", del);
    await section.getByText("None recorded.").waitFor();
    expect(await db("measurement_points").where({ asset_id: motorId })).toEqual([]);
  });

  it("a motor with captures is not deleted: the refusal says the register keeps it, and to move it or leave it", async () => {
    const asked = await confirmAnd("accept", h.page.getByRole("button", { name: "Delete motor" }));
    expect(asked).toBe(`Delete motor ${tag} · Intake pump 1 (north) and its measurement points? Only a motor without captures or inspections can be deleted.`);
    await h.page
      .getByTestId("motor-notice")
      .getByRole("alert")
      .getByText(`Motor ${tag} was not deleted: it has 2 captures, and the register keeps a motor with its history. Move it to another area, or leave it in the register.`)
      .waitFor();
    await h.screenshot("motor-admin-delete-refused");
    expect(await db("assets").where({ id: motorId }).first()).toBeTruthy();
    expect(h.page.url()).toBe(`${h.baseUrl}/motors/${motorId}`);
  });

  it("a motor without history is deleted; the register lists it no more", async () => {
    await h.page.goto(`${h.baseUrl}/motors/${oldId}`);
    await h.page.getByRole("heading", { name: `${oldTag} · Old intake pump` }).waitFor();
    await confirmAnd("accept", h.page.getByRole("button", { name: "Delete motor" }));
    await h.page.waitForURL(`${h.baseUrl}/motors`);
    expect(await db("assets").where({ id: oldId }).first()).toBeUndefined();
    await h.page.goto(`${h.baseUrl}/motors?siteId=${siteId}`);
    const table = h.page.getByRole("table", { name: "Motors" });
    await table.getByText(tag).waitFor();
    expect(await table.getByText(oldTag).count()).toBe(0);
    // expected: the 409 above, and the motor model's 422 for the old motor's nameplate without rated kW, V and A
    expect(h.consoleErrors.filter((e) => !/\b(409|422)\b/.test(e))).toEqual([]);
  });

  it("other roles see none of it", async () => {
    await h.signOut();
    await h.signIn("technician");
    await h.page.goto(`${h.baseUrl}/motors`);
    await h.page.getByRole("heading", { name: "Motors" }).waitFor();
    expect(await h.page.getByRole("button", { name: "Add motor" }).count()).toBe(0);
    await h.page.goto(`${h.baseUrl}/motors/${motorId}`);
    await h.page.getByRole("heading", { name: `${tag} · Intake pump 1 (north)` }).waitFor();
    await h.page.getByTestId("measurement-points").waitFor();
    for (const name of ["Edit motor", "Delete motor", "Move to another area", "Add point", "Edit bearings"]) expect(await h.page.getByRole("button", { name }).count()).toBe(0);
  });
});
