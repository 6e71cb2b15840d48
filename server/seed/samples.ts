// The files in sample-data/: small captures a new user can upload to a demo motor to see each kind of result.
// Each is a synthetic capture with known truth (src/engine/synth.ts) and a fixed seed, so
// `npm run sample-data` writes byte-identical files every time. `expect` is what the engine must report
// for it with the motor's nameplate; tests/engine/sample-data.test.ts checks it and sample-data/README.md shows it.
import crypto from "node:crypto";
import fs from "node:fs/promises";
import path from "node:path";
import { synthCapture, type SynthOptions, type SynthTruth } from "../../src/engine/synth.ts";
import { writeCsv, writeWav } from "../../src/engine/parse/index.ts";
import { ratedSlip, thomsonDepthDb } from "../../src/engine/formulas.ts";
import { gradeFromDepth } from "../../src/engine/rotor.ts";
import type { Capture, RotorGrade } from "../../src/engine/types.ts";
import { SCENARIO, type ScenarioMotor } from "./scenario.ts";
import { captureSeconds, currentAt } from "./story.ts";

export interface SampleExpectation {
  /** Rotor grade, or null = not assessable (then `reason` starts the engine's reason text). */
  grade: RotorGrade | null;
  reason?: "light load" | "load oscillation suspected" | "capture too short" | "no current channel";
  /** Quality verdict codes that must be present; every other code must be absent. */
  quality: string[];
  zone?: "A" | "B" | "C" | "D";
  /** Broken bars by the Thomson estimate (± 0.5). */
  brokenBars?: number;
  /** False: the supply is not measured from the current (vibration only: from the 2×LF line). */
  supplyFromCurrent: boolean;
}

export interface SampleFile {
  file: string;
  tag: string;
  title: string;
  /** One or two sentences for the README: what the user sees. */
  story: string;
  format: "csv" | "wav";
  synth: SynthOptions;
  expect: SampleExpectation;
}

export const MOTORS: Map<string, ScenarioMotor> = new Map(SCENARIO.flatMap((s) => s.motors).map((m) => [m.tag, m]));
const motor = (tag: string) => {
  const m = MOTORS.get(tag);
  if (!m) throw new Error(`sample data: no scenario motor ${tag}`);
  return m;
};

/** Slip of a motor at a load (slip speed ∝ torque at constant V/f), and the rest of a recipe from its nameplate. */
function recipe(tag: string, o: { seed: number; loadPct: number; supplyHz: number; sampleRate: number; durationS?: number } & Partial<SynthOptions>): SynthOptions {
  const m = motor(tag);
  const sN = ratedSlip(m.ratedRpm, m.poles, m.ratedHz);
  const slip = (sN * (o.loadPct / 100) * m.ratedHz) / o.supplyHz;
  const { loadPct, ...rest } = o;
  return {
    poles: m.poles,
    ratedHz: m.ratedHz,
    ratedSlip: sN,
    slip,
    rotorBars: m.rotorBars ?? 28,
    currentRmsA: Math.round(currentAt(m.ratedCurrent, loadPct) * 10) / 10,
    phases: 3,
    sidebandDb: o.brokenBars ? undefined : 61,
    eccentricityDb: 47,
    slotHarmonicDb: 49,
    snrDb: 60,
    durationS: captureSeconds(o.supplyHz, slip),
    ...rest,
  };
}

