// Client benchmark (npm run bench:client).
// 1. Bundle: a fresh `vite build` into a temp folder (dist/ is left alone); every JS/CSS file with raw and gzip
//    (level 9) size, and the FIRST PAGE total: what headless Chromium actually fetches to show /sign-in
//    (entry, modulepreloads and the route's lazy chunk), against the 300 KB gzip target.
// 2. Spectrum: a throw-away PostgreSQL cluster (.data/pg-bench-client, port 55470), the real app serving that
//    build on a free port, one worker process, a 2^21-sample three-phase current capture (20 kHz, ≈105 s),
//    and Chromium signed in as the analyst on /captures/:id. Measures navigation → spectrum drawn, a zoom
//    (`+` key) → refetched full-resolution window drawn, the full-range view (`f` key) → decimated spectrum
//    drawn, and the server time of the spectrum requests. Median of 3 (BENCH_RUNS) each.
// "Drawn" is detected without hooks in src/: an init script wraps fetch (to time the /spectrum answers) and
// CanvasRenderingContext2D.clearRect (uPlot clears its whole canvas at the start of every draw) for the canvas
// inside [data-testid=spectrum-current]; "drawn" = the end of the first uPlot draw after the answer was parsed.
// Env: BENCH_RUNS (3), BENCH_SAMPLES_LOG2 (21), BENCH_PHASES (3), BENCH_KEEP=1 keeps the cluster and build.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { gzipSync } from "node:zlib";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { loadConfig, type Config } from "../server/config.ts";
import { startServer } from "../server/index.ts";
import { createKnex, ensureDatabase, migrateLatest } from "../server/db.ts";
import { clearSignalCaches } from "../server/captures/signal-views.ts";
import { seedDemoUsers, DEMO_PASSWORD, DEMO_USERS } from "../server/seed/demo-users.ts";
import { synthCapture } from "../src/engine/synth.ts";
import { writeWav } from "../src/engine/parse/index.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const RUNS = Math.max(1, Number(process.env.BENCH_RUNS ?? 3));
const LOG2 = Number(process.env.BENCH_SAMPLES_LOG2 ?? 21);
const PHASES = (Number(process.env.BENCH_PHASES ?? 3) === 1 ? 1 : 3) as 1 | 3;
const KEEP = process.env.BENCH_KEEP === "1";
const SAMPLE_RATE = 20_000;
const FIRST_PAGE_TARGET_KB = 300;
const PG_ENV = { ...process.env, PG_DIR: path.join(ROOT, ".data/pg-bench-client"), PGPORT: "55470" };
const CHROMIUM_ARGS = ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"];

// ---------------------------------------------------------------------------------------------------------------
// Small helpers

const kb = (bytes: number) => `${(bytes / 1024).toFixed(1)} KB`;
const ms = (x: number | null | undefined) => (x == null || !Number.isFinite(x) ? "—" : `${x.toFixed(0)} ms`);
const median = (xs: number[]) => {
  const s = xs.filter((x) => Number.isFinite(x)).sort((a, b) => a - b);
  if (!s.length) return NaN;
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};
const list = (xs: number[]) => xs.map((x) => (Number.isFinite(x) ? x.toFixed(0) : "—")).join(" / ");
const gz = (b: Buffer | Uint8Array) => gzipSync(b, { level: 9 }).length;
const sleep = (t: number) => new Promise((r) => setTimeout(r, t));

function pg(cmd: string): string {
  const r = spawnSync("bash", [path.join(ROOT, "scripts/pg.sh"), cmd], { env: PG_ENV, encoding: "utf8" });
  if (r.status !== 0) throw new Error(`scripts/pg.sh ${cmd} failed: ${r.stderr}`);
  return r.stdout.trim();
}

// ---------------------------------------------------------------------------------------------------------------
// 1. Bundle

interface BuiltFile {
  file: string; // path under outDir, e.g. assets/index-abc.js
  raw: number;
  gzip: number;
}

