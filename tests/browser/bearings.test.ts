// Bearings on screen: the motor page lists the bearings under the nameplate and lets an admin edit them (field
// messages from the shared schema); the capture's vibration spectrum carries the bearing markers with their own key,
// and the bearing defect lines beside it. Data: the latest capture of the demo's booster pump with its outer-race
// line (server/seed/story.ts), analysed by the real engine (tests/browser/motor-history.ts).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Knex } from "knex";
import { startHarness, type Harness } from "./harness.ts";
import { seedMotorHistory, type SeededHistory } from "./motor-history.ts";

const TAG = "KRB-PMP-P01";
let h: Harness;
let seeded: SeededHistory;
let stored: Record<string, unknown>;

beforeAll(async () => {
  h = await startHarness();
  seeded = await seedMotorHistory(h, [TAG], 1, 1);
  stored = await (h.server.ctx.db as Knex)("assets").where({ tag: TAG }).first();
}, 120_000);
afterAll(async () => {
  // the bearing edit below is put back, so other files see the scenario's motor as seeded
  if (stored) {
    const cols = Object.fromEntries(Object.entries(stored).filter(([k]) => k.startsWith("bearing_") || k === "nameplate_version"));
    await (h.server.ctx.db as Knex)("assets").where({ id: stored.id }).update(cols);
  }
  await seeded?.cleanup();
  await h?.close();
});

describe("bearings", () => {
  it("the capture's vibration spectrum shows the bearing markers with key d, and the lines found beside it", async () => {
    await h.signIn("analyst");
    h.consoleErrors.length = 0; // the sign-in page's own 401 on /api/me is expected
    const id = seeded.captures.get(TAG)![0];
    await h.page.goto(`${h.baseUrl}/captures/${id}`);
    const viewer = h.page.getByTestId("spectrum-vibration");
    await viewer.locator("canvas").first().waitFor();
    // the current spectrum keeps to its own families
    expect(await h.page.getByTestId("spectrum-current").getByRole("checkbox", { name: /Bearing defects|Vibration:/ }).count()).toBe(0);
    const box = viewer.getByRole("checkbox", { name: /Bearing defects/ });
    expect(await box.isChecked()).toBe(true);
    // the key help lists it
    await viewer.focus();
    await h.page.keyboard.press("?");
    await viewer.getByText("Show / hide Bearing defects: FTF, BPFO, BPFI, BSF").waitFor();
    await h.page.keyboard.press("d");
    expect(await box.isChecked()).toBe(false);
    await h.page.keyboard.press("d");
    expect(await box.isChecked()).toBe(true);

    const lines = h.page.getByTestId("bearing-lines");
    await lines.waitFor();
    const text = await lines.innerText();
    expect(text).toMatch(/Drive end\s+6314 C3/);
    expect(text).toMatch(/Non-drive end\s+6213 C3/);
    // the outer-race line of the drive end, found with its level and how far it stands out; the others not found
    expect(text).toMatch(/\nBPFO\s+\d+\.\d\d Hz\s+\d+\.\d\d Hz\s+[\d.]+ m\/s2 r\.m\.s\. \(0\.\d{3} mm\/s\) · \d+\.\d dB over floor · on accel_[hv]/);
    expect(text).toMatch(/not found/);
    await h.screenshot("bearings-capture-spectrum");
    expect(h.consoleErrors).toEqual([]);
  });

  it("the motor page lists the bearings under the nameplate; an admin edits them and gets field messages", async () => {
    await h.signOut();
    await h.signIn("admin");
    h.consoleErrors.length = 0;
    await h.page.goto(`${h.baseUrl}/motors/${stored.id}`);
    const section = h.page.getByTestId("motor-bearings");
    await section.waitFor();
    expect(await section.innerText()).toMatch(/Drive end\s+6314 C3[\s\S]*Rolling elements Nb\s+8[\s\S]*BPFO 3\.\d{3}× fr/);
    const version = Number((await h.page.getByText(/nameplate version \d+/).innerText()).match(/\d+/)![0]);

    await section.getByRole("button", { name: "Edit bearings" }).click();
    const dialog = h.page.getByRole("dialog");
    await dialog.getByRole("heading", { name: `Bearings of ${TAG}` }).waitFor();
    // d larger than D: the shared rule's message under the field, nothing sent
    const nde = dialog.getByRole("group", { name: "Non-drive end" });
    await nde.getByLabel(/Pitch diameter D/).fill("12");
    await dialog.getByRole("button", { name: "Save bearings" }).click();
    await nde.getByText(/The pitch diameter D must be larger than the rolling-element diameter d/).waitFor();
    await h.screenshot("bearings-edit-form");
    // only a designation for the non-drive end: allowed; geometry cleared
    for (const label of [/Rolling elements Nb/, /Element diameter d/, /Pitch diameter D/, /Contact angle/]) await nde.getByLabel(label).fill("");
    await nde.getByLabel("Designation").fill("6213 2Z C3");
    expect(await dialog.getByRole("checkbox", { name: /Analyse this motor's stored captures again/ }).isChecked()).toBe(true);
    await dialog.getByRole("button", { name: "Save bearings" }).click();
    await dialog.waitFor({ state: "hidden" });
    await expect.poll(() => section.innerText()).toMatch(/Non-drive end\s+6213 2Z C3[\s\S]*Nb, d and D are needed/);
    await h.page.getByText(`nameplate version ${version + 1}`).waitFor();
    // the stored capture is queued for analysis with the new bearings (no worker runs here)
    const history = h.page.getByRole("table", { name: /Captures of this motor/ });
    await expect.poll(() => history.innerText()).toMatch(/queued/);
    expect(h.consoleErrors).toEqual([]);
  });

  it("motors without bearings on record say so", async () => {
    const other = await (h.server.ctx.db as Knex)("assets").where({ tag: "KRB-PMP-D01" }).first("id");
    await h.page.goto(`${h.baseUrl}/motors/${other.id}`);
    const section = h.page.getByTestId("motor-bearings");
    await section.waitFor();
    expect((await section.innerText()).match(/not given/g)).toHaveLength(2);
  });
});
