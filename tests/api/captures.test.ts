import { afterAll, beforeAll, describe, expect, it } from "vitest";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import request from "supertest";
import { signedIn } from "../helpers/context.ts";
import { captureFile, listFiles, makeMotor, makePipelineEnv, type PipelineEnv } from "../helpers/pipeline.ts";
import { decimateMinMax } from "../../server/spectra.ts";
import { storeCaptureAndQueue } from "../../server/captures/ingest.ts";
import { CHECK_CHUNK_BYTES, checkFile, FileRejected, removeStaleUploadTemp } from "../../server/captures/upload.ts";
import type { CaptureQueue } from "../../server/queue.ts";

// Uploads without a worker running: what is stored, what is refused, and that a refusal leaves nothing behind.
let env: PipelineEnv;
let assetId: number;
const LIMIT = 600 * 1024; // a small upload limit for the 413 case

beforeAll(async () => {
  env = await makePipelineEnv({ uploadLimitBytes: LIMIT });
  assetId = (await makeMotor(env.db)).asset.id;
});
afterAll(async () => env?.close());

const countCaptures = async () => Number((await env.db("captures").where({ asset_id: assetId }).count({ n: "*" }))[0].n);

/** Run an upload that must be refused, and check nothing was stored: no row, no blob, no temp file. */
async function refused(send: (agent: Awaited<ReturnType<typeof signedIn>>) => Promise<request.Response>) {
  const agent = await signedIn(env.app, "technician");
  const before = await countCaptures();
  const blobsBefore = listFiles(env.blobDir).length;
  const res = await send(agent);
  expect(await countCaptures()).toBe(before);
  expect(listFiles(env.blobDir).length).toBe(blobsBefore);
  expect(listFiles(`${env.dataDir}/tmp`)).toEqual([]);
  return res;
}

