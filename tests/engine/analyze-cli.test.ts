// The command line (workers/analyze-cli.ts) end to end: files written with the engine's own synth and writers,
// analysed in a child process exactly as a user runs it. Accuracy targets as in analysis.test.ts.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { basename, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import { synthCapture, type SynthOptions, type SynthResult } from "../../src/engine/synth.ts";
import { parseCapture, writeCsv, writeWav } from "../../src/engine/parse/index.ts";
import { gradeFromDepth } from "../../src/engine/rotor.ts";

const ROOT = resolve(fileURLToPath(new URL("../..", import.meta.url)));
const TIMEOUT = 90_000; // child processes on a shared, loaded machine

function cli(args: string[]) {
  const p = spawnSync(process.execPath, ["--import", "tsx", "workers/analyze-cli.ts", ...args], { cwd: ROOT, encoding: "utf8", timeout: TIMEOUT });
  if (p.error) throw p.error;
  return { status: p.status, stdout: p.stdout, stderr: p.stderr };
}
const nameplateArgs = (s: SynthResult) => [
  "--poles", String(s.nameplate.poles),
  "--rated-rpm", String(s.nameplate.ratedRpm),
  "--rated-hz", String(s.nameplate.ratedHz),
  "--rotor-bars", String(s.nameplate.rotorBars),
  "--rated-current", String(s.nameplate.ratedCurrent),
];

let dir = "";
const files: Record<string, string> = {};
const synth: Record<string, SynthResult> = {};
const cases: Record<string, SynthOptions> = {
  // 3 phases + accelerometer in g, 2 broken bars of 28, CSV with a time column
  csv3: { poles: 4, supplyHz: 50, slip: 0.02, durationS: 10, sampleRate: 5000, phases: 3, brokenBars: 2, rotorBars: 28, seed: 3, vibration: { unit: "g", oneXMmS: 2.0 } },
  // one phase, 60 Hz 2-pole, sound rotor, 32-bit float WAV
  wav1: { poles: 2, supplyHz: 60, slip: 0.012, durationS: 12, sampleRate: 6000, phases: 1, rotorBars: 28, seed: 5 },
};

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "barhound-cli-"));
  for (const [name, o] of Object.entries(cases)) synth[name] = synthCapture(o);
  files.csv3 = join(dir, "motor-3ph.csv");
  writeFileSync(files.csv3, writeCsv(synth.csv3.capture));
  files.wav1 = join(dir, "motor-1ph.wav");
  writeFileSync(files.wav1, writeWav(synth.wav1.capture));
  files.short = join(dir, "short.csv");
  writeFileSync(files.short, "time_s,Ia\n0,1\n0.001,2\n0.002,3\n");
  files.foreign = join(dir, "picture.png");
  writeFileSync(files.foreign, Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]));
  files.empty = join(dir, "empty.csv");
  writeFileSync(files.empty, "");
  files.badWav = join(dir, "truncated.wav");
  writeFileSync(files.badWav, writeWav(synth.wav1.capture).subarray(0, 30));
});
afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

/** The parser's own message for a file, to compare with what the command line prints. */
function parserMessage(path: string): string {
  try {
    parseCapture(new Uint8Array(readFileSync(path)), { fileName: basename(path) });
  } catch (e) {
    return (e as Error).message;
  }
  throw new Error(`${path} parsed without error`);
}

function parseJsonOut(stdout: string): Record<string, any> {
  const lines = stdout.split("\n").filter((l) => l.trim() !== "");
  expect(lines.length).toBe(1); // exactly one JSON object on stdout
  const obj = JSON.parse(lines[0]);
  expect(typeof obj).toBe("object");
  expect(Array.isArray(obj)).toBe(false);
  return obj;
}

