// The demo's six months of captures, as synthesis recipes with known truth: which motor, when, at what supply
// frequency, slip, load and sideband depth, with or without a load oscillation or a growing 1× vibration. Pure
// and deterministic: the same `now` gives the same list, and the signal of every capture depends only on the
// fixed seed, the motor's tag and the capture's number (never on the date). The engine then analyses each one;
// no reading is written from here.
import { mulberry32, gaussian, type SynthOptions, type SynthVibration } from "../../src/engine/synth.ts";
import { minCaptureSeconds, ratedSlip } from "../../src/engine/formulas.ts";
import { defectOrders } from "../../src/engine/bearings.ts";
import { SCENARIO, type ScenarioMotor, type ScenarioSite } from "./scenario.ts";

export const DEMO_SEED = 20261201;
/** Captures whose raw recording is kept (the latest of every motor, the last few of the story motors). */
export const KEPT_SAMPLE_RATE = 5000;
/**
 * Older captures are analysed at seed time and kept as readings only, so they are made cheaper to synthesise: the
 * lowest of these rates that still holds the motor's rotor slot harmonics (and, on watched motors, the ISO vibration
 * band up to 1 kHz, which needs ≥ 2560 Hz).
 */
export const HISTORY_SAMPLE_RATES = [2000, 2500, 2560, 3200, 3600, 4000, 5000] as const;
/** Shortest capture (kept recordings, history); longer when the slip is small (Hann rule 2sf ≥ 8/T, 25 % margin). */
export const MIN_CAPTURE_S = 20;
export const MIN_HISTORY_CAPTURE_S = 12;
/** Fortnightly rounds over about six months (13 per motor). */
export const ROUNDS = 13;
export const ROUND_DAYS = 14;
/** Story motors keep this many of their latest recordings. */
export const STORY_KEPT = 3;

export interface CaptureSpec {
  tag: string;
  /** 0-based, chronological per motor. */
  seq: number;
  daysAgo: number;
  takenAt: string;
  keepBlob: boolean;
  fileName: string;
  /** Current phases (and the horizontal accelerometer on watched motors). */
  synth: SynthOptions;
  /** Vertical accelerometer (vibration only, phases: 0), on the kept recordings of watched motors. */
  extraVibration: SynthOptions | null;
  notes: string | null;
  /** E-mail of the technician who took it. */
  takenBy: string;
  /** Story marker for the follow-up (verdicts, inspections), e.g. "p03-remeasure". */
  label: string | null;
  /** What the recipe intends (for the seed test and the README, not for the analysis). */
  intent: { loadPct: number; supplyHz: number; sidebandDb: number; oscillationHz: number | null; oneXMmS: number | null };
}

/** FNV-1a, 32 bit: a stable seed from a string. */
export function hashSeed(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return (h ^ DEMO_SEED) >>> 0;
}

const TECH_BY_SITE: Record<string, string> = {
  TWT: "ines.varga@northwend.example",
  GBT: "kasimir.doyle@northwend.example",
  KRB: "aurelie.mbeki@northwend.example",
};
/** Days before `now` of each site's latest round (sites are visited on different days). */
const SITE_OFFSET_DAYS: Record<string, number> = { TWT: 1, GBT: 3, KRB: 5 };
/** Roughly 08:00 local in UTC hours (winter offsets; close enough for demo times). */
const START_UTC_HOUR: Record<string, number> = { "Europe/Berlin": 7, "America/Halifax": 12 };

// Rotor-fault progressions: days before now → lower-sideband depth (dB below f). Before the first entry the
// motor is healthy; the captures at these days are extra re-measures between the fortnightly rounds.
const P03_DEPTHS: Record<number, number> = { 71: 58.2, 57: 55.6, 50: 52.9, 43: 51.7, 29: 47.3, 22: 45.7, 15: 43.6, 8: 41.7, 1: 40.9 };
const C07_DEPTHS: Record<number, number> = { 59: 58.1, 45: 55.5, 38: 52.7, 31: 51.0, 24: 49.3, 17: 47.1, 10: 45.9, 3: 44.2 };
/** GBT-CMP-K02: a torque pulsation from the compressor's unloader cycling, from this many days ago on. */
const K02_OSCILLATION_FROM = 73;
export const K02_OSCILLATION_HZ = 1.05;
/** GBT-DST-F01: target 1× velocity (mm/s r.m.s.) as dust builds up on the impeller. */
const F01_ONE_X: Record<number, number> = { 45: 1.45, 31: 2.05, 17: 2.95, 3: 3.3 };
/**
 * KRB-PMP-P01: an early outer-race mark on the drive-end bearing over its last three rounds: a line 1.5 % below the
 * bearing's BPFO (rolling elements slip, domain.md §7) and its second harmonic at half the level, velocity mm/s
 * r.m.s. by days before now. Small beside the 1× line: it shows as bearing markers, it changes no zone.
 */
const KRB_P01_OUTER_RACE: Record<number, number> = { 33: 0.04, 19: 0.07, 5: 0.11 };