describe("POST /api/captures", () => {
  it("stores the file, creates a queued capture and answers 202", async () => {
    const agent = await signedIn(env.app, "technician");
    const res = await agent
      .post("/api/captures")
      .field("assetId", String(assetId))
      .field("takenAt", "2026-11-20T08:30:00Z")
      .field("notes", "after bearing change")
      .attach("file", captureFile(), "pump-a.csv");
    expect(res.status).toBe(202);
    expect(res.body.captures).toHaveLength(1);
    const { id, status, fileName } = res.body.captures[0];
    expect(status).toBe("queued");
    expect(fileName).toBe("pump-a.csv");
    const row = await env.db("captures").where({ id }).first();
    expect(row).toMatchObject({ asset_id: assetId, status: "queued", source: "upload", format: "csv", sample_rate: 5000, notes: "after bearing change" });
    expect(row.duration_s).toBeCloseTo(8, 5);
    expect(listFiles(env.blobDir)).toContain(row.blob_key);
    const job = await env.db.raw(`select data from pgboss.job where name = 'capture-analysis' and (data->>'captureId')::int = ?`, [id]);
    expect(job.rows).toHaveLength(1);
    expect(job.rows[0].data).toEqual({ captureId: id, version: 1 });

    const got = await agent.get(`/api/captures/${id}`);
    expect(got.status).toBe(200);
    expect(got.body).toMatchObject({ id, assetId, status: "queued", fileName: "pump-a.csv", format: "csv", source: "upload", analysis: null });
    expect(got.body.channels[0]).toMatchObject({ name: "Ia", kind: "current" });
    expect(listFiles(`${env.dataDir}/tmp`)).toEqual([]);
  });

  it("takes several files in one request: one capture each (WAV told by content, whatever its name)", async () => {
    const agent = await signedIn(env.app, "analyst");
    const res = await agent
      .post("/api/captures")
      .field("assetId", String(assetId))
      .attach("file", captureFile({ seed: 2 }), "one.csv")
      .attach("file", captureFile({ format: "wav", seed: 3 }), "two.dat");
    expect(res.status).toBe(202);
    expect(res.body.captures.map((c: { fileName: string }) => c.fileName)).toEqual(["one.csv", "two.dat"]);
    const formats = await env.db("captures").whereIn("id", res.body.captures.map((c: { id: number }) => c.id)).orderBy("id").pluck("format");
    expect(formats).toEqual(["csv", "wav"]);
  });

  it("is all-or-nothing: one bad file among good ones stores none of them", async () => {
    const res = await refused((agent) =>
      agent
        .post("/api/captures")
        .field("assetId", String(assetId))
        .attach("file", captureFile({ seed: 4 }), "good.csv")
        .attach("file", Buffer.from("time,Ia\n0,1.0\n0.001,abc\n"), "bad.csv"),
    );
    expect(res.status).toBe(422);
    expect(res.body.fileName).toBe("bad.csv");
    expect(res.body.error).toMatch(/bad\.csv/);
  });

  it("refuses an empty file with 422", async () => {
    const res = await refused((agent) => agent.post("/api/captures").field("assetId", String(assetId)).attach("file", Buffer.alloc(0), "empty.csv"));
    expect(res.status).toBe(422);
    expect(res.body.code).toBe("empty");
    expect(res.body.error).toMatch(/empty/i);
  });

  it("refuses a non-numeric CSV with 422 naming the line", async () => {
    const lines = ["Ia,Ib"];
    for (let i = 0; i < 400; i++) lines.push(`${Math.sin(i / 10).toFixed(4)},${Math.cos(i / 10).toFixed(4)}`);
    lines[123] = "0.5,oops";
    const res = await refused((agent) =>
      agent.post("/api/captures").field("assetId", String(assetId)).field("sampleRate", "5000").attach("file", Buffer.from(lines.join("\n")), "text.csv"),
    );
    expect(res.status).toBe(422);
    expect(res.body.line).toBe(124);
    expect(res.body.error).toMatch(/124/);
  });

  it("refuses a truncated WAV with 422 naming the byte or the missing data", async () => {
    const wav = captureFile({ format: "wav" });
    const res = await refused((agent) => agent.post("/api/captures").field("assetId", String(assetId)).attach("file", wav.subarray(0, 30), "cut.wav"));
    expect(res.status).toBe(422);
    expect(res.body.code).toMatch(/^wav-/);
    expect(res.body.error.length).toBeGreaterThan(10);
  });

  it("refuses a file that is not CSV or WAV by content with 415, even when named .csv", async () => {
    const pdf = Buffer.concat([Buffer.from("%PDF-1.7\n"), Buffer.from([0, 1, 2, 3, 255, 254, 0, 0])]);
    const res = await refused((agent) => agent.post("/api/captures").field("assetId", String(assetId)).attach("file", pdf, "capture.csv"));
    expect(res.status).toBe(415);
    expect(res.body.error).toMatch(/PDF/);
  });

  it("refuses a file over the size limit with 413 and a clear message", async () => {
    const big = Buffer.concat([captureFile({ durationS: 8 }), captureFile({ durationS: 8, seed: 9 })]);
    expect(big.length).toBeGreaterThan(LIMIT);
    const res = await refused((agent) => agent.post("/api/captures").field("assetId", String(assetId)).attach("file", big, "huge.csv"));
    expect(res.status).toBe(413);
    expect(res.body.error).toMatch(/larger than the upload limit/);
  });

  it("answers 400 with field messages for bad metadata", async () => {
    const res = await refused((agent) =>
      agent.post("/api/captures").field("assetId", "pump").field("takenAt", "yesterday").field("sampleRate", "-5").attach("file", captureFile(), "a.csv"),
    );
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.fields)).toEqual(expect.arrayContaining(["assetId", "takenAt", "sampleRate"]));
  });

  it("answers 400 when no file is attached", async () => {
    const res = await refused((agent) => agent.post("/api/captures").field("assetId", String(assetId)));
    expect(res.status).toBe(400);
    expect(res.body.fields.file).toBeTruthy();
  });

  it("answers 404 with field assetId for an unknown motor", async () => {
    const res = await refused((agent) => agent.post("/api/captures").field("assetId", "99999999").attach("file", captureFile(), "a.csv"));
    expect(res.status).toBe(404);
    expect(res.body.fields.assetId).toBeTruthy();
  });

  it("lets only technicians, analysts and admins upload", async () => {
    for (const role of ["planner", "manager"] as const) {
      const res = await refused(async () => {
        const agent = await signedIn(env.app, role);
        return agent.post("/api/captures").field("assetId", String(assetId)).attach("file", captureFile(), "a.csv");
      });
      expect(res.status).toBe(403);
    }
    expect((await request(env.app).post("/api/captures").field("assetId", String(assetId))).status).toBe(401);
  });

  it("stores the received file byte for byte and takes the row's sample rate, duration and channels from the check", async () => {
    const lines = ["time_s,Ia,acc_h [g]", ...Array.from({ length: 4000 }, (_, i) => `${(i / 2000).toFixed(6)},${Math.sin(i / 5).toFixed(4)},${(i % 9) / 100}`)];
    const file = Buffer.from(`${lines.join("\n")}\n`);
    const res = await (await signedIn(env.app, "analyst")).post("/api/captures").field("assetId", String(assetId)).attach("file", file, "timed.csv");
    expect(res.status).toBe(202);
    const row = await env.db("captures").where({ id: res.body.captures[0].id }).first();
    expect(row).toMatchObject({ format: "csv", sample_rate: 2000, channel_count: 2 });
    expect(Number(row.byte_size)).toBe(file.length);
    expect(row.duration_s).toBeCloseTo(2, 9);
    expect(row.channels).toEqual([
      { name: "Ia", kind: "current", unit: "A", position: "A" },
      { name: "acc_h", kind: "vibration", unit: "g", position: "H" },
    ]);
    expect(fs.readFileSync(path.join(env.blobDir, row.blob_key)).equals(file)).toBe(true);
    expect(listFiles(`${env.dataDir}/tmp`)).toEqual([]);
  });

  const analysisJobCount = async () => Number((await env.db.raw(`select count(*)::int as n from pgboss.job where name = 'capture-analysis'`)).rows[0].n);

  it("leaves nothing behind when the ingest fails after the files were moved into the blob store: 503, try again", async () => {
    const real = env.ctx.services.queue as CaptureQueue;
    const blobsBefore = listFiles(env.blobDir).length;
    let blobsWhenQueueing = -1;
    let tempFilesWhenQueueing = -1;
    const failing = async () => {
      blobsWhenQueueing = listFiles(env.blobDir).length;
      tempFilesWhenQueueing = listFiles(`${env.dataDir}/tmp`).length;
      throw new Error("queue unavailable");
    };
    env.ctx.services.queue = Object.create(real, { sendAnalyses: { value: failing } });
    try {
      const res = await refused((agent) =>
        agent
          .post("/api/captures")
          .field("assetId", String(assetId))
          .attach("file", captureFile({ seed: 21 }), "first.csv")
          .attach("file", captureFile({ seed: 22, format: "wav" }), "second.wav"),
      );
      expect(res.status).toBe(503);
      expect(res.body).toEqual({ error: expect.stringMatching(/Nothing was stored: send the files again/), code: "unavailable" });
      // Both files had been moved (not copied) into the blob store when the queue failed; refused() saw them go.
      expect(blobsWhenQueueing).toBe(blobsBefore + 2);
      expect(tempFilesWhenQueueing).toBe(0);
    } finally {
      env.ctx.services.queue = real;
    }
  });

  it("writes the rows and their jobs in one transaction: a failure after the jobs were written takes both back", async () => {
    const real = env.ctx.services.queue as CaptureQueue;
    const jobsBefore = await analysisJobCount();
    let jobsInTransaction = -1;
    // The jobs are inserted on the upload's transaction (visible in it), then the connection "drops" before COMMIT.
    const writeThenFail: CaptureQueue["sendAnalyses"] = async (data, opts) => {
      await real.sendAnalyses(data, opts);
      jobsInTransaction = Number((await opts!.trx!.raw(`select count(*)::int as n from pgboss.job where name = 'capture-analysis'`)).rows[0].n);
      throw Object.assign(new Error("Connection terminated unexpectedly"), { code: "ECONNRESET" });
    };
    env.ctx.services.queue = Object.create(real, { sendAnalyses: { value: writeThenFail } });
    try {
      const res = await refused((agent) => agent.post("/api/captures").field("assetId", String(assetId)).attach("file", captureFile({ seed: 23 }), "third.csv"));
      expect(res.status).toBe(503);
      expect(res.body.code).toBe("unavailable");
      expect(jobsInTransaction).toBe(jobsBefore + 1);
      expect(await analysisJobCount()).toBe(jobsBefore); // rolled back with the row
    } finally {
      env.ctx.services.queue = real;
    }
  });

  it("a capture is never left received: row and job commit together, the row already queued", async () => {
    const res = await (await signedIn(env.app, "analyst")).post("/api/captures").field("assetId", String(assetId)).attach("file", captureFile({ seed: 24 }), "fourth.csv");
    expect(res.status).toBe(202);
    const { id } = res.body.captures[0];
    expect(await env.db("captures").where({ id }).first("status", "queued_at")).toMatchObject({ status: "queued", queued_at: expect.any(Date) });
    const jobs = await env.db.raw(`select data from pgboss.job where name = 'capture-analysis' and (data->>'captureId')::int = ?`, [id]);
    expect(jobs.rows.map((r: { data: unknown }) => r.data)).toEqual([{ captureId: id, version: 1 }]);
    expect(await env.db("captures").where({ asset_id: assetId, status: "received" }).count({ n: "*" })).toEqual([{ n: "0" }]);
  });
});

