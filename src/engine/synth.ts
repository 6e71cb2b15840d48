// Synthetic captures with known truth, for the tests, the benchmark and the demo data. Every line is generated
// as a multiple of the (possibly wandering) supply phase, so sidebands, eccentricity lines and slot harmonics
// move with the supply exactly as they do on a real motor with constant slip.
import type { Capture, Channel, Nameplate } from "./types.ts";
import { syncRpm, thomsonDepthDb, STANDARD_GRAVITY } from "./formulas.ts";

/** Small seedable PRNG (mulberry32): deterministic tests without a dependency. */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates by Box–Muller. */
export function gaussian(rand: () => number): () => number {
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    const u = Math.max(rand(), 1e-300);
    const v = rand();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
}

export interface SynthVibration {
  /** Accelerometer unit of the channel: "m/s2" (default), "g", or velocity "mm/s". */
  unit?: "m/s2" | "g" | "mm/s";
  axis?: string;
  /** r.m.s. velocity of each component in mm/s. */
  oneXMmS?: number; // default 1.5
  twoXMmS?: number; // default 0.5
  twoLineMmS?: number; // 2× line frequency, default 0.4
  /** Pole-pass sidebands 1× ± 2sf, dB relative to 1× (default: none). */
  polePassDb?: number | null;
  /** White acceleration noise, r.m.s. m/s² over the whole band (default 0.02). */
  noiseAccel?: number;
  /**
   * Extra lines at fixed multiples of the shaft frequency fr, velocity r.m.s. in mm/s each: e.g. a bearing defect
   * tone at order BPFO/fr × 0.985 (a line 1.5 % below its geometric frequency). Default none.
   */
  shaftOrderLines?: Array<{ order: number; vRms: number }>;
}

export interface SynthOptions {
  seed?: number;
  sampleRate?: number; // default 10 000 Hz
  durationS?: number; // default 10 s
  poles: number;
  supplyHz?: number; // mean supply frequency, default 50
  /** Sinusoidal supply wander: peak deviation (Hz) and rate (Hz). */
  wanderHz?: number;
  wanderRateHz?: number;
  /** Linear drift of the supply over the capture (Hz, end minus start). */
  driftHz?: number;
  slip: number;
  /** Nameplate slip at rated load (default: the running slip, i.e. full load). */
  ratedSlip?: number;
  /** Rated supply Hz for the nameplate (default: 50 or 60, whichever is nearer supplyHz). */
  ratedHz?: number;
  /** Fundamental current, r.m.s. A (default 20). */
  currentRmsA?: number;
  phases?: 0 | 1 | 3;
  rotorBars?: number; // default 28
  /** Broken adjacent bars → lower-sideband depth by the Thomson form; 0 = healthy. */
  brokenBars?: number;
  /** Explicit lower-sideband depth, dB below f (overrides brokenBars). Healthy default 64 dB. */
  sidebandDb?: number;
  /** Upper sideband depth minus lower depth (dB), default +3 (upper a little smaller, moderate inertia). */
  upperOffsetDb?: number;
  /** f ± fr eccentricity lines, dB below f (default 48; null = none). */
  eccentricityDb?: number | null;
  /** Principal slot harmonics (k = 1, nw = ±1), dB below f (default 50; null = none). */
  slotHarmonicDb?: number | null;
  /** Odd harmonics 3f, 5f, 7f, dB below f (default 32, 36, 42). */
  harmonicsDb?: [number, number, number] | null;
  /** Signal-to-noise ratio: fundamental r.m.s. over white-noise r.m.s., dB (default 60). */
  snrDb?: number;
  /** Clip the current at this fraction of its peak (e.g. 0.8). */
  clipAt?: number;
  /** DC offset as a fraction of the current r.m.s. */
  dcOffset?: number;
  /** Load-torque oscillation: symmetric current sidebands f ± hz at `db` below f. */
  loadOscillation?: { hz: number; db: number };
  vibration?: SynthVibration | null;
  /** Quantise to this many bits over ±1.5·peak (default none). */
  adcBits?: number;
}

export interface SynthTruth {
  supplyHz: number;
  slip: number;
  rpm: number;
  syncRpm: number;
  rotorHz: number;
  lowerHz: number;
  upperHz: number;
  lowerDb: number;
  upperDb: number;
  brokenBars: number;
  polePassHz: number;
  loadPct: number;
  velocityRmsMmS: number | null;
  durationS: number;
}