export const SAMPLE_FILES: SampleFile[] = [
  {
    file: "healthy-4pole-50hz.csv",
    tag: "KRB-PMP-D01",
    title: "Healthy 4-pole motor on a 50 Hz supply",
    story: "Three phase currents in a CSV with a time column. Deep sidebands: rotor Sound at three-quarter load, clean quality checks.",
    format: "csv",
    synth: recipe("KRB-PMP-D01", { seed: 101, loadPct: 76, supplyHz: 50.02, sampleRate: 2000, durationS: 20, wanderHz: 0.002, wanderRateHz: 0.05 }),
    expect: { grade: "R1", quality: [], supplyFromCurrent: true },
  },
  {
    file: "broken-bars-2.wav",
    tag: "TWT-HLP-P03",
    title: "Two broken rotor bars",
    story: "16-bit WAV with its channel description (bhch chunk: names, phases, scale to amperes). The lower sideband stands about 32 dB below the supply line: rotor R5 Severe, about two broken bars by the Thomson estimate.",
    format: "wav",
    synth: recipe("TWT-HLP-P03", { seed: 102, loadPct: 90, supplyHz: 49.98, sampleRate: 5000, durationS: 30, brokenBars: 2, wanderHz: 0.003, wanderRateHz: 0.05 }),
    expect: { grade: gradeFromDepth(thomsonDepthDb(46, 2, 2)), brokenBars: 2, quality: [], supplyFromCurrent: true },
  },
  {
    file: "drive-fed-45hz.wav",
    tag: "TWT-INT-P01",
    title: "Drive-fed motor at 45.5 Hz",
    story: "An inverter-fed intake pump running below its rated 50 Hz. The supply is found at 45.5 Hz, slip and load are read at that frequency, the rotor is Sound with the caveat that drive control loops can make sidebands.",
    format: "wav",
    synth: recipe("TWT-INT-P01", { seed: 103, loadPct: 80, supplyHz: 45.5, sampleRate: 5000, durationS: 20 }),
    expect: { grade: "R1", quality: [], supplyFromCurrent: true },
  },
  {
    file: "light-load-fan.wav",
    tag: "KRB-VNT-F02",
    title: "Lightly loaded fan",
    story: "The hall extract fan at about 30 % load. Speed, slip and load are read, but the rotor is Not assessable (light load): at this load rotor sidebands shrink into the supply line's skirt, so a clean spectrum proves nothing.",
    format: "wav",
    synth: recipe("KRB-VNT-F02", { seed: 104, loadPct: 30, supplyHz: 50.01, sampleRate: 5000, wanderHz: 0.002, wanderRateHz: 0.05 }),
    expect: { grade: null, reason: "light load", quality: ["light-load"], supplyFromCurrent: true },
  },
  {
    file: "load-oscillation.wav",
    tag: "GBT-CMP-K02",
    title: "Load oscillation, not a rotor fault",
    story: "A reciprocating compressor whose unloader cycling modulates the torque at 1.05 Hz. The pair at f ± 1.05 Hz looks like rotor sidebands, but the slip from the eccentricity and slot-harmonic lines puts 2sf at about 0.82 Hz: Not assessable (load oscillation suspected).",
    format: "wav",
    synth: recipe("GBT-CMP-K02", { seed: 105, loadPct: 82, supplyHz: 59.98, sampleRate: 5000, durationS: 20, sidebandDb: 62, loadOscillation: { hz: 1.05, db: 45 } }),
    expect: { grade: null, reason: "load oscillation suspected", quality: [], supplyFromCurrent: true },
  },
  {
    file: "vibration-only.csv",
    tag: "TWT-HLP-P01",
    title: "Vibration only (one accelerometer)",
    story: "Drive-end horizontal acceleration in m/s², no current. The supply comes from the 2× line-frequency line, speed and slip from the 1× line and its pole-pass sidebands, and the velocity r.m.s. gives the ISO 20816-3 zone (B). No rotor grade without current. The motor's bearings are on record (drive end 6319 C3, non-drive end 6316 C3), so the vibration spectrum also carries the bearing defect markers (key d) at the frequencies expected at the measured speed; no bearing line stands out in this file, each is reported not found.",
    format: "csv",
    synth: recipe("TWT-HLP-P01", {
      seed: 106,
      loadPct: 88,
      supplyHz: 50,
      sampleRate: 2560,
      durationS: 30,
      phases: 0,
      vibration: { axis: "H", unit: "m/s2", oneXMmS: 1.9, twoXMmS: 0.5, twoLineMmS: 0.45, polePassDb: 26, noiseAccel: 0.01 },
    }),
    expect: { grade: null, reason: "no current channel", quality: [], zone: "B", supplyFromCurrent: false },
  },
  {
    file: "too-short.wav",
    tag: "TWT-HLP-P02",
    title: "Capture too short",
    story: "Only 3 s of current. Supply, speed and load are still read, but Δf = 0.33 Hz cannot separate sidebands 0.7 Hz from the supply line: a too-short quality verdict saying how many seconds more are needed, and the rotor Not assessable (capture too short).",
    format: "wav",
    synth: recipe("TWT-HLP-P02", { seed: 107, loadPct: 86, supplyHz: 50.01, sampleRate: 5000, durationS: 3 }),
    expect: { grade: null, reason: "capture too short", quality: ["too-short"], supplyFromCurrent: true },
  },
];

export interface BuiltSample {
  sample: SampleFile;
  bytes: Uint8Array;
  capture: Capture;
  truth: SynthTruth;
}