describe("upload temp folders left by a crash", () => {
  it("removes upload-* folders and files untouched for an hour at start, keeps newer ones and anything else", async () => {
    const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-tmp-sweep-"));
    try {
      const tmp = path.join(dataDir, "tmp");
      const hoursAgo = (h: number) => new Date(Date.now() - h * 3_600_000);
      const make = (rel: string, mtime: Date, dir = false) => {
        const p = path.join(tmp, rel);
        if (dir) fs.mkdirSync(p, { recursive: true });
        else {
          fs.mkdirSync(path.dirname(p), { recursive: true });
          fs.writeFileSync(p, "x");
        }
        fs.utimesSync(p, mtime, mtime);
        return p;
      };
      // A crashed upload: the folder and its half-received file, both two hours old.
      make("upload-old/abc", hoursAgo(2));
      make("upload-old", hoursAgo(2), true);
      // An empty folder from a crash before any byte arrived, and a stray file of that name.
      make("upload-empty", hoursAgo(3), true);
      make("upload-stray", hoursAgo(5));
      // An old folder whose file is still being written (another server on the same data folder): kept.
      make("upload-busy/def", new Date());
      make("upload-busy", hoursAgo(2), true);
      make("upload-new", hoursAgo(0.5), true);
      make("other-thing", hoursAgo(10), true);

      const removed = await removeStaleUploadTemp(dataDir);
      expect(removed.sort()).toEqual(["upload-empty", "upload-old", "upload-stray"]);
      expect(fs.readdirSync(tmp).sort()).toEqual(["other-thing", "upload-busy", "upload-new"]);
      // A shorter age takes the half-hour one too; nothing to do is fine, and so is a data folder without tmp/.
      expect(await removeStaleUploadTemp(dataDir, { olderThanMs: 10 * 60_000 })).toEqual(["upload-new"]);
      expect(await removeStaleUploadTemp(path.join(dataDir, "nowhere"))).toEqual([]);
    } finally {
      fs.rmSync(dataDir, { recursive: true, force: true });
    }
  });
});

