// The analyst's path: Review queue → one capture's spectrum (markers, cursor keys, zoom, full range, key help)
// → a verdict on its finding. Data: the last captures of a motor whose rotor is deteriorating, analysed by the
// real engine (tests/browser/motor-history.ts).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startHarness, type Harness } from "./harness.ts";
import { seedMotorHistory, type SeededHistory } from "./motor-history.ts";

const TAG = "GBT-CNV-C07";
let h: Harness;
let seeded: SeededHistory;
let reviewedCapture: number;

beforeAll(async () => {
  h = await startHarness();
  seeded = await seedMotorHistory(h, [TAG], 6, 6);
}, 120_000);
afterAll(async () => {
  await seeded?.cleanup();
  await h?.close();
});

describe("analyst review", () => {
  it("lands on Review with the deteriorating motor's capture, worst first", async () => {
    await h.signIn("analyst");
    h.consoleErrors.length = 0; // the sign-in page's own 401 on /api/me is expected
    await h.page.waitForURL(/\/review$/);
    const row = h.page.getByRole("row").filter({ hasText: TAG }).first();
    await row.waitFor();
    // the grade is shown with its R-number and name, not as a colour
    expect(await row.getByRole("img", { name: /Rotor grade R[2-5] / }).count()).toBeGreaterThan(0);
    expect(await row.innerText()).toMatch(/%/); // load with its unit
    await h.screenshot("analyst-review-queue");
  });

  it("opens the capture's spectrum with the engine's markers and a cursor driven by the keys", async () => {
    const row = h.page.getByRole("row").filter({ hasText: TAG }).first();
    await row.getByRole("link", { name: /Review spectrum/ }).click();
    await h.page.waitForURL(/\/captures\/\d+$/);
    reviewedCapture = Number(new URL(h.page.url()).pathname.split("/").pop());
    const viewer = h.page.getByTestId("spectrum-current");
    await viewer.locator("canvas").first().waitFor();
    await viewer.getByText(/every bin shown|min\/max of/).waitFor();
    // marker families the engine reported, each with its key
    for (const name of [/Supply f/, /Broken-bar sidebands/]) expect(await viewer.getByRole("checkbox", { name }).isChecked()).toBe(true);
    // readings beside the plot, with units; the broken-bar count is labelled an estimate
    const readings = h.page.getByRole("heading", { name: "Readings" }).locator("xpath=ancestor::section[1]");
    const text = await readings.innerText();
    expect(text).toMatch(/Hz/);
    expect(text).toMatch(/slip frequency s·f/);
    expect(text).toMatch(/estimate/);

    await viewer.focus();
    await h.page.keyboard.press("ArrowRight");
    await h.page.keyboard.press("ArrowRight");
    const readout = viewer.getByText("Cursor", { exact: true }).locator("..");
    await expect.poll(() => readout.innerText()).toMatch(/\d+\.\d+ Hz/);
    expect(await readout.innerText()).toMatch(/sf|Hz/);

    // a marker family toggles with its key
    await h.page.keyboard.press("b");
    expect(await viewer.getByRole("checkbox", { name: /Broken-bar sidebands/ }).isChecked()).toBe(false);
    await h.page.keyboard.press("b");

    // zoom in (refetch at full resolution), then the full range (decimated by the server)
    await h.page.keyboard.press("+");
    await viewer.getByText(/every bin shown/).waitFor();
    await h.page.keyboard.press("f");
    await viewer.getByText(/min\/max of \d+ buckets/).waitFor();
    const count = Number((await viewer.getByText(/min\/max of \d+ buckets/).innerText()).match(/of (\d+) buckets/)![1]);
    expect(count).toBeLessThanOrEqual(4000);

    await h.page.keyboard.press("?");
    await viewer.getByText(/Step the cursor to the previous \/ next peak/).waitFor();
    await h.page.keyboard.press("a");
    await h.screenshot("analyst-capture-spectrum");
  });

  it("records a verdict on the finding, asking for a note when dismissing", async () => {
    const form = h.page.getByTestId("verdict-form").first();
    await form.waitFor();
    await form.getByRole("radio", { name: /Dismiss/ }).check();
    await form.getByRole("button", { name: "Record verdict" }).click();
    await form.getByText(/Say why in the note/).waitFor();
    await form.getByRole("radio", { name: /Ask for a re-measure/ }).check();
    await form.getByLabel("Note").fill("Load swung during the capture; please re-measure at steady load.");
    await form.getByRole("button", { name: "Record verdict" }).click();
    await h.page.getByText(/Re-measure asked/).first().waitFor();
    await h.screenshot("analyst-verdict-recorded");
    expect(h.consoleErrors.filter((e) => !/favicon/.test(e))).toEqual([]);
  });

  it("the queue's 'All, with verdicts' view shows each verdict with who and when; the waiting clock stops", async () => {
    await h.page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Review", exact: true }).click();
    await h.page.waitForURL(/\/review$/);
    // waiting (the default): the answered capture has left the queue, and there is no verdict column
    await h.page.getByRole("row").filter({ hasText: TAG }).first().waitFor();
    await expect.poll(() => h.page.locator(`tr:has(a[href="/captures/${reviewedCapture}"])`).count()).toBe(0); // once the cached list is refetched
    expect(await h.page.getByRole("columnheader", { name: "Verdict" }).count()).toBe(0);

    await h.page.getByLabel("Show").selectOption("all");
    await h.page.getByRole("columnheader", { name: "Verdict" }).waitFor();
    const row = h.page.locator(`tr:has(a[href="/captures/${reviewedCapture}"])`);
    await row.waitFor();
    const verdict = row.locator('[data-verdict="remeasure"]');
    expect(await verdict.innerText()).toMatch(/^Re-measure asked by Tobias Renn · \d{2} \w{3,4} \d{4}, \d{2}:\d{2}$/);
    expect(await row.locator('[data-verdict="open"]').count()).toBe(0);
    expect(await row.innerText()).toMatch(/every finding has a verdict/);
    // a capture still waiting says so in the verdict column and keeps its clock
    const waiting = h.page.getByRole("row").filter({ has: h.page.locator('[data-verdict="open"]') }).first();
    expect(await waiting.innerText()).toMatch(/waiting for a verdict/);
    expect(await waiting.innerText()).toMatch(/\d+ (min|h|d|wk)/);
    await h.screenshot("analyst-review-all-verdicts");
    expect(h.consoleErrors.filter((e) => !/favicon/.test(e))).toEqual([]);
  });
});