/** The bytes of one sample file (deterministic: a fixed seed, integer PCM or fixed-digit CSV). */
export function buildSample(sample: SampleFile): BuiltSample {
  const { capture, truth } = synthCapture(sample.synth);
  const bytes = sample.format === "wav" ? writeWav(capture, { bits: 16 }) : new TextEncoder().encode(writeCsv(capture, { digits: 7 }));
  return { sample, bytes, capture, truth };
}

const pct = (v: number, d = 1) => `${(v * 100).toFixed(d)} %`;

/** What the README promises for a sample: the truth it was made from, rounded as the screens show it. */
export function promised(b: BuiltSample) {
  const { truth: t, sample: s } = b;
  const m = motor(s.tag);
  const rotor =
    s.expect.grade !== null
      ? `${s.expect.grade} ${({ R1: "Sound", R2: "Watch", R3: "Developing", R4: "Serious", R5: "Severe" } as const)[s.expect.grade]}${s.expect.brokenBars ? `, ≈ ${s.expect.brokenBars} broken bars` : ""}`
      : `Not assessable (${s.expect.reason})`;
  return {
    supply: `${t.supplyHz.toFixed(2)} Hz${s.expect.supplyFromCurrent ? "" : " (2×LF line)"}`,
    slip: pct(t.slip, 2),
    rpm: `${t.rpm.toFixed(0)} rpm`,
    load: `${t.loadPct.toFixed(0)} %`,
    sideband: s.expect.grade !== null ? `${t.lowerDb.toFixed(1)} dB` : "—",
    rotor,
    zone: s.expect.zone ? `${s.expect.zone} (${t.velocityRmsMmS!.toFixed(2)} mm/s)` : "—",
    quality: s.expect.quality.length ? s.expect.quality.join(", ") : "clean",
    motor: `${m.tag} ${m.name}`,
  };
}

function sampleReadme(built: BuiltSample[]): string {
  const rows = built.map((b) => {
    const p = promised(b);
    const secs = b.truth.durationS;
    const rate = b.sample.synth.sampleRate ?? 10000;
    const ch = b.capture.channels.map((c) => c.name).join(", ");
    return { b, p, line: `| \`${b.sample.file}\` | ${b.sample.tag} | ${(b.bytes.length / 1e6).toFixed(2)} MB, ${rate} Hz × ${secs} s, ${ch} | ${p.supply} | ${p.slip} | ${p.rpm} | ${p.load} | ${p.sideband} | ${p.rotor} | ${p.zone} | ${p.quality} |` };
  });
  return `# Sample captures

Small capture files to try Barhound with: sign in as the technician, open **Upload**, choose the motor named below
and drop the file. Each was made by \`npm run sample-data\` (\`scripts/make-sample-data.ts\`) from a fixed seed with
the engine's synthetic capture generator, so the truth is known: the table shows what the analysis should report
with that motor's nameplate. Readings are rounded as on the screens; the engine may differ in the last digit.
All data is invented (Northwend Utilities is an invented operator).

| file | upload to | content | supply | slip | speed | load | lower sideband | rotor | vibration zone | quality |
|---|---|---|---|---|---|---|---|---|---|---|
${rows.map((r) => r.line).join("\n")}

${rows.map((r) => `## ${r.b.sample.title} — \`${r.b.sample.file}\`

Upload to **${r.p.motor}**. ${r.b.sample.story}
`).join("\n")}
## Formats

- CSV: a header row naming the channels (\`time_s\`, \`Ia\`, \`Ib\`, \`Ic\` in amperes; \`accel_h\` in m/s²), one row per
  sample; the sample rate comes from the time column.
- WAV: 16-bit PCM, one channel per signal, with a \`bhch\` chunk holding each channel's name, kind, unit, phase or
  axis and the scale from full range to engineering units.

Regenerate with \`npm run sample-data\` (byte-identical output; \`-- --out DIR\` writes elsewhere,
\`-- --reseed\` also rebuilds the demo history in the running database).
`;
}

/** Write every sample file and the README into a folder. Returns name → SHA-256 of what was written. */
export async function writeSampleData(outDir: string): Promise<Map<string, string>> {
  await fs.mkdir(outDir, { recursive: true });
  const built = SAMPLE_FILES.map(buildSample);
  const files: Array<[string, Uint8Array]> = [...built.map((b) => [b.sample.file, b.bytes] as [string, Uint8Array]), ["README.md", new TextEncoder().encode(sampleReadme(built))]];
  const out = new Map<string, string>();
  for (const [name, bytes] of files) {
    await fs.writeFile(path.join(outDir, name), bytes);
    out.set(name, crypto.createHash("sha256").update(bytes).digest("hex"));
  }
  return out;
}