describe("GET /api/captures", () => {
  it("lists, filters and sorts on the server", async () => {
    const agent = await signedIn(env.app, "manager");
    const res = await agent.get(`/api/captures?assetId=${assetId}&sort=takenAt&pageSize=2`);
    expect(res.status).toBe(200);
    expect(res.body.total).toBe(await countCaptures());
    expect(res.body.items).toHaveLength(2);
    expect(res.body.pageSize).toBe(2);
    const t = res.body.items.map((c: { takenAt: string }) => Date.parse(c.takenAt));
    expect(t[0]).toBeLessThanOrEqual(t[1]);
    expect((await agent.get(`/api/captures?sort=password`)).status).toBe(400);
    expect((await agent.get(`/api/captures?pageSize=500`)).status).toBe(400);
    const mine = await (await signedIn(env.app, "technician")).get(`/api/captures?mine=1&assetId=${assetId}`);
    expect(mine.body.items.every((c: { takenBy: { name: string } }) => c.takenBy?.name === "Ines Varga")).toBe(true);
    expect(mine.body.total).toBe(1);
  });

  it("filters on taken_at with from/to: a date is the whole day (UTC), a date-time an instant, both ends included", async () => {
    const { asset } = await makeMotor(env.db);
    const takenAt = ["2026-10-01T08:00:00Z", "2026-10-15T12:00:00Z", "2026-10-31T23:30:00Z"];
    await env.db("captures").insert(takenAt.map((t, i) => ({ asset_id: asset.id, taken_at: t, source: "upload", file_name: `r${i}.csv`, format: "csv", status: "analysed" })));
    const agent = await signedIn(env.app, "manager");
    const list = async (q: Record<string, string>) => {
      const res = await agent.get("/api/captures").query({ assetId: asset.id, sort: "takenAt", ...q });
      expect(res.status).toBe(200);
      return res.body.items.map((c: { takenAt: string }) => new Date(c.takenAt).toISOString().replace(".000", ""));
    };
    expect(await list({})).toEqual(takenAt);
    expect(await list({ from: "2026-10-10" })).toEqual(takenAt.slice(1));
    expect(await list({ to: "2026-10-31" })).toEqual(takenAt);
    expect(await list({ to: "2026-10-30" })).toEqual(takenAt.slice(0, 2));
    expect(await list({ to: "2026-10-31T12:00:00Z" })).toEqual(takenAt.slice(0, 2));
    expect(await list({ from: "2026-10-15T12:00:00Z", to: "2026-10-15T12:00:00Z" })).toEqual([takenAt[1]]);
    expect(await list({ from: "2026-10-15T14:00:00+02:00" })).toEqual(takenAt.slice(1));
    expect(await list({ from: "2026-10-01", to: "2026-10-01" })).toEqual([takenAt[0]]);
    const total = (await agent.get("/api/captures").query({ assetId: asset.id, from: "2026-10-02", to: "2026-10-31" })).body.total;
    expect(total).toBe(2);
  });

  it("refuses a bad from/to, a reversed range and a parameter it does not take, naming the field", async () => {
    const agent = await signedIn(env.app, "manager");
    const fields = async (qs: string) => {
      const res = await agent.get(`/api/captures?${qs}`);
      expect(res.status).toBe(400);
      return res.body.fields as Record<string, string>;
    };
    expect((await fields("from=yesterday")).from).toMatch(/Use a date \(2026-10-01\)/);
    expect((await fields("to=2026-02-30")).to).toBe("2026-02-30 is not a calendar date.");
    expect((await fields("from=2026-10-01T08:00")).from).toMatch(/time zone/);
    expect((await fields("from=2026-10-01T25:00:00Z")).from).toMatch(/Not a time of day/);
    expect(await fields("from=2026-10-02&to=2026-10-01")).toEqual({ to: "to is before from: give from ≤ to." });
    expect(await fields("from=2026-10-01T12:00:00Z&to=2026-10-01T11:59:59Z")).toEqual({ to: "to is before from: give from ≤ to." });
    // Before, an unknown parameter was dropped and the whole list came back.
    expect(await fields(`assetId=${assetId}&since=2026-10-01`)).toEqual({ since: 'Unknown field "since".' });
    expect(await fields("colour=red&shade=dark")).toEqual({ colour: 'Unknown field "colour".', shade: 'Unknown field "shade".' });
  });

  it("requeue is for analysts and admins only, and refuses a capture already waiting", async () => {
    const id = (await env.db("captures").where({ asset_id: assetId }).first("id")).id;
    expect((await (await signedIn(env.app, "technician")).post(`/api/captures/${id}/requeue`)).status).toBe(403);
    expect((await (await signedIn(env.app, "analyst")).post(`/api/captures/${id}/requeue`)).status).toBe(409);
    expect((await (await signedIn(env.app, "analyst")).post(`/api/captures/99999999/requeue`)).status).toBe(404);
  });
});

