// The manager's path: Fleet (grade counts with labelled bars, worst first, load histogram, exports) → one
// motor's page (trends with grade boundaries, the projection labelled as an estimate, the motor-model curves).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { SCREENSHOT_DIR, startHarness, type Harness } from "./harness.ts";
import { seedMotorHistory, type SeededHistory } from "./motor-history.ts";

const TAG = "TWT-HLP-P03";
/** A vibration zone change this week (B → C, as the demo's baghouse fan went), written as two analyses of its own. */
const ZONE_TAG = "GBT-DST-F01";
let h: Harness;
let seeded: SeededHistory;
const zoneCaptures: number[] = [];

beforeAll(async () => {
  h = await startHarness();
  seeded = await seedMotorHistory(h, [TAG], 8, 1);
  const db = h.server.ctx.db;
  const assetId = seeded.assetIds.get(ZONE_TAG) ?? (await db("assets").where({ tag: ZONE_TAG }).first("id")).id;
  for (const [daysAgo, zone, rms] of [[10, "B", 2.1], [2, "C", 3.3]] as const) {
    const at = new Date(Date.now() - daysAgo * 86_400_000);
    const [cap] = await db("captures").insert({ asset_id: assetId, taken_at: at, source: "upload", status: "analysed", format: "csv", file_name: `zone-${zone}.csv` }).returning("id");
    zoneCaptures.push(cap.id);
    await db("analyses").insert({
      capture_id: cap.id, asset_id: assetId, version: 1, is_current: true, engine_version: "test", nameplate_version: 1, params: "{}", result: "{}",
      taken_at: at, rotor_grade: "R1", rotor_assessable: true, sideband_db: 58, load_pct: 80, vibration_zone: zone, vibration_rms: rms,
    });
  }
}, 120_000);
afterAll(async () => {
  if (zoneCaptures.length) {
    const db = h.server.ctx.db;
    await db("analyses").whereIn("capture_id", zoneCaptures).delete();
    await db("captures").whereIn("id", zoneCaptures).delete();
  }
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

  it("lists this week's vibration zone changes beside the grade changes, with the motor, old → new, when and the capture", async () => {
    const changes = h.page.getByRole("heading", { name: "Changed in the last 7 days" }).locator("xpath=ancestor::section[1]");
    const zone = changes.getByRole("listitem").filter({ hasText: ZONE_TAG });
    await zone.waitFor();
    expect(await zone.getAttribute("data-change-kind")).toBe("vibration");
    expect(await zone.innerText()).toMatch(/worse/);
    expect(await zone.getByRole("img").evaluateAll((els) => els.map((e) => e.getAttribute("aria-label")))).toEqual([expect.stringMatching(/^Vibration Zone B/), expect.stringMatching(/^Vibration Zone C/)]);
    expect(await zone.getByRole("link", { name: ZONE_TAG }).getAttribute("href")).toMatch(/^\/motors\/\d+$/);
    expect(await zone.getByRole("link", { name: /^Capture of / }).getAttribute("href")).toBe(`/captures/${zoneCaptures[1]}`);
    // worst first: worse changes before better ones
    const directions = await changes.getByRole("listitem").evaluateAll((els) => els.map((e) => (e.textContent ?? "").includes("worse")));
    expect(directions).toEqual([...directions].sort((a, b) => Number(b) - Number(a)));
    await changes.scrollIntoViewIfNeeded();
    await changes.screenshot({ path: `${SCREENSHOT_DIR}/manager-fleet-changes.png` });
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