describe("analyze CLI --json", () => {
  it("3-phase CSV with vibration: documented fields, values close to the truth", () => {
    const s = synth.csv3;
    const t = s.truth;
    const out = cli([files.csv3, ...nameplateArgs(s), "--json"]);
    expect(out.stderr).toBe("");
    expect(out.status).toBe(0);
    const r = parseJsonOut(out.stdout);
    for (const k of ["supplyHz", "slip", "rpm", "slipEstimates", "loadPct", "loadMethod", "brokenBar", "vibration", "quality", "markers"]) expect(r).toHaveProperty(k);
    for (const k of ["lowerHz", "lowerDb", "upperHz", "upperDb", "grade", "estimatedBrokenBars", "assessable", "reason"]) expect(r.brokenBar).toHaveProperty(k);
    expect(Math.abs(r.supplyHz - t.supplyHz)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(r.slip - t.slip)).toBeLessThanOrEqual(0.0005);
    expect(Math.abs(r.rpm - t.rpm)).toBeLessThan(1);
    expect(Array.isArray(r.slipEstimates)).toBe(true);
    const methods = r.slipEstimates.map((e: { method: string }) => e.method);
    for (const m of ["eccentricity", "slot-harmonic", "vibration-1x", "nameplate"]) expect(methods).toContain(m);
    expect(Math.abs(r.loadPct - t.loadPct)).toBeLessThan(5);
    expect(r.loadMethod).toBe("slip");
    const bb = r.brokenBar;
    expect(bb.assessable).toBe(true);
    expect(bb.reason).toBeNull();
    expect(Math.abs(bb.lowerHz - t.lowerHz)).toBeLessThan(0.05);
    expect(Math.abs(bb.upperHz - t.upperHz)).toBeLessThan(0.05);
    expect(Math.abs(bb.lowerDb - t.lowerDb)).toBeLessThanOrEqual(1);
    expect(Math.abs(bb.upperDb - t.upperDb)).toBeLessThanOrEqual(1);
    expect(bb.grade).toBe(gradeFromDepth(t.lowerDb));
    expect(Math.abs(bb.estimatedBrokenBars - t.brokenBars)).toBeLessThanOrEqual(0.3);
    expect(Math.abs(r.vibration.velocityRmsMmS / t.velocityRmsMmS! - 1)).toBeLessThan(0.05);
    expect(Math.abs(r.vibration.oneXHz - t.rotorHz)).toBeLessThan(0.01);
    expect(Math.abs(r.vibration.oneXMmS - 2.0)).toBeLessThan(0.05);
    expect(Array.isArray(r.quality)).toBe(true);
    expect(r.quality.filter((q: { severity: string }) => q.severity === "error")).toEqual([]);
    const families = new Set(r.markers.map((m: { family: string }) => m.family));
    for (const fam of ["supply", "broken-bar", "eccentricity", "slot", "vibration"]) expect(families.has(fam)).toBe(true);
  }, TIMEOUT);

  it("1-phase float WAV: sound rotor graded, no vibration", () => {
    const s = synth.wav1;
    const t = s.truth;
    const out = cli([files.wav1, ...nameplateArgs(s), "--json"]);
    expect(out.status).toBe(0);
    const r = parseJsonOut(out.stdout);
    expect(Math.abs(r.supplyHz - t.supplyHz)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(r.slip - t.slip)).toBeLessThanOrEqual(0.0005);
    expect(Math.abs(r.rpm - t.rpm)).toBeLessThan(1);
    expect(r.brokenBar.assessable).toBe(true);
    expect(r.brokenBar.grade).toBe("R1");
    expect(Math.abs(r.brokenBar.lowerDb - t.lowerDb)).toBeLessThanOrEqual(1);
    expect(r.vibration).toBeNull();
  }, TIMEOUT);
});