function outerRaceLines(m: ScenarioMotor, daysAgo: number): SynthVibration["shaftOrderLines"] {
  const v = m.tag === "KRB-PMP-P01" ? KRB_P01_OUTER_RACE[daysAgo] : undefined;
  const de = m.bearings?.de;
  if (v === undefined || !de) return undefined;
  const bpfo = defectOrders({ position: "DE", ...de }).BPFO * 0.985;
  return [{ order: bpfo, vRms: v }, { order: 2 * bpfo, vRms: v / 2 }];
}

function daysFor(site: ScenarioSite, m: ScenarioMotor): number[] {
  const off = SITE_OFFSET_DAYS[site.code] ?? 2;
  const regular = Array.from({ length: ROUNDS }, (_, k) => off + ROUND_DAYS * k);
  let days = regular;
  if (m.tag === "TWT-HLP-P03") days = [...regular.filter((d) => d >= 71), ...Object.keys(P03_DEPTHS).map(Number)];
  if (m.tag === "GBT-CNV-C07") days = [...regular.filter((d) => d >= 59), ...Object.keys(C07_DEPTHS).map(Number)];
  return [...new Set(days)].sort((a, b) => b - a); // oldest first
}

const LABELS: Record<string, Record<number, string>> = {
  "TWT-HLP-P03": { 50: "p03-r2", 43: "p03-remeasure", 29: "p03-r3", 8: "p03-r4" },
  "GBT-CNV-C07": { 38: "c07-r2", 17: "c07-r3" },
  "GBT-CMP-K02": { 73: "k02-false-alarm" },
  "GBT-DST-F01": { 17: "f01-zone-c" },
};
const NOTES: Record<string, string> = {
  "p03-remeasure": "Re-measure at full load, as asked on the Watch finding: 30 s, all three phases, pump on duty since 06:00.",
  "k02-false-alarm": "Current clamps only today (accelerometer cable damaged); compressor cycling between load and unload.",
};

function isoDay(d: Date): string {
  return d.toISOString().slice(0, 10);
}

/** Current r.m.s. at part load: magnetising share ≈ 35 % of rated, the rest grows with load (common practice). */
export function currentAt(ratedA: number, loadPct: number): number {
  const l = loadPct / 100;
  return ratedA * Math.sqrt(0.35 ** 2 + (l * Math.sqrt(1 - 0.35 ** 2)) ** 2);
}

/** Capture length that resolves the sidebands at this slip (Hann rule with margin), at least `min` seconds. */
export function captureSeconds(supplyHz: number, slip: number, min = MIN_CAPTURE_S): number {
  return Math.max(min, Math.ceil(1.25 * minCaptureSeconds(supplyHz, slip)));
}

/** History rate of a motor: its principal slot harmonics f·(R/p + 1) stay below 0.9 × Nyquist (the engine's band). */
export function historySampleRate(m: Pick<ScenarioMotor, "ratedHz" | "rotorBars" | "poles" | "vibration">): number {
  const rsh = m.ratedHz * ((m.rotorBars ?? 28) / (m.poles / 2) + 1) * 1.02;
  return HISTORY_SAMPLE_RATES.find((r) => rsh < 0.45 * r && (!m.vibration || r >= 2560)) ?? 5000;
}