describe("spectrum decimation", () => {
  it("keeps a single spike through min/max decimation of a 1,000,000-bin spectrum", () => {
    const n = 1_000_000;
    const values = new Float32Array(n).fill(-90);
    for (let i = 0; i < n; i++) values[i] += Math.sin(i) * 3;
    values[654_321] = -12; // one narrow line
    const d = decimateMinMax({ x0: 0, dx: 0.01, values }, { buckets: 2000 });
    expect(d.decimated).toBe(true);
    expect(d.x).toHaveLength(2000);
    expect(Math.max(...d.max)).toBe(-12);
    const b = d.max.indexOf(-12);
    expect(Math.abs(d.x[b] - 6543.21)).toBeLessThan((n / 2000) * 0.01); // the bucket's centre
    expect(d.maxX[b]).toBe(654_321 * 0.01); // where its max is: the line's own bin
    expect(Math.min(...d.min)).toBeLessThan(-92.9);
    // A window holding ≤ buckets bins comes back at full resolution.
    const w = decimateMinMax({ x0: 0, dx: 0.01, values }, { xMin: 6543, xMax: 6544, buckets: 2000 });
    expect(w.decimated).toBe(false);
    expect(w.x).toHaveLength(101);
    expect(w.max).toContain(-12);
    expect(w.min).toEqual(w.max);
  });

  it("the spectrum endpoint decimates the full range and gives full resolution in a narrow window", async () => {
    const stored = await storeCaptureAndQueue(env.ctx, {
      assetId,
      takenAt: new Date(),
      source: "stream",
      fileName: "long.wav",
      format: "wav",
      bytes: captureFile({ format: "wav", sampleRate: 20_000, durationS: 60, seed: 5 }),
    });
    const agent = await signedIn(env.app, "planner");
    const first = await agent.get(`/api/captures/${stored.id}/spectrum?buckets=2000`);
    expect(first.status).toBe(200);
    expect(first.body).toMatchObject({ channel: "Ia", unit: "dB", decimated: true, fMin: 0 });
    expect(first.body.hz).toHaveLength(2000);
    expect(first.body.minHz).toHaveLength(2000);
    expect(first.body.bucketHz).toBeCloseTo(first.body.fMax / 2000, 3);
    const zoom = await agent.get(`/api/captures/${stored.id}/spectrum?fmin=45&fmax=55&buckets=2000`);
    expect(zoom.body.decimated).toBe(false);
    expect(zoom.body.resolutionHz).toBeLessThan(0.05);
    expect(zoom.body).toMatchObject({ minHz: null, bucketHz: null, binHz: first.body.binHz });
    expect(zoom.body.hz[1] - zoom.body.hz[0]).toBeCloseTo(zoom.body.binHz, 9);
    const peak = zoom.body.hz[zoom.body.max.indexOf(Math.max(...zoom.body.max))];
    expect(peak).toBeCloseTo(50, 0);
    // the full range puts the supply line at its own bin, the very number the narrow window gives, not half a
    // bucket away
    const atFull = first.body.hz[first.body.max.indexOf(Math.max(...first.body.max))];
    expect(atFull).toBe(peak);
    // the payload stays of the same order: four arrays of ≤ buckets numbers
    expect(JSON.stringify(first.body).length).toBeLessThan(200_000);
  });
});