describe("analyze CLI text report", () => {
  it("reports every figure with its unit", () => {
    const s = synth.csv3;
    const out = cli([files.csv3, ...nameplateArgs(s)]);
    expect(out.status).toBe(0);
    expect(out.stderr).toBe("");
    const txt = out.stdout;
    expect(() => JSON.parse(txt)).toThrow();
    expect(txt).toMatch(/capture\s+10\.00 s at 5000 Hz/);
    expect(txt).toMatch(/supply\s+50\.00\d Hz/);
    expect(txt).toMatch(/speed\s+14(69|70)\.\d rpm \(synchronous 1500\.0 rpm\)/);
    expect(txt).toMatch(/slip\s+\d\.\d{3} %/);
    expect(txt).toMatch(/load\s+\d+\.\d %/);
    expect(txt).toMatch(/f − 2sf\s+4\d\.\d{3} Hz\s+\d+\.\d dB below f/);
    expect(txt).toMatch(/f \+ 2sf\s+5\d\.\d{3} Hz\s+\d+\.\d dB below f/);
    expect(txt).toMatch(/broken bars\s+≈ \d\.\d bars/);
    expect(txt).toMatch(/vibration\s+accel_h: \d+\.\d\d mm\/s r\.m\.s\. \(10–1000 Hz\), zone [A-D]/);
    expect(txt).toMatch(/1×\s+24\.\d{3} Hz\s+\d\.\d\d mm\/s/);
    // each phase and Park's vector, not only the averaged verdict
    for (const ch of s.capture.channels.filter((c) => c.kind === "current")) expect(txt).toMatch(new RegExp(`${ch.name}\\s+\\d+\\.\\d\\d A r\\.m\\.s\\.\\s+f − 2sf\\s+\\d+\\.\\d dB below f\\s+R\\d`));
    expect(txt).toMatch(/Park's vector 2sf\s+\d\.\d{3} Hz/);
  }, TIMEOUT);

  it("machine group and support are taken from the options (ISO 20816-3 zone limits)", () => {
    const s = synth.csv3;
    const out = cli([files.csv3, ...nameplateArgs(s), "--group", "1", "--support", "flexible", "--json"]);
    expect(out.status, out.stderr).toBe(0);
    const r = JSON.parse(out.stdout);
    expect(r.vibration).toMatchObject({ machineGroup: 1, support: "flexible" });
  }, TIMEOUT);
});

describe("analyze CLI errors", () => {
  for (const which of ["short", "foreign", "empty", "badWav"]) {
    it(`a bad file (${which}) exits non-zero with the parser's message on stderr and nothing on stdout`, () => {
      const msg = parserMessage(files[which]);
      for (const extra of [["--json"], []]) {
        const out = cli([files[which], "--poles", "4", "--rated-rpm", "1470", ...extra]);
        expect(out.status).not.toBe(0);
        expect(out.stdout).toBe("");
        expect(out.stderr.trim()).toBe(msg);
      }
    }, TIMEOUT);
  }

  it("a file that does not exist: non-zero, says so on stderr", () => {
    const out = cli([join(dir, "nope.csv"), "--poles", "4", "--rated-rpm", "1470", "--json"]);
    expect(out.status).not.toBe(0);
    expect(out.stdout).toBe("");
    expect(out.stderr).toMatch(/cannot read .*nope\.csv: ENOENT/);
  }, TIMEOUT);

  it("missing --poles gives the usage message (exit 2), nothing on stdout", () => {
    const out = cli([files.csv3, "--rated-rpm", "1470", "--json"]);
    expect(out.status).toBe(2);
    expect(out.stdout).toBe("");
    expect(out.stderr).toMatch(/--poles is required/);
    expect(out.stderr).toMatch(/^usage: analyze FILE --poles N --rated-rpm N/m);
  }, TIMEOUT);

  it("odd --poles and unknown options are usage errors too", () => {
    const odd = cli([files.csv3, "--poles", "3", "--rated-rpm", "1470"]);
    expect(odd.status).toBe(2);
    expect(odd.stderr).toMatch(/--poles must be an even whole number/);
    const unknown = cli([files.csv3, "--poles", "4", "--rated-rpm", "1470", "--frobnicate", "1"]);
    expect(unknown.status).toBe(2);
    expect(unknown.stderr).toMatch(/unknown option --frobnicate[\s\S]*usage:/);
    expect(unknown.stdout).toBe("");
  }, TIMEOUT);

  it("--voltage without --rated-voltage, and a bad --group or --support, are usage errors (nothing silently ignored)", () => {
    const volt = cli([files.csv3, "--poles", "4", "--rated-rpm", "1470", "--voltage", "400"]);
    expect(volt.status).toBe(2);
    expect(volt.stderr).toMatch(/--voltage needs --rated-voltage/);
    expect(cli([files.csv3, "--poles", "4", "--rated-rpm", "1470", "--group", "3"]).stderr).toMatch(/--group must be 1 or 2/);
    expect(cli([files.csv3, "--poles", "4", "--rated-rpm", "1470", "--support", "soft"]).stderr).toMatch(/--support must be rigid or flexible/);
  }, TIMEOUT);
});