/** Every capture of the demo history, oldest first per motor, motors in scenario order. */
export function historyPlan(now: Date): CaptureSpec[] {
  const out: CaptureSpec[] = [];
  const dayStart = Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate());
  for (const site of SCENARIO) {
    site.motors.forEach((m, motorIndex) => {
      const days = daysFor(site, m);
      // Motor constants: line levels that belong to the machine, not to one capture.
      const mr = mulberry32(hashSeed(m.tag));
      const healthyDb = 57.5 + 5 * mr();
      const eccDb = 44 + 8 * mr();
      const rshDb = 46 + 7 * mr();
      const snrDb = 57 + 5 * mr();
      const oneXBase = 0.75 + 0.35 * mr();
      const minuteOfRound = motorIndex * 11 + Math.floor(mr() * 8);
      const sN = ratedSlip(m.ratedRpm, m.poles, m.ratedHz);
      const keepFrom = days.length - (m.story ? STORY_KEPT : 1);

      days.forEach((daysAgo, seq) => {
        const cr = mulberry32(hashSeed(`${m.tag}#${seq}`));
        const g = gaussian(cr);
        const keepBlob = seq >= keepFrom;
        // supply: mains within ±0.04 Hz; the drive-fed intake pump runs where the level controller puts it
        const supplyHz = m.driveFed ? Math.round((43 + 4 * cr()) * 10) / 10 : m.ratedHz + Math.round((cr() - 0.5) * 80) / 1000;
        let loadPct = m.story === "under-loaded" ? 28 + 6 * cr() : Math.min(98, Math.max(45, m.typicalLoadPct + 2.5 * g()));
        loadPct = Math.round(loadPct * 10) / 10;
        // slip speed scales with torque at constant V/f: s·f = s_n·f_rated·load
        const slip = (sN * (loadPct / 100) * m.ratedHz) / supplyHz;
        let sidebandDb = Math.max(56, healthyDb + 1.2 * g());
        if (m.tag === "TWT-HLP-P03" && P03_DEPTHS[daysAgo] !== undefined) sidebandDb = P03_DEPTHS[daysAgo];
        if (m.tag === "GBT-CNV-C07" && C07_DEPTHS[daysAgo] !== undefined) sidebandDb = C07_DEPTHS[daysAgo];
        sidebandDb = Math.round(sidebandDb * 10) / 10;
        const label = LABELS[m.tag]?.[daysAgo] ?? null;
        const oscillation = m.story === "load-oscillation" && daysAgo <= K02_OSCILLATION_FROM ? { hz: K02_OSCILLATION_HZ, db: 44.5 + cr() } : undefined;
        // The false alarm: a clamps-only capture (no accelerometer) in which the eccentricity and slot lines are lost
        // in the floor, so the only speed line left is the oscillation's own sideband pair.
        const speedLinesWeak = label === "k02-false-alarm";

        let vibration: SynthVibration | null = null;
        let oneX: number | null = null;
        if (m.vibration && !speedLinesWeak) {
          oneX = oneXBase * (1 + 0.06 * g());
          if (m.story === "imbalance" && F01_ONE_X[daysAgo] !== undefined) oneX = F01_ONE_X[daysAgo];
          let polePassDb: number | null = null;
          if (m.tag === "TWT-HLP-P03" && P03_DEPTHS[daysAgo] !== undefined) polePassDb = Math.max(16, sidebandDb - 22); // pole-pass sidebands grow with the fault
          if (m.tag === "GBT-CNV-C07" && C07_DEPTHS[daysAgo] !== undefined) polePassDb = Math.max(18, sidebandDb - 20);
          oneX = Math.round(oneX * 100) / 100;
          vibration = { axis: "H", oneXMmS: oneX, twoXMmS: 0.3 + 0.1 * cr(), twoLineMmS: 0.2 + 0.1 * cr(), polePassDb, noiseAccel: 0.02 };
          const outerRace = outerRaceLines(m, daysAgo);
          if (outerRace) vibration.shaftOrderLines = outerRace;
        }
        const sampleRate = keepBlob ? KEPT_SAMPLE_RATE : historySampleRate(m);
        const durationS = captureSeconds(supplyHz, slip, keepBlob ? MIN_CAPTURE_S : MIN_HISTORY_CAPTURE_S);
        const seed = hashSeed(`${m.tag}@${seq}`);
        const synth: SynthOptions = {
          seed,
          sampleRate,
          durationS,
          poles: m.poles,
          supplyHz,
          ratedHz: m.ratedHz,
          wanderHz: m.driveFed ? 0 : 0.003,
          wanderRateHz: 0.05,
          slip,
          ratedSlip: sN,
          currentRmsA: Math.round(currentAt(m.ratedCurrent, loadPct) * 10) / 10,
          phases: 3,
          rotorBars: m.rotorBars ?? 28,
          sidebandDb,
          upperOffsetDb: 2 + 2 * cr(),
          eccentricityDb: speedLinesWeak ? null : Math.round((eccDb + g()) * 10) / 10,
          slotHarmonicDb: speedLinesWeak ? null : Math.round((rshDb + g()) * 10) / 10,
          snrDb,
          // Odd supply harmonics change no reading; recordings that are not kept leave them out (a third of the
          // synthesis time). Kept recordings have them, as the spectrum view shows them.
          harmonicsDb: keepBlob ? undefined : null,
          loadOscillation: oscillation,
          vibration,
        };
        // The vertical accelerometer on kept recordings; the route's older captures have the horizontal one only.
        const extraVibration: SynthOptions | null = vibration && keepBlob
          ? { ...synth, seed: seed ^ 0x5bd1e995, phases: 0, loadOscillation: undefined, vibration: { ...vibration, axis: "V", oneXMmS: Math.round((vibration.oneXMmS ?? 1) * 0.72 * 100) / 100 } }
          : null;

        const hour = START_UTC_HOUR[site.timezone] ?? 9;
        const takenAt = new Date(dayStart - daysAgo * 86_400_000 + hour * 3_600_000 + minuteOfRound * 60_000 + Math.floor(cr() * 300) * 1000);
        out.push({
          tag: m.tag,
          seq,
          daysAgo,
          takenAt: takenAt.toISOString(),
          keepBlob,
          fileName: `${m.tag}_${isoDay(takenAt)}.wav`,
          synth,
          extraVibration,
          notes: label ? NOTES[label] ?? null : null,
          takenBy: TECH_BY_SITE[site.code] ?? TECH_BY_SITE.TWT,
          label,
          intent: { loadPct, supplyHz, sidebandDb, oscillationHz: oscillation?.hz ?? null, oneXMmS: oneX },
        });
      });
    });
  }
  return out;
}
