// The files in sample-data/ are what sample-data/README.md says they are: each, parsed and analysed with the
// nameplate of the demo motor it is meant for, gives the promised result; and `npm run sample-data` rewrites them
// byte for byte. The expected values are the synthetic generator's own truth (invented data for the demo).
import crypto from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { parseCapture } from "../../src/engine/parse/index.ts";
import { analyzeCapture } from "../../src/engine/analyze.ts";
import { nameplateOf } from "../../server/captures/engine-io.ts";
import { assetRow } from "../../server/seed/fleet.ts";
import { MOTORS, SAMPLE_FILES, buildSample, promised, writeSampleData } from "../../server/seed/samples.ts";

const DIR = path.resolve(import.meta.dirname, "../../sample-data");
const sha = (bytes: Uint8Array) => crypto.createHash("sha256").update(bytes).digest("hex");
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "barhound-samples-"));
afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

describe("sample-data files", () => {
  it("regenerate byte for byte (fixed seeds), and the committed files are the current ones", async () => {
    const first = await writeSampleData(path.join(tmp, "a"));
    const second = await writeSampleData(path.join(tmp, "b"));
    expect([...second.entries()]).toEqual([...first.entries()]);
    for (const [name, hash] of first) {
      const committed = path.join(DIR, name);
      expect(fs.existsSync(committed), `${name} is missing from sample-data/: run npm run sample-data`).toBe(true);
      expect(sha(fs.readFileSync(committed)), `${name} differs from what npm run sample-data writes`).toBe(hash);
    }
  });

  it("are small (< 2 MB each) and the README names every file and its motor", () => {
    const readme = fs.readFileSync(path.join(DIR, "README.md"), "utf8");
    for (const s of SAMPLE_FILES) {
      expect(fs.statSync(path.join(DIR, s.file)).size).toBeLessThan(2 * 1024 * 1024);
      expect(readme).toContain(`| \`${s.file}\` | ${s.tag} |`);
      expect(MOTORS.has(s.tag)).toBe(true);
    }
  });

  for (const sample of SAMPLE_FILES) {
    it(`${sample.file} on ${sample.tag}: ${sample.title}`, () => {
      const bytes = new Uint8Array(fs.readFileSync(path.join(DIR, sample.file)));
      const capture = parseCapture(bytes, { fileName: sample.file });
      const { truth } = buildSample(sample);
      const nameplate = nameplateOf(assetRow(MOTORS.get(sample.tag)!, 1));
      const r = analyzeCapture(capture, nameplate);
      const e = sample.expect;

      if (sample.format === "csv") expect(capture.format).toBe("csv");
      else expect(capture.channels.every((c) => c.name !== "ch1")).toBe(true); // described by the bhch chunk
      // readings
      expect(r.supplyHz).not.toBeNull();
      expect(Math.abs(r.supplyHz! - truth.supplyHz)).toBeLessThan(0.05);
      expect(r.supplySource).toBe(e.supplyFromCurrent ? "current spectrum" : "vibration 2×LF line");
      expect(r.slip).not.toBeNull();
      expect(Math.abs(r.slip! - truth.slip)).toBeLessThan(Math.max(0.03 * truth.slip, 2e-4));
      expect(Math.abs(r.rpm! - truth.rpm)).toBeLessThan(2);
      expect(Math.abs(r.loadPct! - truth.loadPct)).toBeLessThan(3);
      // rotor
      expect(r.brokenBar.grade).toBe(e.grade);
      expect(r.brokenBar.assessable).toBe(e.grade !== null);
      if (e.grade) expect(Math.abs(r.brokenBar.depthDb! - truth.lowerDb)).toBeLessThan(1.5);
      if (e.reason) expect(r.brokenBar.reason ?? "").toMatch(new RegExp(`^${e.reason}`));
      if (e.brokenBars !== undefined) expect(Math.abs(r.brokenBar.estimatedBrokenBars! - e.brokenBars)).toBeLessThan(0.5);
      if (e.reason === "load oscillation suspected") expect(r.brokenBar.loadOscillationSuspected).toBe(true);
      // vibration
      if (e.zone) {
        expect(r.vibration?.zone).toBe(e.zone);
        expect(Math.abs(r.vibration!.velocityRmsMmS - truth.velocityRmsMmS!)).toBeLessThan(0.1 * truth.velocityRmsMmS!);
      } else expect(r.vibration).toBeNull();
      // bearings (vibration-only.csv's motor has them on record): every line searched, none found — no bearing tone
      // was synthesised (server/seed/samples.ts), as the README says
      if (nameplate.bearings && r.vibration) {
        const lines = r.bearings!.bearings.flatMap((b) => b.defects.flatMap((d) => d.lines));
        expect(lines.length).toBeGreaterThan(0);
        expect(lines.filter((l) => l.status !== "not found")).toEqual([]);
      }
      // quality: exactly the promised verdicts
      expect([...new Set(r.quality.map((q) => q.code))].sort()).toEqual([...e.quality].sort());
      // the README's row says the same
      const p = promised({ sample, bytes, capture, truth });
      expect(p.rotor.startsWith(e.grade ?? "Not assessable")).toBe(true);
    });
  }
});
