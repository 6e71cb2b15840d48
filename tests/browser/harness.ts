// Browser-test harness: the real server (API + built client from dist/) on a free port against the test database,
// demo users seeded, and Debian's Chromium driven by playwright-core. Screenshots go to the git-ignored .screenshots/.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { inject } from "vitest";
import { chromium, type BrowserContext, type Locator, type Page } from "playwright-core";
import { startServer, type RunningServer } from "../../server/index.ts";
import { loadConfig } from "../../server/config.ts";
import { seedDemoUsers, DEMO_USERS, DEMO_PASSWORD } from "../../server/seed/demo-users.ts";
import type { Role } from "../../server/permissions.ts";

const ROOT = path.resolve(import.meta.dirname, "../..");
export const SCREENSHOT_DIR = path.join(ROOT, ".screenshots");

export interface Harness {
  server: RunningServer;
  baseUrl: string;
  context: BrowserContext;
  page: Page;
  /** Browser console errors and failed page loads seen so far. */
  consoleErrors: string[];
  signIn(role: Role): Promise<void>;
  signOut(): Promise<void>;
  screenshot(name: string): Promise<string>;
  close(): Promise<void>;
}

export function demoUser(role: Role) {
  return DEMO_USERS.find((u) => u.role === role)!;
}

export async function startHarness(): Promise<Harness> {
  if (!fs.existsSync(path.join(ROOT, "dist/index.html"))) throw new Error("dist/ is missing: run `npx vite build` first (npm test does).");
  const config = loadConfig({ NODE_ENV: "test", JWT_SECRET: "browser-test-secret-for-barhound", DATABASE_URL: inject("databaseUrl"), PORT: "0" });
  config.mailFake = true;
  config.smtp.port = 0;
  config.loginRateLimit = 1000;
  const server = await startServer(config);
  await seedDemoUsers(server.ctx.db);
  const baseUrl = `http://127.0.0.1:${server.port}`;
  // Links in mail use the public URL; point it at the running server.
  config.publicUrl = baseUrl;

  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-chromium-"));
  const context = await chromium.launchPersistentContext(dir, {
    executablePath: "/usr/bin/chromium",
    headless: true,
    viewport: { width: 1360, height: 860 },
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
  const page = context.pages()[0] ?? (await context.newPage());
  page.setDefaultTimeout(15_000);
  const consoleErrors: string[] = [];
  page.on("console", (m) => {
    if (m.type() === "error") consoleErrors.push(m.text());
  });
  page.on("pageerror", (e) => consoleErrors.push(String(e)));
  fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });

  const h: Harness = {
    server,
    baseUrl,
    context,
    page,
    consoleErrors,
    async signIn(role) {
      const u = demoUser(role);
      await page.goto(`${baseUrl}/sign-in`);
      await page.getByLabel("E-mail").fill(u.email);
      await page.getByLabel("Password").fill(DEMO_PASSWORD);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
      await page.getByTestId("user-name").waitFor();
    },
    async signOut() {
      await context.clearCookies();
      await page.goto(`${baseUrl}/sign-in`);
    },
    async screenshot(name) {
      const file = path.join(SCREENSHOT_DIR, `${name}.png`);
      // A full-page capture keeps the scroll offset, so the sticky header would be drawn where the window was
      // scrolled to, over the content. Capture from the top, where it sits in its own place, then scroll back.
      const y = await page.evaluate(() => {
        const at = window.scrollY;
        window.scrollTo(0, 0);
        return at;
      });
      await page.screenshot({ path: file, fullPage: true });
      await page.evaluate((at) => window.scrollTo(0, at), y);
      return file;
    },
    async close() {
      await context.close().catch(() => undefined);
      await server.close().catch(() => undefined);
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
  return h;
}

/** The labels of the main navigation, in order. */
export async function navLabels(page: Page): Promise<string[]> {
  const nav = page.getByRole("navigation", { name: "Main" });
  await nav.getByRole("link").first().waitFor();
  return (await nav.getByRole("link").allInnerTexts()).map((t) => t.trim());
}

/** Click a button that opens the browser's confirmation (window.confirm), answer it, and hand back what it asked. */
export async function confirmAnd(page: Page, answer: "accept" | "dismiss", button: Locator): Promise<string> {
  const asked = new Promise<string>((resolve) =>
    page.once("dialog", (d) => {
      resolve(d.message());
      void (answer === "accept" ? d.accept() : d.dismiss());
    }),
  );
  await button.click();
  return asked;
}
