import { afterAll, beforeAll, describe, expect, it } from "vitest";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import request from "supertest";
import { signedIn } from "../helpers/context.ts";
import { captureFile, listFiles, makeMotor, makePipelineEnv, type PipelineEnv } from "../helpers/pipeline.ts";
import { decimateMinMax } from "../../server/spectra.ts";
import { storeCaptureAndQueue } from "../../server/captures/ingest.ts";
import { CHECK_CHUNK_BYTES, checkFile, FileRejected } from "../../server/captures/upload.ts";
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

  it("leaves nothing behind when the ingest fails after the files were moved into the blob store", async () => {
    const real = env.ctx.services.queue as CaptureQueue;
    const blobsBefore = listFiles(env.blobDir).length;
    let blobsWhenQueueing = -1;
    let tempFilesWhenQueueing = -1;
    const failing = async () => {
      blobsWhenQueueing = listFiles(env.blobDir).length;
      tempFilesWhenQueueing = listFiles(`${env.dataDir}/tmp`).length;
      throw new Error("queue unavailable");
    };
    env.ctx.services.queue = Object.create(real, { sendAnalysis: { value: failing } });
    try {
      const res = await refused((agent) =>
        agent
          .post("/api/captures")
          .field("assetId", String(assetId))
          .attach("file", captureFile({ seed: 21 }), "first.csv")
          .attach("file", captureFile({ seed: 22, format: "wav" }), "second.wav"),
      );
      expect(res.status).toBe(500);
      // Both files had been moved (not copied) into the blob store when the queue failed; refused() saw them go.
      expect(blobsWhenQueueing).toBe(blobsBefore + 2);
      expect(tempFilesWhenQueueing).toBe(0);
    } finally {
      env.ctx.services.queue = real;
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
    expect(Math.abs(d.x[b] - 6543.21)).toBeLessThan((n / 2000) * 0.01);
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
    const zoom = await agent.get(`/api/captures/${stored.id}/spectrum?fmin=45&fmax=55&buckets=2000`);
    expect(zoom.body.decimated).toBe(false);
    expect(zoom.body.resolutionHz).toBeLessThan(0.05);
    const peak = zoom.body.hz[zoom.body.max.indexOf(Math.max(...zoom.body.max))];
    expect(peak).toBeCloseTo(50, 0);
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
