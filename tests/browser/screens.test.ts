import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startHarness, type Harness } from "./harness.ts";

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(async () => {
  await h?.close();
});

describe("technician", () => {
  it("sees the safety caution on Upload before the first upload, and it is acknowledged once per session", async () => {
    await h.signOut();
    await h.signIn("technician");
    await h.page.goto(`${h.baseUrl}/upload`);
    const caution = h.page.getByTestId("safety-caution");
    await caution.waitFor();
    const text = await caution.innerText();
    expect(text).toMatch(/qualified persons/i);
    expect(text).toMatch(/protective equipment/i);
    expect(text).toMatch(/local electrical codes/i);
    expect(await h.page.getByRole("button", { name: "Choose files…" }).isDisabled()).toBe(true);
    await h.screenshot("upload-caution");
    await h.page.getByRole("button", { name: /I understand/ }).click();
    expect(await h.page.getByRole("button", { name: "Choose files…" }).isEnabled()).toBe(true);
    await h.page.reload();
    await h.page.getByRole("button", { name: "Choose files…" }).waitFor();
    expect(await h.page.getByRole("button", { name: /I understand/ }).count()).toBe(0);
  });

  it("refuses a file that is not CSV or WAV before sending it", async () => {
    await h.page.getByTestId("file-input").setInputFiles({ name: "photo.jpg", mimeType: "image/jpeg", buffer: Buffer.from("not a capture") });
    const row = h.page.getByTestId("upload-row").filter({ hasText: "photo.jpg" });
    await row.getByText(/Not a CSV or WAV file/).waitFor();
    await h.screenshot("upload-rejected-file");
  });

  it("opens My work", async () => {
    await h.page.goto(`${h.baseUrl}/my-work`);
    await h.page.getByRole("heading", { name: "To do" }).waitFor();
    await h.page.waitForLoadState("networkidle").catch(() => undefined);
    await h.screenshot("my-work");
  });
});

describe("planner", () => {
  it("opens Plan with list and month views and export links", async () => {
    await h.signOut();
    await h.signIn("planner");
    await h.page.getByRole("heading", { name: "Needs action" }).waitFor();
    expect(await h.page.getByRole("link", { name: "Export CSV" }).getAttribute("href")).toBe("/api/inspections.csv");
    expect(await h.page.getByRole("link", { name: /Calendar file/ }).getAttribute("href")).toBe("/api/inspections.ics");
    await h.screenshot("plan-list");
    await h.page.getByRole("button", { name: "Month" }).click();
    await h.page.getByRole("grid").waitFor();
    await h.screenshot("plan-month");
    await h.page.getByRole("button", { name: "Schedule inspection" }).click();
    await h.page.getByRole("dialog").getByRole("heading", { name: "Schedule an inspection" }).waitFor();
    await h.page.getByRole("dialog").getByRole("button", { name: "Schedule", exact: true }).click();
    await h.page.getByRole("dialog").getByText("Pick a motor.").waitFor();
    await h.page.getByRole("dialog").getByText("Pick a technician.").waitFor();
    await h.screenshot("plan-schedule-dialog");
  });
});

describe("admin", () => {
  it("invites a user, and the mail appears in Outbox with a working link", async () => {
    await h.signOut();
    await h.signIn("admin");
    const email = `new.person.${Date.now()}@northwend.example`;
    const form = h.page.getByRole("form", { name: "Invite a user" });
    await form.getByLabel("Name").fill("Noor Halden");
    await form.getByLabel("E-mail").fill(email);
    await form.getByLabel("Role").selectOption("analyst");
    await form.getByRole("button", { name: "Send invitation" }).click();
    await h.page.getByText(`Invitation sent to ${email}`).waitFor();
    await h.page.getByRole("cell", { name: email }).waitFor();
    await h.screenshot("admin-users");

    await h.page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Outbox" }).click();
    const list = h.page.getByRole("list", { name: "Caught mail" });
    const item = list.getByRole("button").filter({ hasText: email });
    await item.waitFor({ timeout: 20_000 }).catch(async () => {
      await h.page.getByRole("button", { name: "Refresh" }).click();
      await item.waitFor({ timeout: 10_000 });
    });
    await item.click();
    const view = h.page.getByTestId("mail-view");
    await view.getByRole("heading", { name: "You are invited to Barhound" }).waitFor();
    await h.screenshot("outbox");
    const link = view.getByRole("link", { name: /set-password\?token=/ });
    await link.click();
    await h.page.waitForURL(/\/set-password\?token=/);
    await h.page.getByText(email).waitFor();
    await h.screenshot("set-password-invite");
  });

  it("shows the admin sections", async () => {
    await h.page.goto(`${h.baseUrl}/admin/sites`);
    await h.page.getByRole("heading", { name: "New site" }).waitFor();
    await h.screenshot("admin-sites");
    await h.page.goto(`${h.baseUrl}/admin/import`);
    await h.page.getByRole("heading", { name: "Import the motor register" }).waitFor();
    await h.screenshot("admin-import");
    await h.page.goto(`${h.baseUrl}/admin/gateways`);
    await h.page.getByRole("heading", { name: "New gateway" }).waitFor();
    await h.screenshot("admin-gateways");
  });
});
