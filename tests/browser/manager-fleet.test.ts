// The manager's path: Fleet (grade counts with labelled bars, worst first, load histogram, exports) → one
// motor's page (trends with grade boundaries, the projection labelled as an estimate, the motor-model curves).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startHarness, type Harness } from "./harness.ts";
import { seedMotorHistory, type SeededHistory } from "./motor-history.ts";

const TAG = "TWT-HLP-P03";
let h: Harness;
let seeded: SeededHistory;

beforeAll(async () => {
  h = await startHarness();
  seeded = await seedMotorHistory(h, [TAG], 8, 1);
}, 120_000);
afterAll(async () => {
  await seeded?.cleanup();
  await h?.close();
});

describe("manager fleet", () => {
  it("lands on Fleet with grade counts that do not rely on colour, the load histogram and the exports", async () => {
    await h.signIn("manager");
    h.consoleErrors.length = 0; // the sign-in page's own 401 on /api/me is expected
    await h.page.waitForURL(/\/fleet$/);
    await h.page.getByRole("heading", { name: "Rotor grades across the fleet" }).waitFor();
    const bar = h.page.getByRole("img", { name: /^Motors per rotor grade: / });
    expect(await bar.getAttribute("aria-label")).toMatch(/R\d \w+/);
    expect(await h.page.getByRole("img", { name: /^Load histogram/ }).count()).toBe(1);
    expect(await h.page.getByRole("link", { name: "Export CSV" }).getAttribute("href")).toBe("/api/fleet.csv");
    expect(await h.page.getByRole("link", { name: /Printable site report/ }).first().getAttribute("href")).toMatch(/^\/api\/sites\/\d+\/report$/);
    const worst = h.page.getByRole("heading", { name: "Worst first" }).locator("xpath=ancestor::section[1]");
    await worst.getByRole("link", { name: TAG }).waitFor();
    await h.screenshot("manager-fleet");
  });

  it("drills down to the motor page: trends with boundaries, a labelled projection and the model curves", async () => {
    const worst = h.page.getByRole("heading", { name: "Worst first" }).locator("xpath=ancestor::section[1]");
    await worst.getByRole("link", { name: TAG }).click();
    await h.page.waitForURL(/\/motors\/\d+$/);
    await h.page.getByRole("heading", { name: "Lower sideband depth below supply" }).waitFor();
    await h.page.getByRole("img", { name: /Sideband depth over time with grade boundaries/ }).waitFor();
    const projection = h.page.getByTestId("projection");
    expect(await projection.innerText()).toMatch(/estimate/i);
    await h.page.getByRole("heading", { name: "Torque–speed" }).waitFor();
    await h.page.getByRole("heading", { name: "Capture history" }).waitFor();
    // the verdict form is for analysts only
    expect(await h.page.getByTestId("verdict-form").count()).toBe(0);
    // The trends share one pointer: over the load chart, every trend chart reads out the same capture date.
    const load = h.page.getByRole("img", { name: "Load percentage over time" });
    await load.scrollIntoViewIfNeeded();
    const over = (await load.locator(".u-over").boundingBox())!;
    await h.page.mouse.move(over.x + over.width * 0.5, over.y + over.height * 0.5);
    const readouts = h.page.locator("[data-readout]:visible");
    await expect.poll(() => readouts.count()).toBe(4);
    const texts = await readouts.allTextContents();
    const dates = new Set(texts.map((t) => t.split(" · ")[0]));
    expect(dates.size, texts.join(" | ")).toBe(1);
    expect(texts.map((t) => t.split(" · ")[1].replace(/[\d.]+ /, ""))).toEqual(expect.arrayContaining(["dB", "%", "mm/s"]));
    await h.page.mouse.move(0, 0);
    await h.page.waitForLoadState("networkidle").catch(() => undefined);
    await h.screenshot("manager-motor");
    expect(h.consoleErrors.filter((e) => !/favicon/.test(e))).toEqual([]);
  });
});