export interface SynthResult {
  capture: Capture;
  truth: SynthTruth;
  nameplate: Nameplate;
}

interface Line {
  /** Frequency as a multiple of the instantaneous supply frequency… */
  mult: number;
  /** …plus a fixed offset (Hz), for mechanical sources that do not follow the supply. */
  offsetHz: number;
  amp: number;
  phase: number;
}

export function synthCapture(o: SynthOptions): SynthResult {
  const rand = mulberry32(o.seed ?? 1);
  const gauss = gaussian(rand);
  const fs = o.sampleRate ?? 10000;
  const T = o.durationS ?? 10;
  const n = Math.round(fs * T);
  const f = o.supplyHz ?? 50;
  const p = o.poles / 2;
  const s = o.slip;
  const R = o.rotorBars ?? 28;
  const phasesCount = o.phases ?? 1;
  const Irms = o.currentRmsA ?? 20;
  const A = Irms * Math.SQRT2;
  const bars = o.brokenBars ?? 0;
  const lowerDb = o.sidebandDb ?? (bars > 0 ? thomsonDepthDb(R, p, bars) : 64);
  const upperDb = lowerDb + (o.upperOffsetDb ?? 3);
  const db = (d: number) => 10 ** (-d / 20);

  // Instantaneous supply phase: θ(t) = 2π∫f(t)dt with sinusoidal wander and linear drift.
  const wander = o.wanderHz ?? 0;
  const wanderRate = o.wanderRateHz ?? 0.1;
  const drift = o.driftHz ?? 0;
  const wanderPhase = rand() * 2 * Math.PI;
  const theta = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const t = i / fs;
    let ph = 2 * Math.PI * f * t + 2 * Math.PI * drift * (t * t / (2 * T) - t / 2);
    if (wander) ph += (wander / wanderRate) * (Math.sin(2 * Math.PI * wanderRate * t + wanderPhase) - Math.sin(wanderPhase));
    theta[i] = ph;
  }
  const meanHz = (theta[n - 1] - theta[0]) / (2 * Math.PI * ((n - 1) / fs));

  const lines: Line[] = [];
  const add = (mult: number, amp: number, offsetHz = 0) => lines.push({ mult, offsetHz, amp, phase: rand() * 2 * Math.PI });
  add(1, A);
  add(1 - 2 * s, A * db(lowerDb));
  add(1 + 2 * s, A * db(upperDb));
  if (o.eccentricityDb !== null) {
    const e = A * db(o.eccentricityDb ?? 48);
    add(1 - (1 - s) / p, e);
    add(1 + (1 - s) / p, e);
  }
  if (o.slotHarmonicDb !== null) {
    const e = A * db(o.slotHarmonicDb ?? 50);
    add((R * (1 - s)) / p + 1, e);
    add((R * (1 - s)) / p - 1, e);
  }
  if (o.harmonicsDb !== null) {
    const h = o.harmonicsDb ?? [32, 36, 42];
    add(3, A * db(h[0]));
    add(5, A * db(h[1]));
    add(7, A * db(h[2]));
  }
  if (o.loadOscillation) {
    const e = A * db(o.loadOscillation.db);
    add(1, e, -o.loadOscillation.hz);
    add(1, e, o.loadOscillation.hz);
  }
  // keep only lines below Nyquist
  const audible = lines.filter((l) => l.mult * f + l.offsetHz > 0 && l.mult * f + l.offsetHz < fs / 2);

  const noiseRms = Irms * 10 ** (-(o.snrDb ?? 60) / 20);
  const channels: Channel[] = [];
  const phaseNames = ["A", "B", "C"];
  for (let ph = 0; ph < phasesCount; ph++) {
    // positive sequence: phase b lags by 120°, c by 240°, for every line (rotor-asymmetry sidebands are
    // positive-sequence components at their own frequency)
    const shift = (-2 * Math.PI * ph) / 3;
    const data = new Float32Array(n);
    let peak = 0;
    const tmp = new Float64Array(n);
    for (const l of audible) {
      const off = 2 * Math.PI * l.offsetHz;
      // mechanical-source lines keep their own phase pattern; electrical lines shift with the phase
      const sh = l.mult * shift;
      for (let i = 0; i < n; i++) tmp[i] += l.amp * Math.cos(l.mult * theta[i] + off * (i / fs) + l.phase + sh);
    }
    for (let i = 0; i < n; i++) {
      tmp[i] += noiseRms * gauss();
      peak = Math.max(peak, Math.abs(tmp[i]));
    }
    const dc = (o.dcOffset ?? 0) * Irms;
    const clip = o.clipAt ? o.clipAt * peak : Infinity;
    const q = o.adcBits ? (3 * peak) / 2 ** o.adcBits : 0;
    for (let i = 0; i < n; i++) {
      let v = Math.max(-clip, Math.min(clip, tmp[i])) + dc;
      if (q) v = Math.round(v / q) * q;
      data[i] = v;
    }
    channels.push({ name: `I${phaseNames[ph].toLowerCase()}`, kind: "current", position: phaseNames[ph], unit: "A", data });
  }

  let velocityRms: number | null = null;
  if (o.vibration) {
    const v = o.vibration;
    const fr = (f * (1 - s)) / p;
    const comps: Array<{ mult: number; vRms: number }> = [
      { mult: (1 - s) / p, vRms: v.oneXMmS ?? 1.5 },
      { mult: (2 * (1 - s)) / p, vRms: v.twoXMmS ?? 0.5 },
      { mult: 2, vRms: v.twoLineMmS ?? 0.4 },
    ];
    if (v.polePassDb != null) {
      const sb = (v.oneXMmS ?? 1.5) * db(v.polePassDb);
      comps.push({ mult: (1 - s) / p - 2 * s, vRms: sb }, { mult: (1 - s) / p + 2 * s, vRms: sb });
    }
    // after the standard lines, so their random phases (and the noise) stay as they were without extra lines
    for (const l of v.shaftOrderLines ?? []) if (l.order * fr < fs / 2) comps.push({ mult: (l.order * (1 - s)) / p, vRms: l.vRms });
    const unit = v.unit ?? "m/s2";
    const data = new Float32Array(n);
    const tmp = new Float64Array(n);
    const lo = fr < 10 ? 2 : 10;
    let sum2 = 0;
    for (const c of comps) {
      const hz = c.mult * f;
      if (hz >= lo && hz <= 1000) sum2 += c.vRms * c.vRms;
      const ph0 = rand() * 2 * Math.PI;
      // velocity v(t) = √2·V·sin(φ) → acceleration a = √2·V·ω·cos(φ) (m/s² from mm/s)
      const amp = unit === "mm/s" ? Math.SQRT2 * c.vRms : (Math.SQRT2 * c.vRms * 2 * Math.PI * hz) / 1000;
      for (let i = 0; i < n; i++) tmp[i] += amp * (unit === "mm/s" ? Math.sin(c.mult * theta[i] + ph0) : Math.cos(c.mult * theta[i] + ph0));
    }
    const noise = v.noiseAccel ?? 0.02;
    for (let i = 0; i < n; i++) {
      let val = tmp[i] + (unit === "mm/s" ? 0 : noise * gauss());
      if (unit === "g") val /= STANDARD_GRAVITY;
      data[i] = val;
    }
    velocityRms = Math.sqrt(sum2);
    channels.push({ name: `accel_${(v.axis ?? "H").toLowerCase()}`, kind: "vibration", position: v.axis ?? "H", unit, data });
  }

  const ratedHz = o.ratedHz ?? (Math.abs(f - 60) < Math.abs(f - 50) ? 60 : 50);
  const ratedSlip = o.ratedSlip ?? s;
  const ns = syncRpm(meanHz, o.poles);
  const truth: SynthTruth = {
    supplyHz: meanHz,
    slip: s,
    rpm: ns * (1 - s),
    syncRpm: ns,
    rotorHz: (meanHz * (1 - s)) / p,
    lowerHz: (1 - 2 * s) * meanHz,
    upperHz: (1 + 2 * s) * meanHz,
    lowerDb,
    upperDb,
    brokenBars: bars,
    polePassHz: 2 * s * meanHz,
    loadPct: ((s * meanHz) / (ratedSlip * ratedHz)) * 100,
    velocityRmsMmS: velocityRms,
    durationS: n / fs,
  };
  const nameplate: Nameplate = {
    poles: o.poles,
    ratedHz,
    ratedRpm: syncRpm(ratedHz, o.poles) * (1 - ratedSlip),
    rotorBars: R,
    // rated current such that the current method agrees with the slip method (a simplification: real current
    // is not proportional to load below ~50 %)
    ratedCurrent: Irms / Math.max(0.05, Math.min(1.5, s / ratedSlip)),
  };
  return { capture: { sampleRate: fs, channels, format: "synthetic" }, truth, nameplate };
}
