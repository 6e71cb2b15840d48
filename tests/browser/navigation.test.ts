import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { navLabels, startHarness, type Harness } from "./harness.ts";
import type { Role } from "../../server/permissions.ts";

// What each role's main navigation must show, in order, and where the role lands after signing in.
const EXPECTED: Record<Role, { nav: string[]; landing: string; heading: string }> = {
  technician: { nav: ["My work", "Fleet", "Motors", "Upload", "Calculator"], landing: "/my-work", heading: "My work" },
  analyst: { nav: ["Review", "Fleet", "Motors", "Upload", "Calculator"], landing: "/review", heading: "Review" },
  planner: { nav: ["Plan", "Fleet", "Motors", "Calculator"], landing: "/plan", heading: "Plan" },
  manager: { nav: ["Fleet", "Motors", "Calculator"], landing: "/fleet", heading: "Fleet" },
  admin: { nav: ["Review", "Fleet", "Motors", "Upload", "Calculator", "Admin", "Outbox"], landing: "/admin", heading: "Admin" },
};

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(async () => {
  await h?.close();
});

describe("sign in and navigation by role", () => {
  it("sends a visitor without a session to Sign in", async () => {
    await h.page.goto(`${h.baseUrl}/plan`);
    await h.page.waitForURL(/\/sign-in\?next=%2Fplan/);
    await expect(h.page.getByRole("heading", { name: "Sign in" }).isVisible()).resolves.toBe(true);
    await h.screenshot("sign-in");
  });

  it("rejects a wrong password with the server's message", async () => {
    await h.page.goto(`${h.baseUrl}/sign-in`);
    await h.page.getByLabel("E-mail").fill("ines.varga@northwend.example");
    await h.page.getByLabel("Password").fill("not-the-password");
    await h.page.getByRole("button", { name: "Sign in" }).click();
    await h.page.getByRole("alert").filter({ hasText: "Wrong e-mail or password." }).waitFor();
  });

  for (const role of Object.keys(EXPECTED) as Role[]) {
    it(`${role}: lands on ${EXPECTED[role].landing} and sees exactly their navigation`, async () => {
      await h.signOut();
      await h.signIn(role);
      const want = EXPECTED[role];
      await h.page.waitForURL((u) => u.pathname === want.landing);
      await h.page.getByRole("heading", { level: 1, name: want.heading }).waitFor();
      expect(await navLabels(h.page)).toEqual(want.nav);
      await expect(h.page.getByTestId("user-role").textContent()).resolves.toBe(role);
      await h.page.waitForLoadState("networkidle").catch(() => undefined);
      await h.screenshot(`landing-${role}`);
    });
  }

  it("shows 'not available' for a screen the role may not use", async () => {
    await h.signOut();
    await h.signIn("manager");
    await h.page.goto(`${h.baseUrl}/admin`);
    await h.page.getByRole("heading", { name: "Not available to your role" }).waitFor();
  });

  it("shows a not-found page for an unknown address", async () => {
    await h.page.goto(`${h.baseUrl}/no-such-screen`);
    await h.page.getByRole("heading", { name: "Page not found" }).waitFor();
    await h.screenshot("not-found");
  });

  it("signs out from the header", async () => {
    await h.page.goto(`${h.baseUrl}/fleet`);
    await h.page.getByRole("button", { name: "Sign out" }).click();
    await h.page.waitForURL(/\/sign-in/);
    await h.page.goto(`${h.baseUrl}/fleet`);
    await h.page.waitForURL(/\/sign-in/);
  });
});