describe("checkFile (the upload's content check)", () => {
  let dir: string;
  beforeAll(() => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-check-"));
  });
  afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

  /** A time + current CSV of several read chunks, as a received file. */
  function received(name: string, edit: (lines: string[]) => void) {
    const lines = ["t,Ia", ...Array.from({ length: 200_000 }, (_, i) => `${(i / 10000).toFixed(6)},${Math.sin(i / 9).toFixed(4)}`)];
    edit(lines);
    const file = path.join(dir, name);
    fs.writeFileSync(file, `${lines.join("\n")}\n`);
    const size = fs.statSync(file).size;
    expect(size).toBeGreaterThan(2 * CHECK_CHUNK_BYTES);
    return { fileName: name, path: file, size };
  }

  async function rejection(run: Promise<unknown>): Promise<FileRejected> {
    const err = await run.then(() => null, (e: unknown) => e);
    expect(err).toBeInstanceOf(FileRejected);
    return err as FileRejected;
  }

  it("accepts a multi-chunk CSV and reports what the parser would", async () => {
    const checked = await checkFile(received("ok.csv", () => {}), undefined);
    expect(checked).toMatchObject({ format: "csv", meta: { sampleRate: 10000, channels: [{ name: "Ia", kind: "current", unit: "A", position: "A" }] } });
    expect(checked.meta.durationS).toBeCloseTo(20, 9);
  });

  it("names the line of a bad cell far past the first chunk (422), and of a time gap found in the second reading", async () => {
    const bad = await rejection(checkFile(received("bad.csv", (l) => (l[150_000] = "14.999900,12.5x")), undefined));
    expect(bad).toMatchObject({ status: 422, code: "non-numeric-cell", detail: { fileName: "bad.csv", line: 150_001, column: 2 } });
    expect(bad.message).toBe('bad.csv: Line 150001, column 2 (Ia): "12.5x" is not a number.');
    const gap = await rejection(checkFile(received("gap.csv", (l) => l.splice(60_000, 1)), undefined));
    expect(gap).toMatchObject({ status: 422, code: "time-not-uniform", detail: { line: 60_001, column: 1 } });
    expect(gap.message).toMatch(/^gap\.csv: Line 60001: the time step is 0\.0002 s/);
  });

  it("answers 415 for a line that runs on past 1 MiB (not a capture table)", async () => {
    const long = await rejection(checkFile(received("long.csv", (l) => (l[5] = `0.000400,${"7".repeat(CHECK_CHUNK_BYTES + 100)}`)), undefined));
    expect(long).toMatchObject({ status: 415, code: "unknown-format", detail: { line: 6 } });
  });
});
