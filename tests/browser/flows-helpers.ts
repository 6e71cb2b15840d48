// Helpers for the role-flow browser tests (role-flows.test.ts): a real analysis worker reading the harness
// server's blobs, a second browser for a role watching alongside, socket.io frames seen by a page, a "no reload"
// mark, and the cleanup of everything the flows added.
import fs from "node:fs";
import path from "node:path";
import type { Knex } from "knex";
import { chromium, type Browser, type Page } from "playwright-core";
import { startWorker, type WorkerProcess } from "../helpers/pipeline.ts";
import { DEMO_PASSWORD } from "../../server/seed/demo-users.ts";
import type { BlobStore } from "../../server/blob/store.ts";
import type { Role } from "../../server/permissions.ts";
import { demoUser, SCREENSHOT_DIR, type Harness } from "./harness.ts";

export const FLOW_SHOTS = path.join(SCREENSHOT_DIR, "flows");

/**
 * workers/worker.ts as its own process (process.execPath --import tsx), on the test database and the SAME blob
 * store as the harness server: the harness leaves DATA_DIR unset (".data", relative to the working folder) and the
 * blob driver "fs", so the worker gets the server's resolved dataDir and driver explicitly, whatever the shell says.
 */
export async function startFlowWorker(h: Harness, env: Record<string, string> = {}): Promise<WorkerProcess> {
  const { config } = h.server.ctx;
  if (config.blob.driver !== "fs") throw new Error("role flows expect the harness's fs blob store");
  const worker = startWorker({ BLOB_DRIVER: "fs", DATA_DIR: path.resolve(config.dataDir), ...env });
  await worker.ready;
  return worker;
}

export interface SidePage {
  page: Page;
  close(): Promise<void>;
}

/** A second Chromium (own cookies), signed in as a role through the sign-in form, for a person watching alongside. */
export async function openSidePage(h: Harness, role: Role): Promise<SidePage> {
  const browser: Browser = await chromium.launch({
    executablePath: "/usr/bin/chromium",
    headless: true,
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
  const context = await browser.newContext({ viewport: { width: 1360, height: 860 } });
  const page = await context.newPage();
  page.setDefaultTimeout(15_000);
  const u = demoUser(role);
  await page.goto(`${h.baseUrl}/sign-in`);
  await page.getByLabel("E-mail").fill(u.email);
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
  await page.getByTestId("user-name").waitFor();
  return { page, close: () => browser.close().catch(() => undefined) };
}

export interface SocketEvent {
  at: number;
  name: string;
  payload: Record<string, unknown>;
}

/** Every socket.io event a page receives over its websocket(s) from now on ("42[name, payload]" frames). */
export function recordSocketEvents(page: Page): SocketEvent[] {
  const events: SocketEvent[] = [];
  page.on("websocket", (ws) => {
    ws.on("framereceived", ({ payload }) => {
      const s = typeof payload === "string" ? payload : payload.toString("utf8");
      if (!s.startsWith("42")) return;
      try {
        const [name, body] = JSON.parse(s.slice(2)) as [string, Record<string, unknown>];
        events.push({ at: Date.now(), name, payload: body ?? {} });
      } catch {
        /* not an event frame */
      }
    });
  });
  return events;
}

/** Put a token on the page's window; it survives client-side navigation and renders, not a reload. */
export async function markPage(page: Page): Promise<string> {
  const token = `flow-${Date.now()}-${Math.random().toString(36).slice(2)}`;
  await page.evaluate((t) => ((window as unknown as { __flowMark?: string }).__flowMark = t), token);
  return token;
}
export async function pageMark(page: Page): Promise<string | undefined> {
  return page.evaluate(() => (window as unknown as { __flowMark?: string }).__flowMark);
}

/** Record the values a capture-status line's data-status takes (rendered states, in order, without repeats). */
export async function watchCaptureStatuses(page: Page): Promise<void> {
  await page.evaluate(() => {
    const w = window as unknown as { __statuses?: string[] };
    w.__statuses = [];
    const note = () => {
      for (const el of document.querySelectorAll<HTMLElement>('[data-testid="capture-status"]')) {
        const s = el.dataset.status ?? "";
        if (w.__statuses!.at(-1) !== s) w.__statuses!.push(s);
      }
    };
    new MutationObserver(note).observe(document.body, { subtree: true, childList: true, attributes: true, attributeFilter: ["data-status"] });
  });
}
export async function seenCaptureStatuses(page: Page): Promise<string[]> {
  return page.evaluate(() => (window as unknown as { __statuses?: string[] }).__statuses ?? []);
}

/** "Motors per rotor grade: 1 R5 Severe, 3 R1 Sound, 31 No data" → counts by the bar's labels. */
export function parseGradeBar(label: string): Record<string, number> {
  const counts: Record<string, number> = { "R1 Sound": 0, "R2 Watch": 0, "R3 Developing": 0, "R4 Serious": 0, "R5 Severe": 0, "Not assessable": 0, "No data": 0 };
  const list = label.replace(/^[^:]*:\s*/, "");
  for (const m of list.matchAll(/(\d+) (R\d \w+|Not assessable|No data)/g)) counts[m[2]] = Number(m[1]);
  return counts;
}

/** The fleet-data grade key → the label the Fleet bar uses. */
export const GRADE_LABEL: Record<string, string> = {
  R1: "R1 Sound", R2: "R2 Watch", R3: "R3 Developing", R4: "R4 Serious", R5: "R5 Severe", notAssessable: "Not assessable", noData: "No data",
};

/** The highest id of each table now, so cleanup removes only rows added after. */
export async function highWater(db: Knex, tables: string[]): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of tables) out[t] = Number((await db(t).max({ m: "id" }).first())?.m ?? 0);
  return out;
}

/** Remove what the flows added for one motor: inspections, captures (analyses, findings, verdicts cascade), their blobs, mail, audit. */
export async function cleanupFlows(h: Harness, assetId: number, from: Record<string, number>): Promise<void> {
  const db = h.server.ctx.db as Knex;
  const blob = h.server.ctx.services.blob as BlobStore;
  const captures: { id: number; blob_key: string | null }[] = await db("captures").where("asset_id", assetId).andWhere("id", ">", from.captures).select("id", "blob_key");
  const ids = captures.map((c) => c.id);
  const findingIds = ids.length ? (await db("findings").whereIn("capture_id", ids).select("id")).map((f) => f.id as number) : [];
  await db("inspections")
    .where("id", ">", from.inspections)
    .andWhere((q) => {
      q.where("asset_id", assetId);
      if (findingIds.length) q.orWhereIn("finding_id", findingIds);
    })
    .delete();
  if (ids.length) await db("captures").whereIn("id", ids).delete();
  const fsRoot = path.resolve(h.server.ctx.config.dataDir, "blobs"); // the fs store's root (server/blob/index.ts)
  for (const c of captures) {
    if (!c.blob_key) continue;
    for (const key of await blob.list(c.blob_key).catch(() => [] as string[])) await blob.delete(key).catch(() => undefined);
    // the fs store leaves the emptied "<key>.spectrum/" folder behind
    fs.rmSync(path.join(fsRoot, `${c.blob_key}.spectrum`), { recursive: true, force: true });
  }
  await db("caught_mail").where("id", ">", from.caught_mail).delete();
  await db("audit_log").where("id", ">", from.audit_log).delete();
}

export function shotsDir(): string {
  fs.mkdirSync(FLOW_SHOTS, { recursive: true });
  return FLOW_SHOTS;
}