function viteBuild(outDir: string): void {
  const t0 = Date.now();
  const r = spawnSync(process.execPath, ["node_modules/vite/bin/vite.js", "build", "--outDir", outDir, "--emptyOutDir", "--logLevel", "warn"], {
    cwd: ROOT,
    encoding: "utf8",
    env: { ...process.env, NODE_ENV: "production" },
  });
  if (r.status !== 0) throw new Error(`vite build failed:\n${r.stdout}\n${r.stderr}`);
  if (r.stderr.trim()) console.log(r.stderr.trim().replace(/^/gm, "  vite: "));
  console.log(`vite build → ${outDir} in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
}

function listBuilt(outDir: string): BuiltFile[] {
  const out: BuiltFile[] = [];
  const walk = (dir: string) => {
    for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (/\.(js|css)$/.test(e.name)) {
        const b = fs.readFileSync(p);
        out.push({ file: path.relative(outDir, p).split(path.sep).join("/"), raw: b.length, gzip: gz(b) });
      }
    }
  };
  walk(outDir);
  return out.sort((a, b) => b.gzip - a.gzip);
}

/** Entry script, stylesheets and modulepreloads named by index.html (what loads before any route chunk). */
function htmlAssets(outDir: string): string[] {
  const html = fs.readFileSync(path.join(outDir, "index.html"), "utf8");
  const found = new Set<string>();
  for (const m of html.matchAll(/<(script|link)\b[^>]*>/g)) {
    const tag = m[0];
    const src = /\s(?:src|href)="([^"]+)"/.exec(tag)?.[1];
    if (!src || !/\.(js|css)(\?|$)/.test(src)) continue;
    if (tag.startsWith("<link") && !/rel="(stylesheet|modulepreload)"/.test(tag)) continue;
    found.add(src.replace(/^\//, "").replace(/\?.*$/, ""));
  }
  return [...found];
}

function startWorker(databaseUrl: string, dataDir: string): Promise<ChildProcess> {
  const proc = spawn(process.execPath, ["--import", "tsx", "workers/worker.ts"], {
    cwd: ROOT,
    env: { ...process.env, NODE_ENV: "development", DATABASE_URL: databaseUrl, DATA_DIR: dataDir, BLOB_DRIVER: "fs", WORKER_CONCURRENCY: "1", BARHOUND_WORKER_IDLE_MS: "50" },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let err = "";
  proc.stderr!.on("data", (b: Buffer) => (err = (err + b.toString()).slice(-4000)));
  return new Promise((resolve, reject) => {
    let out = "";
    const onData = (b: Buffer) => {
      out += b.toString();
      if (out.includes("worker ready")) {
        proc.stdout!.off("data", onData);
        proc.stdout!.resume();
        resolve(proc);
      }
    };
    proc.stdout!.on("data", onData);
    proc.once("exit", (c) => reject(new Error(`worker exited (${c}): ${out}\n${err}`)));
  });
}

async function stopWorker(proc: ChildProcess | null): Promise<void> {
  if (!proc || proc.exitCode !== null || proc.signalCode !== null) return;
  const exited = new Promise((r) => proc.once("exit", r));
  proc.kill("SIGTERM");
  const t = setTimeout(() => proc.kill("SIGKILL"), 10_000);
  await exited;
  clearTimeout(t);
}

// ---------------------------------------------------------------------------------------------------------------
// HTTP client for the setup (session cookie per user)

class Api {
  cookie = "";
  constructor(readonly base: string) {}
  async login(email: string) {
    const res = await fetch(`${this.base}/api/auth/login`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ email, password: DEMO_PASSWORD }) });
    if (!res.ok) throw new Error(`login ${email}: ${res.status} ${await res.text()}`);
    this.cookie = (res.headers.get("set-cookie") ?? "").split(";")[0];
    return this;
  }
  async req<T>(method: string, p: string, body?: unknown): Promise<T> {
    const isForm = body instanceof FormData;
    const res = await fetch(`${this.base}/api${p}`, {
      method,
      headers: { cookie: this.cookie, ...(body !== undefined && !isForm ? { "content-type": "application/json" } : {}) },
      body: body === undefined ? undefined : isForm ? body : JSON.stringify(body),
    });
    const text = await res.text();
    if (!res.ok) throw new Error(`${method} ${p}: ${res.status} ${text.slice(0, 500)}`);
    return (text ? JSON.parse(text) : undefined) as T;
  }
}

const userOf = (role: string) => DEMO_USERS.find((u) => u.role === role)!;

// ---------------------------------------------------------------------------------------------------------------
// In-page instrumentation (runs before the app's scripts on every document)

interface PageLog {
  draws: { start: number; end: number }[];
  fetches: { url: string; start: number; headers?: number; parsed?: number; points?: number; decimated?: boolean }[];
  keys: { key: string; t: number }[];
}

// Plain JS (a string, so no transpiler helpers leak into the page).
const INSTRUMENT = `(() => {
  const log = { draws: [], fetches: [], keys: [] };
  window.__bh = log;
  const clear = CanvasRenderingContext2D.prototype.clearRect;
  CanvasRenderingContext2D.prototype.clearRect = function (x, y, w, h) {
    const c = this.canvas;
    if (x === 0 && y === 0 && w === c.width && h === c.height && c.closest && c.closest('[data-testid="spectrum-current"]')) {
      const rec = { start: performance.now(), end: NaN };
      log.draws.push(rec);
      // uPlot draws synchronously after this clear; a microtask queued now runs once that draw has finished.
      queueMicrotask(() => { rec.end = performance.now(); });
    }
    return clear.call(this, x, y, w, h);
  };
  const origFetch = window.fetch;
  window.fetch = async function (input, init) {
    const url = typeof input === "string" ? input : input instanceof URL ? input.href : input.url;
    const rec = url.includes("/spectrum") ? { url, start: performance.now() } : null;
    if (rec) log.fetches.push(rec);
    const res = await origFetch.call(window, input, init);
    if (rec) {
      rec.headers = performance.now();
      const json = res.json.bind(res);
      res.json = async () => {
        const v = await json();
        rec.parsed = performance.now();
        rec.points = v && v.hz ? v.hz.length : undefined;
        rec.decimated = v ? v.decimated : undefined;
        return v;
      };
    }
    return res;
  };
  document.addEventListener("keydown", (e) => log.keys.push({ key: e.key, t: performance.now() }), true);
})();`;

const readLog = (page: Page) => page.evaluate(() => (window as unknown as { __bh: PageLog }).__bh);

/** Wait until a /spectrum fetch (kind=current) started after `after` has been parsed and drawn. */
async function waitDrawn(page: Page, after: number, match: (url: URL) => boolean, timeoutMs = 60_000) {
  const t0 = Date.now();
  for (;;) {
    const log = await readLog(page);
    const f = log.fetches.find((x) => x.start >= after && match(new URL(x.url, "http://x")) && x.parsed !== undefined);
    if (f) {
      const d = log.draws.find((x) => x.start >= f.parsed! && Number.isFinite(x.end));
      if (d) {
        const firstDrawAfter = log.draws.find((x) => x.start >= after && Number.isFinite(x.end));
        return { fetch: f, draw: d, firstDraw: firstDrawAfter ?? d };
      }
    }
    if (Date.now() - t0 > timeoutMs) throw new Error(`spectrum not drawn within ${timeoutMs} ms: ${JSON.stringify(log.fetches)}`);
    await sleep(20);
  }
}

const param = (u: URL, k: string) => (u.searchParams.has(k) ? Number(u.searchParams.get(k)) : NaN);

// ---------------------------------------------------------------------------------------------------------------

// Everything started is registered here and undone in reverse order, once, on success, failure or Ctrl-C.
const cleanups: (() => Promise<unknown> | unknown)[] = [];
let cleaning: Promise<void> | null = null;
function cleanup(): Promise<void> {
  cleaning ??= (async () => {
    while (cleanups.length) {
      try {
        await cleanups.pop()!();
      } catch (e) {
        console.error("cleanup:", (e as Error).message);
      }
    }
  })();
  return cleaning;
}
let interrupted = false;
for (const sig of ["SIGINT", "SIGTERM"] as const)
  process.on(sig, () => {
    if (interrupted) return;
    interrupted = true;
    console.error(`${sig}: cleaning up`);
    void cleanup().then(() => process.exit(130));
  });

async function main() {
  try {
    // ---- 1. bundle
    const outDir = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-bench-client-build-"));
    if (!KEEP) cleanups.push(() => fs.rmSync(outDir, { recursive: true, force: true }));
    viteBuild(outDir);
    const built = listBuilt(outDir);
    const byFile = new Map(built.map((b) => [b.file, b]));

    // ---- services
    pg("destroy");
    cleanups.push(() => (KEEP ? pg("stop") : pg("destroy")));
    const base = pg("start");
    const databaseUrl = base.replace(/\/postgres$/, "/barhound_bench_client");
    await ensureDatabase(databaseUrl);
    const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-bench-client-data-"));
    cleanups.push(() => fs.rmSync(dataDir, { recursive: true, force: true }));
    // env "test" keeps the per-request log quiet; MAIL_FAKE off (no SMTP port needed).
    const config = loadConfig({
      ...process.env,
      NODE_ENV: "test",
      JWT_SECRET: "bench-client-only-secret",
      DATABASE_URL: databaseUrl,
      PORT: "0",
      DATA_DIR: dataDir,
      MAIL_FAKE: "false",
      BLOB_DRIVER: "fs",
      LOGIN_RATE_LIMIT: "1000",
    });
    const server = await startServer(config, { staticDir: outDir });
    cleanups.push(() => server.close());
    const baseUrl = `http://127.0.0.1:${server.port}`;
    config.publicUrl = baseUrl;
    await seedDemoUsers(server.ctx.db);
    let worker: ChildProcess | null = await startWorker(databaseUrl, dataDir);
    cleanups.push(() => stopWorker(worker));

    // ---- browser
    const profile = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-bench-client-chromium-"));
    cleanups.push(() => fs.rmSync(profile, { recursive: true, force: true }));
    const context: BrowserContext = await chromium.launchPersistentContext(profile, {
      executablePath: "/usr/bin/chromium",
      headless: true,
      viewport: { width: 1360, height: 860 },
      args: CHROMIUM_ARGS,
      // Our own handlers close the browser with everything else (Playwright's would exit before the cleanup ran).
      handleSIGINT: false,
      handleSIGTERM: false,
      handleSIGHUP: false,
    });
    cleanups.push(() => context.close());
    const page = context.pages()[0] ?? (await context.newPage());
    page.setDefaultTimeout(30_000);
    const pageErrors: string[] = [];
    page.on("pageerror", (e) => pageErrors.push(String(e)));
    page.on("console", (m) => {
      if (m.type() === "error") pageErrors.push(m.text());
    });

    // ---- 1b. first page (/sign-in) as Chromium loads it, empty cache
    const loaded = new Set<string>();
    const onResponse = (res: import("playwright-core").Response) => {
      const u = new URL(res.url());
      if (u.origin !== baseUrl) return;
      const file = u.pathname.replace(/^\//, "");
      const type = res.request().resourceType();
      if (!/\.(js|css|woff2?)$/.test(file) && type !== "script" && type !== "stylesheet") return;
      loaded.add(file);
    };
    page.on("response", onResponse);
    await page.goto(`${baseUrl}/sign-in`, { waitUntil: "load" });
    await page.getByLabel("E-mail").waitFor();
    await sleep(1500); // late requests (fonts, prefetches)
    page.off("response", onResponse);

    console.log(`\n== Bundle (fresh vite build; gzip = node:zlib level 9; ${os.cpus().length} CPUs, Node ${process.version}) ==`);
    console.log(`${"file".padEnd(52)} ${"raw".padStart(10)} ${"gzip".padStart(10)}  sign-in`);
    for (const b of built) console.log(`${b.file.padEnd(52)} ${kb(b.raw).padStart(10)} ${kb(b.gzip).padStart(10)}  ${loaded.has(b.file) ? "yes" : ""}`);
    const sum = (fs_: BuiltFile[]) => fs_.reduce((a, b) => ({ raw: a.raw + b.raw, gzip: a.gzip + b.gzip }), { raw: 0, gzip: 0 });
    const all = sum(built);
    const js = sum(built.filter((b) => b.file.endsWith(".js")));
    const css = sum(built.filter((b) => b.file.endsWith(".css")));
    console.log(`${"all JS".padEnd(52)} ${kb(js.raw).padStart(10)} ${kb(js.gzip).padStart(10)}   (${built.filter((b) => b.file.endsWith(".js")).length} files)`);
    console.log(`${"all CSS".padEnd(52)} ${kb(css.raw).padStart(10)} ${kb(css.gzip).padStart(10)}`);
    console.log(`${"all JS + CSS".padEnd(52)} ${kb(all.raw).padStart(10)} ${kb(all.gzip).padStart(10)}`);

    const fromHtml = htmlAssets(outDir).map((f) => byFile.get(f)).filter((b): b is BuiltFile => !!b);
    const signIn = [...loaded.keys()].map((f) => byFile.get(f)).filter((b): b is BuiltFile => !!b);
    const fonts = [...loaded.keys()].filter((f) => /\.woff2?$/.test(f)).map((f) => fs.statSync(path.join(outDir, f)).size);
    const h = sum(fromHtml);
    const s = sum(signIn);
    console.log(`\nindex.html entry + css + modulepreload: ${fromHtml.map((b) => b.file.replace(/^assets\//, "")).join(", ")}`);
    console.log(`  = ${kb(h.raw)} raw, ${kb(h.gzip)} gzip`);
    const extra = signIn.filter((b) => !fromHtml.includes(b));
    console.log(`/sign-in in Chromium also loads: ${extra.map((b) => b.file.replace(/^assets\//, "")).join(", ") || "nothing else"}`);
    console.log(
      `FIRST PAGE (/sign-in, JS + CSS as fetched by Chromium): ${signIn.length} files, ${kb(s.raw)} raw, ${kb(s.gzip)} gzip` +
        ` — target ≤ ${FIRST_PAGE_TARGET_KB} KB gzip: ${s.gzip <= FIRST_PAGE_TARGET_KB * 1024 ? "PASS" : "FAIL"}`,
    );
    if (fonts.length) console.log(`  (plus ${fonts.length} web font file(s), ${kb(fonts.reduce((a, b) => a + b, 0))}, already compressed; not counted)`);

    // ---- 2. spectrum: fixtures through the API
    const admin = await new Api(baseUrl).login(userOf("admin").email);
    const analyst = await new Api(baseUrl).login(userOf("analyst").email);
    const site = await admin.req<{ id: number }>("POST", "/sites", { code: `BC${Date.now() % 1e6}`, name: "Client bench site", timezone: "UTC" });
    const area = await admin.req<{ id: number }>("POST", `/sites/${site.id}/areas`, { name: "Client bench area" });
    const motor = await admin.req<{ id: number }>("POST", "/assets", {
      tag: `BENCH-CLIENT-${Date.now() % 1e6}`,
      name: "Client bench motor",
      areaId: area.id,
      ratedKw: 30,
      ratedVoltage: 400,
      ratedCurrent: 55,
      ratedHz: 50,
      ratedRpm: 1470,
      poles: 4,
      rotorBars: 28,
    });
    const n = 2 ** LOG2;
    const t0 = Date.now();
    const synth = synthCapture({ poles: 4, slip: 0.02, sampleRate: SAMPLE_RATE, durationS: n / SAMPLE_RATE, phases: PHASES, brokenBars: 1, seed: 20261201 });
    const wav = writeWav(synth.capture);
    console.log(`\n== Spectrum (capture: ${PHASES} × 2^${LOG2} = ${n} samples at ${SAMPLE_RATE} Hz, ${(n / SAMPLE_RATE).toFixed(1)} s, float WAV ${(wav.length / 1e6).toFixed(1)} MB, synthesised in ${((Date.now() - t0) / 1000).toFixed(1)} s) ==`);
    const form = new FormData();
    form.set("assetId", String(motor.id));
    form.append("file", new Blob([wav as Uint8Array<ArrayBuffer>], { type: "audio/wav" }), "bench-client.wav");
    const tUp = Date.now();
    const up = await admin.req<{ captures: { id: number }[] }>("POST", "/captures", form);
    const captureId = up.captures[0].id;
    let cap: { status: string; error: string | null; channels: { name: string; kind: string }[] };
    for (;;) {
      cap = await admin.req("GET", `/captures/${captureId}`);
      if (cap.status === "analysed") break;
      if (cap.status === "failed") throw new Error(`analysis failed: ${cap.error}`);
      if (Date.now() - tUp > 10 * 60_000) throw new Error(`capture ${captureId} not analysed after 10 min (status ${cap.status})`);
      await sleep(250);
    }
    console.log(`capture #${captureId}: upload → analysed in ${((Date.now() - tUp) / 1000).toFixed(1)} s; channels ${cap.channels.map((c) => `${c.name} (${c.kind})`).join(", ")}`);
    await stopWorker(worker);
    worker = null;
    const channel = cap.channels.find((c) => c.kind === "current")!.name;

    // ---- server time of the spectrum request (HTTP round trip on loopback, body read)
    const spectrumUrl = (q: Record<string, string | number>) =>
      `${baseUrl}/api/captures/${captureId}/spectrum?${new URLSearchParams(Object.entries({ channel, kind: "current", buckets: 2000, ...q }).map(([k, v]) => [k, String(v)]))}`;
    const timeRequest = async (q: Record<string, string | number>) => {
      const t = performance.now();
      const res = await fetch(spectrumUrl(q), { headers: { cookie: analyst.cookie } });
      const body = await res.arrayBuffer();
      if (!res.ok) throw new Error(`spectrum ${res.status}: ${Buffer.from(body).toString().slice(0, 300)}`);
      const j = JSON.parse(Buffer.from(body).toString()) as { hz: number[]; decimated: boolean; resolutionHz: number; fMax: number };
      return { ms: performance.now() - t, bytes: body.byteLength, gzip: gz(Buffer.from(body)), points: j.hz.length, decimated: j.decimated, resolutionHz: j.resolutionHz, fMax: j.fMax };
    };
    const full = { fmin: 0, fmax: SAMPLE_RATE / 2 };
    const zoomQ = { fmin: 47.5, fmax: 52.5 };
    const cold: number[] = [];
    for (let i = 0; i < RUNS; i++) {
      clearSignalCaches();
      cold.push((await timeRequest(full)).ms);
    }
    const warmFull: number[] = [];
    const warmZoom: number[] = [];
    let fullInfo = await timeRequest(full);
    let zoomInfo = await timeRequest(zoomQ);
    for (let i = 0; i < RUNS; i++) {
      fullInfo = await timeRequest(full);
      warmFull.push(fullInfo.ms);
      zoomInfo = await timeRequest(zoomQ);
      warmZoom.push(zoomInfo.ms);
    }
    const bins = Math.round(fullInfo.fMax / fullInfo.resolutionHz) + 1;
    console.log(`full-range spectrum: ${bins} bins at ${fullInfo.resolutionHz.toPrecision(4)} Hz resolution`);
    console.log(`server, full range decimated to ${fullInfo.points} buckets, cold (parse WAV + FFT): median ${ms(median(cold))}  [${list(cold)}]`);
    console.log(`server, full range decimated to ${fullInfo.points} buckets, cached:               median ${ms(median(warmFull))}  [${list(warmFull)}]  body ${kb(fullInfo.bytes)} (${kb(fullInfo.gzip)} gzip)`);
    console.log(`server, zoom ${zoomQ.fmin}–${zoomQ.fmax} Hz, ${zoomInfo.points} bins ${zoomInfo.decimated ? "decimated" : "full resolution"}, cached:          median ${ms(median(warmZoom))}  [${list(warmZoom)}]  body ${kb(zoomInfo.bytes)} (${kb(zoomInfo.gzip)} gzip)`);

    // ---- browser: sign in as the analyst, then open the capture page RUNS times with a cold server cache and
    // RUNS times warm. Each full navigation starts with an empty React Query cache.
    await page.addInitScript({ content: INSTRUMENT });
    const u = userOf("analyst");
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByLabel("E-mail").fill(u.email);
    await page.getByLabel("Password").fill(DEMO_PASSWORD);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
    await page.getByTestId("user-name").waitFor();
    pageErrors.length = 0; // the 401 of GET /api/me on the signed-out /sign-in page is expected

    interface Run {
      load: number;
      loadFetch: number;
      loadPoints: number;
      zoom: number;
      zoomFirst: number;
      zoomDebounce: number;
      zoomFetch: number;
      zoomAfterParse: number;
      zoomPoints: number;
      zoomDecimated: boolean;
      full: number;
      fullFetch: number;
      fullAfterParse: number;
      fullPoints: number;
    }
    const runs: { cold: boolean; r: Run }[] = [];
    for (const coldServer of [true, false]) {
      for (let i = 0; i < RUNS; i++) {
        if (coldServer) clearSignalCaches();
        else await timeRequest(full); // make sure the full spectrum is cached
        await page.goto(`${baseUrl}/captures/${captureId}`);
        // a. navigation → first spectrum (the "around supply" window the page opens with) drawn
        const first = await waitDrawn(page, 0, (x) => x.searchParams.get("kind") === "current", 120_000);
        const viewer = page.getByTestId("spectrum-current");
        await viewer.waitFor();
        await sleep(500); // let the waveform and the other panels settle
        const loadView = { min: param(new URL(first.fetch.url, baseUrl), "fmin"), max: param(new URL(first.fetch.url, baseUrl), "fmax") };
        // b. zoom: "+" halves the window around its centre; the viewer refetches it (full resolution) after a 150 ms debounce
        await viewer.focus();
        const tz = await page.evaluate(() => performance.now());
        await page.keyboard.press("+");
        const z = await waitDrawn(page, tz, (x) => x.searchParams.get("kind") === "current" && param(x, "fmax") - param(x, "fmin") < (loadView.max - loadView.min) * 0.75);
        const zKey = (await readLog(page)).keys.find((k) => k.t >= tz && k.key === "+")?.t ?? tz;
        await sleep(300);
        // c. full range: "f" → the decimated min/max of the whole spectrum
        const tf = await page.evaluate(() => performance.now());
        await page.keyboard.press("f");
        const f = await waitDrawn(page, tf, (x) => x.searchParams.get("kind") === "current" && param(x, "fmin") <= 0.001 && param(x, "fmax") >= SAMPLE_RATE / 2 - 1);
        const fKey = (await readLog(page)).keys.find((k) => k.t >= tf && k.key === "f")?.t ?? tf;
        runs.push({
          cold: coldServer,
          r: {
            load: first.draw.end,
            loadFetch: first.fetch.parsed! - first.fetch.start,
            loadPoints: first.fetch.points ?? NaN,
            zoom: z.draw.end - zKey,
            zoomFirst: z.firstDraw.end - zKey,
            zoomDebounce: z.fetch.start - zKey,
            zoomFetch: z.fetch.parsed! - z.fetch.start,
            zoomAfterParse: z.draw.end - z.fetch.parsed!,
            zoomPoints: z.fetch.points ?? NaN,
            zoomDecimated: !!z.fetch.decimated,
            full: f.draw.end - fKey,
            fullFetch: f.fetch.parsed! - f.fetch.start,
            fullAfterParse: f.draw.end - f.fetch.parsed!,
            fullPoints: f.fetch.points ?? NaN,
          },
        });
        if (i === 0 && coldServer) console.log(`page opens on ${loadView.min}–${loadView.max} Hz (${first.fetch.points} points); "+" → ${z.fetch.points} points, ${z.fetch.decimated ? "decimated" : "full resolution"}; "f" → ${f.fetch.points} points`);
      }
    }
    const pick = (cold: boolean, k: keyof Run) => runs.filter((x) => x.cold === cold).map((x) => Number(x.r[k]));
    const row = (label: string, xs: number[], note = "") => console.log(`${label.padEnd(62)} median ${ms(median(xs)).padStart(8)}  [${list(xs)}]${note ? "  " + note : ""}`);
    console.log(`\nChromium (headless, 1360×860), /captures/${captureId}, ${RUNS} runs each:`);
    row("navigation → spectrum drawn, server cache cold", pick(true, "load"));
    row("  of which the spectrum fetch (start → JSON parsed)", pick(true, "loadFetch"));
    row("navigation → spectrum drawn, server cache warm", pick(false, "load"));
    row("  of which the spectrum fetch (start → JSON parsed)", pick(false, "loadFetch"));
    const all2 = (k: keyof Run) => runs.map((x) => Number(x.r[k]));
    row(`zoom "+" → full-resolution window redrawn (all ${runs.length} runs)`, all2("zoom"));
    row("  key → old data redrawn at the new scale", all2("zoomFirst"));
    row("  key → refetch starts (viewer debounce)", all2("zoomDebounce"));
    row("  refetch (start → JSON parsed)", all2("zoomFetch"));
    row("  JSON parsed → uPlot draw done", all2("zoomAfterParse"));
    row(`full range "f" → decimated spectrum drawn (all ${runs.length} runs)`, all2("full"));
    row("  refetch (start → JSON parsed)", all2("fullFetch"));
    row("  JSON parsed → uPlot draw done", all2("fullAfterParse"));
    if (pageErrors.length) console.log(`\nbrowser console errors (${pageErrors.length}):\n  ${[...new Set(pageErrors)].slice(0, 10).join("\n  ")}`);

    console.log(
      `\nSUMMARY  first page ${kb(s.gzip)} gzip (target ≤ ${FIRST_PAGE_TARGET_KB} KB: ${s.gzip <= FIRST_PAGE_TARGET_KB * 1024 ? "PASS" : "FAIL"}) · ` +
        `spectrum drawn ${ms(median(pick(true, "load")))} cold / ${ms(median(pick(false, "load")))} warm after navigation · ` +
        `zoom ${ms(median(all2("zoom")))} · full range ${ms(median(all2("full")))} · ` +
        `server ${ms(median(cold))} cold, ${ms(median(warmFull))} full range, ${ms(median(warmZoom))} zoomed (${bins} bins)`,
    );
  } finally {
    await cleanup();
  }
}

main().then(
  () => process.exit(0),
  async (err) => {
    if (!interrupted) console.error(err);
    await cleanup();
    process.exit(interrupted ? 130 : 1);
  },
);
