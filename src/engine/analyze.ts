// The analysis pipeline: quality → supply → slip estimators → fused slip → load → rotor → Park → vibration →
// markers → bearing defect lines. Pure: the same code runs in the worker, the command line, the tests and the browser.
import { ROTOR_GRADE_NAMES } from "./types.ts";
import type { AnalysisOptions, AnalysisResult, BrokenBarResult, Capture, Channel, Marker, Nameplate, QualityVerdict, SlipEstimate, VibrationResult } from "./types.ts";
import { channelStats, channelVerdicts, isClipped, type ChannelStats } from "./quality.ts";
import { coarseSupplyHz, estimateSupply, lowBand, lowBandPassHz, subtractTone, type LowBand, type SupplyEstimate } from "./supply.ts";
import { realSpectrum, findPeak, zoomSpectrum, toDb, type LineSpectrum } from "./spectrum.ts";
import { zoomComplex } from "./zoom.ts";
import {
  combinePhaseEstimates,
  eccentricityEstimate,
  fuseSlip,
  phaseAgreementTolerance,
  plausibleSlipRange,
  sidebandPairEstimate,
  slotHarmonicBand,
  slotHarmonicEstimate,
  strongestSidebandPair,
  vibrationSpeedEstimates,
  type SlipRange,
  type VibrationSpeed,
} from "./slip.ts";
import { estimateLoad } from "./load.ts";
import { assessRotor, gradeFromDepth, measureSidebands, LIGHT_LOAD_PCT, type SidebandMeasurement } from "./rotor.ts";
import { parkAnalysis, type ParkResult } from "./park.ts";
import { analyzeVibration, vibrationLowBand, vibrationLowPassHz, type VibrationAnalysis } from "./vibration.ts";
import { assessBearings, bearingGeometryProblem } from "./bearings.ts";
import { analysisModelReading } from "./motor-model/operating-point.ts";
import { inferRatedHz, minCaptureSeconds, ratedSlip, rpmFromSlip, syncRpm, rotorHz, slotHarmonicHz, thomsonBrokenBars } from "./formulas.ts";

/** Semantic version of the result: minor bumps add fields (1.1.0 bearings, 1.2.0 `model` with a motor model). */
export const ENGINE_VERSION = "1.2.0";

interface CurrentChannelWork {
  ch: Channel;
  stats: ChannelStats;
  band: LowBand;
  supply: SupplyEstimate | null;
  residual: LineSpectrum | null;
}

export interface PhaseResult {
  channel: string;
  supplyHz: number | null;
  rmsA: number;
  lowerHz: number | null;
  lowerDb: number | null;
  upperHz: number | null;
  upperDb: number | null;
  grade: string | null;
}

const r = (v: number, d: number) => Math.round(v * 10 ** d) / 10 ** d;

export function analyzeCapture(capture: Capture, nameplate: Nameplate, options: AnalysisOptions = {}): AnalysisResult {
  const fs = capture.sampleRate;
  if (!(fs > 0)) throw new Error("analyzeCapture: sample rate must be positive");
  if (!(nameplate.poles >= 2) || nameplate.poles % 2 !== 0) throw new Error("analyzeCapture: poles must be an even number ≥ 2");
  if (!(nameplate.ratedRpm > 0)) throw new Error("analyzeCapture: ratedRpm must be positive");
  const quality: QualityVerdict[] = [];
  const markers: Marker[] = [];
  const slipEstimates: SlipEstimate[] = [];
  const ratedHz = inferRatedHz(nameplate.ratedRpm, nameplate.poles, nameplate.ratedHz);
  const poles = nameplate.poles;

  const usable = capture.channels.filter((c) => c.data.length >= 16);
  const stats = new Map<Channel, ChannelStats>();
  for (const ch of usable) {
    const st = channelStats(ch.data);
    stats.set(ch, st);
    quality.push(...channelVerdicts(ch.name, ch.kind, st));
  }
  const live = usable.filter((c) => (stats.get(c)?.rms ?? 0) > 0);
  const currents = live.filter((c) => c.kind === "current");
  const vibs = live.filter((c) => c.kind === "vibration");
  const captureSeconds = Math.max(0, ...capture.channels.map((c) => c.data.length / fs));

  // ---- supply -------------------------------------------------------------------------------------------------
  const work: CurrentChannelWork[] = [];
  let supply: SupplyEstimate | null = null;
  for (const ch of currents) {
    const coarse = coarseSupplyHz(ch.data, fs);
    if (coarse === null) continue;
    const band = lowBand(ch.data, fs, lowBandPassHz(fs, coarse));
    const est = estimateSupply(band, coarse);
    work.push({ ch, stats: stats.get(ch)!, band, supply: est, residual: null });
  }
  const primary = work.find((w) => w.supply) ?? null;
  if (primary) supply = primary.supply;
  if (currents.length && !supply) quality.push({ code: "no-supply-line", severity: "error", message: "No supply line found between 5 and 120 Hz in the current channels." });

  let supplyHz: number | null = supply ? supply.hz : null;
  let supplySource = supply ? "current spectrum" : null;

  // ---- vibration low band (needed for vibration speed lines, and for the supply when there is no current) -------
  const vibLow = vibs.map((ch) => ({ ch, spec: vibrationLowBand(ch, fs) }));
  if (supplyHz === null && vibLow.length) {
    // Vibration only: the 2× line-frequency line, if it stands out, gives f; else assume the rated frequency.
    const spec = vibLow[0].spec;
    const p = findPeak(spec, 2 * ratedHz - 0.6, 2 * ratedHz + 0.6);
    if (p && p.isLocalMax && p.prominenceDb >= 15 && !nameplate.driveFed) {
      supplyHz = p.hz / 2;
      supplySource = "vibration 2×LF line";
    } else {
      supplyHz = ratedHz;
      supplySource = "assumed rated frequency";
      quality.push({ code: "supply-assumed", severity: "warning", message: `No current channel and no clear 2×LF line: the supply is assumed at the rated ${ratedHz} Hz.` });
    }
  }
  const f = supplyHz;

  // stability (sub-block estimates)
  if (supply && supply.blocks.length >= 2) {
    const res = 1 / captureSeconds;
    const limit = Math.max(res, 0.02);
    if (supply.spreadHz > limit) {
      quality.push({
        code: "unstable-supply",
        severity: "warning",
        message: `Supply frequency moved ${supply.spreadHz.toFixed(3)} Hz across ${supply.blocks.length} blocks of ${supply.blockSeconds.toFixed(1)} s (limit ${limit.toFixed(3)} Hz = Δf): lines are smeared; sideband levels read low.`,
      });
    }
  }

  // ---- slip estimators --------------------------------------------------------------------------------------
  let range: SlipRange | null = f ? plausibleSlipRange(nameplate, f) : null;
  // RSH marker lines, with the phase they were read on and that phase's supply amplitude (for the dB level)
  let rshPeaks: Array<{ nw: number; hz: number; amp: number; channel: string; supplyAmp: number }> = [];
  const slipByPhase: Array<{ channel: string; method: string; slip: number | null; confidence: number }> = [];
  if (primary && supply && range && f) {
    // Eccentricity and slot-harmonic lines on every current phase (up to three, the primary first), combined per
    // method, so a noisy, weak or missing phase does not lose the speed.
    const phaseWork = [primary, ...work.filter((w) => w !== primary && w.supply)].slice(0, 3);
    const res = 1 / primary.band.spectrum.seconds;
    const note = (method: string, channel: string, e: SlipEstimate | null) => slipByPhase.push({ channel, method, slip: e ? r(e.slip, 6) : null, confidence: e ? r(e.confidence, 3) : 0 });
    const eccPerPhase = phaseWork.map((w) => {
      const e = eccentricityEstimate(w.band.spectrum, f, poles, range!, w.supply!.spreadHz);
      note("eccentricity", w.ch.name, e);
      return { channel: w.ch.name, estimate: e };
    });
    const ecc = combinePhaseEstimates(eccPerPhase, f, poles, phaseAgreementTolerance("eccentricity", res, f, poles));
    if (ecc) slipEstimates.push(ecc);
    if (nameplate.rotorBars) {
      const R = nameplate.rotorBars;
      const band = slotHarmonicBand(f, poles, R, range, fs / 2);
      if (!band) {
        quality.push({ code: "low-sample-rate", severity: "info", message: `Sample rate ${fs} Hz is too low for the rotor slot harmonics (need > ${(2.56 * slotHarmonicHz(f, poles, range.min, R, 1, 1)).toFixed(0)} Hz).` });
      } else {
        const rshPerPhase = phaseWork.map((w) => {
          const z = zoomSpectrum(zoomComplex(w.ch.data, fs, band.centerHz, band.halfBandHz));
          const out = slotHarmonicEstimate(z, band, f, poles, R, w.supply!.spreadHz);
          note("slot-harmonic", w.ch.name, out.estimate);
          return { w, out };
        });
        const rsh = combinePhaseEstimates(
          rshPerPhase.map(({ w, out }) => ({ channel: w.ch.name, estimate: out.estimate })),
          f,
          poles,
          phaseAgreementTolerance("slot-harmonic", res, f, poles, R),
        );
        if (rsh) {
          slipEstimates.push(rsh);
          // markers from the first phase (primary first) whose estimate agrees with the combined one
          const tol = phaseAgreementTolerance("slot-harmonic", res, f, poles, R);
          const src = rshPerPhase.find(({ out }) => out.estimate && Math.abs(out.estimate.slip - rsh.slip) <= tol);
          if (src) rshPeaks = src.out.peaks.map((pk) => ({ ...pk, channel: src.w.ch.name, supplyAmp: src.w.supply!.amplitude }));
        }
      }
    }
  }
  let vibSpeed: VibrationSpeed | null = null;
  if (vibLow.length && range && f) {
    vibSpeed = vibrationSpeedEstimates(vibLow[0].spec, f, poles, range);
    slipEstimates.push(...vibSpeed.estimates);
    // Vibration only with pole-pass and 1×: f = p·fr + Fp/2 removes the assumed-frequency error.
    if (!supply && supplySource === "assumed rated frequency" && vibSpeed.oneX && vibSpeed.polePassLower && vibSpeed.polePassUpper) {
      const fp = (vibSpeed.polePassUpper.hz - vibSpeed.polePassLower.hz) / 2;
      const fNew = (poles / 2) * vibSpeed.oneX.hz + fp / 2;
      if (Math.abs(fNew - ratedHz) < 2) {
        supplyHz = fNew;
        supplySource = "vibration 1× and pole-pass";
        range = plausibleSlipRange(nameplate, fNew);
        vibSpeed = vibrationSpeedEstimates(vibLow[0].spec, fNew, poles, range);
        slipEstimates.length = 0;
        slipEstimates.push(...vibSpeed.estimates);
      }
    }
  }
  const fz = supplyHz;
  const independent = fz ? fuseSlip(slipEstimates, fz, poles, nameplate.rotorBars) : null;

  // supply-subtracted spectra and the sideband pair
  for (const w of work) {
    if (!w.supply) continue;
    const resid = subtractTone(w.band.dec.data, w.band.dec.sampleRate, w.supply.hz);
    w.residual = realSpectrum(resid, w.band.dec.sampleRate);
  }
  let pairOnly = false;
  let strongestPair = null as ReturnType<typeof strongestSidebandPair>;
  if (primary?.residual && range && fz) {
    strongestPair = strongestSidebandPair(primary.residual, fz, range);
    if (strongestPair) slipEstimates.push(sidebandPairEstimate(strongestPair, fz, poles));
  }
  let fused = independent;
  if (!fused && fz) {
    fused = fuseSlip(slipEstimates, fz, poles, nameplate.rotorBars);
    pairOnly = !!fused;
  }
  const slip = fused ? fused.slip : null;
  const slipConfidence = fused ? fused.confidence : 0;
  const sN = ratedSlip(nameplate.ratedRpm, poles, nameplate.ratedHz);
  slipEstimates.push({ method: "nameplate", slip: range ? range.nominal : sN, rpm: fz ? rpmFromSlip(fz, poles, range ? range.nominal : sN) : nameplate.ratedRpm, confidence: 0, detail: "nameplate full-load slip (reference only, not measured)" });
  if (slip === null && f) quality.push({ code: "speed-not-found", severity: "warning", message: "No speed line (eccentricity, slot harmonic, vibration 1×, pole-pass or sideband pair) was found: speed and slip are unknown." });

  // ---- load -------------------------------------------------------------------------------------------------
  const currentRms = work.length ? work.reduce((s, w) => s + w.stats.rms, 0) / work.length : null;
  const load = estimateLoad({ slip, slipConfidence, supplyHz: fz, nameplate, measuredVoltage: options.measuredVoltage, currentRmsA: currentRms });
  if (load.loadPct !== null && load.loadPct < LIGHT_LOAD_PCT) {
    quality.push({ code: "light-load", severity: "warning", message: `Motor lightly loaded: ${load.loadPct.toFixed(0)} % of rated by the ${load.loadMethod} method (< ${LIGHT_LOAD_PCT} %). Rotor sidebands shrink at light load; measure near full load.` });
  }

  // ---- resolution -------------------------------------------------------------------------------------------
  if (fz && work.length) {
    const sUsed = slip ?? range?.nominal ?? sN;
    const need = minCaptureSeconds(fz, sUsed);
    if (captureSeconds < need) {
      quality.push({
        code: "too-short",
        severity: "warning",
        message: `Capture is ${captureSeconds.toFixed(1)} s (Δf = ${(1 / captureSeconds).toFixed(3)} Hz); at slip ${(sUsed * 100).toFixed(2)} % the sidebands sit 2sf = ${(2 * sUsed * fz).toFixed(3)} Hz from f and need 2sf ≥ 8Δf (Hann), i.e. ≥ ${need.toFixed(1)} s — ${(need - captureSeconds).toFixed(1)} s more.`,
      });
    }
  }
  if (vibs.length && fs < 2.56 * 1000) {
    quality.push({ code: "low-sample-rate", severity: "warning", message: `Sample rate ${fs} Hz is below 2.56 × 1000 Hz: the ISO band is cut at ${(fs / 2.56).toFixed(0)} Hz.` });
  }

  // ---- rotor ------------------------------------------------------------------------------------------------
  // 0 dB reference: the supply amplitude from the Hann low-band spectrum with the zero-padding-aware Grandke
  // correction (supply.ts), not a flat-top reading. Measured (tests/engine/spectrum-velocity.test.ts): on an
  // isolated tone at random fractional-bin offsets both are well within 0.1 dB (Hann ~1e−8 dB, flat-top tallest
  // bin ≤ 0.003 dB), so flat-top gains nothing there; on a wandering supply (±0.06 Hz, 20 s) Hann reads f ~0.9 dB
  // low but the Hann-measured sidebands are smeared alike, so the graded depth stays within 0.3 dB, whereas a
  // flat-top reference reads f fully and would shift every depth by ~0.9 dB. The same window on both lines wins.
  const phases: PhaseResult[] = [];
  let brokenBar: BrokenBarResult;
  const measurements: Array<SidebandMeasurement | null> = [];
  for (const w of work) {
    const m = w.residual && w.supply && slip !== null ? measureSidebands(w.residual, w.supply.hz, w.supply.amplitude, slip) : null;
    measurements.push(m);
  }
  if (!work.length) {
    brokenBar = notAssessableNoCurrent();
  } else if (!primary || !supply) {
    brokenBar = { ...notAssessableNoCurrent(), reason: "no supply line in the current channels" };
  } else {
    const perPhase = work.map((w, i) =>
      assessRotor({
        supplyHz: w.supply?.hz ?? supply!.hz,
        supplyAmp: w.supply?.amplitude ?? supply!.amplitude,
        captureSeconds,
        slip,
        slipConfidence,
        slipIndependent: !pairOnly,
        measurement: measurements[i],
        strongestPair: w === primary ? strongestPair : w.residual && range ? strongestSidebandPair(w.residual, w.supply?.hz ?? supply!.hz, range) : null,
        loadPct: load.loadPct,
        clippedFraction: isClipped(w.stats) ? w.stats.railFraction : null,
        rotorBars: nameplate.rotorBars,
        poles,
        driveFed: nameplate.driveFed || Math.abs(supply!.hz - ratedHz) > 1,
      }),
    );
    work.forEach((w, i) =>
      phases.push({ channel: w.ch.name, supplyHz: w.supply ? r(w.supply.hz, 4) : null, rmsA: r(w.stats.rms, 3), lowerHz: perPhase[i].lowerHz, lowerDb: perPhase[i].lowerDb, upperHz: perPhase[i].upperHz, upperDb: perPhase[i].upperDb, grade: perPhase[i].grade }),
    );
    brokenBar = combinePhases(perPhase, nameplate, poles);
  }

  // ---- Park's vector ----------------------------------------------------------------------------------------
  let park: ParkResult | null = null;
  const three = pickThreePhases(work);
  if (three && slip !== null && fz) {
    const [a, b, c] = three.map((w) => w.band.dec);
    park = parkAnalysis(a.data, b.data, c.data, a.sampleRate, fz, slip);
  }

  // ---- vibration --------------------------------------------------------------------------------------------
  let vibration: VibrationResult | null = null;
  const vibrationChannels: VibrationResult[] = [];
  let vibMain: VibrationAnalysis | null = null;
  for (let i = 0; i < vibLow.length; i++) {
    const { ch, spec } = vibLow[i];
    const vs = i === 0 ? vibSpeed : fz && range ? vibrationSpeedEstimates(spec, fz, poles, range) : null;
    const fp = slip !== null && fz ? 2 * slip * fz : null;
    const va = analyzeVibration(ch, fs, nameplate, fz ?? ratedHz, spec, vs?.oneX ?? null, fp);
    vibrationChannels.push(va.result);
    if (i === 0) {
      vibration = va.result;
      vibMain = va;
    }
  }
  // ISO 20816-3 covers machines above 15 kW running at 120–30 000 r/min (domain.md §6): outside that the zone is
  // only a guide.
  if (vibration) {
    const kw = nameplate.ratedKw;
    const rpmNow = slip !== null && fz ? rpmFromSlip(fz, poles, slip) : nameplate.ratedRpm;
    const outside = kw !== undefined && kw <= 15 ? `rated ${kw} kW (the standard starts above 15 kW)` : rpmNow < 120 || rpmNow > 30_000 ? `${rpmNow.toFixed(0)} rpm (the standard covers 120–30 000 rpm)` : null;
    if (outside) quality.push({ code: "iso-scope", severity: "info", message: `ISO 20816-3 does not cover this machine: ${outside}. The vibration zone is a guide only.` });
  }

  // ---- markers ----------------------------------------------------------------------------------------------
  if (primary && supply) {
    const ch = primary.ch.name;
    const spec = primary.band.spectrum;
    const levelAt = (hz: number) => {
      const pk = findPeak(spec, hz - 2 / spec.seconds, hz + 2 / spec.seconds);
      return pk ? r(toDb(pk.amp / supply!.amplitude), 1) : -120;
    };
    markers.push({ name: "f", family: "supply", hz: r(supply.hz, 4), level: 0, channel: ch });
    if (slip !== null) {
      const bb = brokenBar;
      const m = measurements[0];
      if (m) {
        markers.push({ name: "f − 2sf", family: "broken-bar", hz: r(m.lower.hz, 4), level: Number.isFinite(m.lower.depthDb) ? r(-m.lower.depthDb, 1) : -120, channel: ch });
        markers.push({ name: "f + 2sf", family: "broken-bar", hz: r(m.upper.hz, 4), level: Number.isFinite(m.upper.depthDb) ? r(-m.upper.depthDb, 1) : -120, channel: ch });
      }
      void bb;
      const fr = rotorHz(supply.hz, poles, slip);
      if (poles > 2) markers.push({ name: "f − fr", family: "eccentricity", hz: r(supply.hz - fr, 4), level: levelAt(supply.hz - fr), channel: ch });
      markers.push({ name: "f + fr", family: "eccentricity", hz: r(supply.hz + fr, 4), level: levelAt(supply.hz + fr), channel: ch });
      for (const pk of rshPeaks) markers.push({ name: `RSH ${pk.nw > 0 ? "+" : "−"}1`, family: "slot", hz: r(pk.hz, 3), level: r(toDb(pk.amp / pk.supplyAmp), 1), channel: pk.channel });
    }
    for (const k of [3, 5, 7]) {
      const hz = k * supply.hz;
      if (hz < primary.band.dec.sampleRate / 2 * 0.9) markers.push({ name: `${k}f`, family: "harmonic", hz: r(hz, 3), level: levelAt(hz), channel: ch });
    }
  }
  if (vibMain && vibration) {
    const ch = vibration.channel;
    const lvl = (v: number | null) => (v === null ? 0 : r(v, 3));
    if (vibration.oneXHz !== null) {
      markers.push({ name: "1×", family: "vibration", hz: r(vibration.oneXHz, 4), level: lvl(vibration.oneXMmS), channel: ch });
      if (vibMain.twoX) markers.push({ name: "2×", family: "vibration", hz: r(vibMain.twoX.hz, 4), level: lvl(vibMain.toMmS(vibMain.twoX)), channel: ch });
      if (vibSpeed?.polePassLower) markers.push({ name: "1× − Fp", family: "vibration", hz: r(vibSpeed.polePassLower.hz, 4), level: lvl(vibMain.toMmS(vibSpeed.polePassLower)), channel: ch });
      if (vibSpeed?.polePassUpper) markers.push({ name: "1× + Fp", family: "vibration", hz: r(vibSpeed.polePassUpper.hz, 4), level: lvl(vibMain.toMmS(vibSpeed.polePassUpper)), channel: ch });
    }
    if (vibration.twoLineHz !== null) markers.push({ name: "2×LF", family: "vibration", hz: r(vibration.twoLineHz, 4), level: lvl(vibration.twoLineMmS), channel: ch });
  }

  // ---- rolling bearings (an indication beside the vibration zone; changes no grade or zone) -------------------
  let bearings: AnalysisResult["bearings"];
  if (nameplate.bearings?.length) {
    const usableBearings = nameplate.bearings.filter((g) => {
      const problem = bearingGeometryProblem(g);
      if (problem) quality.push({ code: "bearing-geometry", severity: "warning", message: `Bearing ${g.position} left out: ${problem}.` });
      return !problem;
    });
    if (usableBearings.length) {
      const shaftHz = slip !== null && fz ? rotorHz(fz, poles, slip) : null;
      const b = assessBearings(
        usableBearings,
        shaftHz ? { shaftHz, supplyHz: fz, polePassHz: slip !== null && fz ? 2 * slip * fz : null, supplySpreadHz: supply?.spreadHz ?? 0 } : null,
        vibLow.map(({ ch, spec }) => ({ name: ch.name, unit: ch.unit, data: ch.data, lowSpectrum: spec, lowPassHz: vibrationLowPassHz(fs) })),
        fs,
      );
      bearings = b.result;
      markers.push(...b.markers);
    }
  }

  const ns = fz ? syncRpm(fz, poles) : null;
  const loadEstimates = load.estimates.map((e) => ({ ...e, loadPct: r(e.loadPct, 1) }));
  const slipOut = slip !== null ? r(slip, 6) : null;
  const supplyOut = fz !== null ? r(fz, 4) : null;
  // ---- motor model (when given): the equivalent circuit at the measured slip, beside the slip method ---------
  const model = options.motorModel
    ? analysisModelReading(options.motorModel, { slip: slipOut, supplyHz: supplyOut, phases, loadEstimates }, capture.channels, options.measuredVoltage)
    : null;
  return {
    engineVersion: ENGINE_VERSION,
    supplyHz: supplyOut,
    syncRpm: ns !== null ? r(ns, 2) : null,
    slip: slipOut,
    rpm: slip !== null && fz ? r(rpmFromSlip(fz, poles, slip), 2) : null,
    slipEstimates: slipEstimates.map((e) => ({ ...e, slip: r(e.slip, 6), rpm: r(e.rpm, 2), confidence: r(e.confidence, 3) })),
    slipConfidence: r(slipConfidence, 3),
    slipByPhase,
    loadPct: load.loadPct,
    loadMethod: load.loadMethod,
    loadEstimates,
    brokenBar,
    vibration,
    vibrationChannels,
    ...(bearings ? { bearings } : {}),
    quality,
    markers,
    supplySource,
    supplyBlocksHz: supply ? supply.blocks.map((b) => r(b, 4)) : [],
    captureSeconds: r(captureSeconds, 3),
    sampleRate: fs,
    phases,
    park: park ? { twoSfHz: r(park.twoSfHz, 4), depthDb: park.depthDb !== null ? r(park.depthDb, 2) : null, detected: park.detected } : null,
    plausibleSlip: range ? { min: r(range.min, 6), max: r(range.max, 6), nominal: r(range.nominal, 6) } : null,
    ...(model ? { model } : {}),
  };
}

function notAssessableNoCurrent(): BrokenBarResult {
  return {
    lowerHz: null,
    lowerDb: null,
    upperHz: null,
    upperDb: null,
    depthDb: null,
    grade: null,
    gradeName: "Not assessable",
    estimatedBrokenBars: null,
    assessable: false,
    reason: "no current channel",
    loadOscillationSuspected: false,
    confidence: 0,
    caveats: [],
  };
}

/** Three current channels, by position A/B/C when given, else the first three. */
function pickThreePhases(work: CurrentChannelWork[]): CurrentChannelWork[] | null {
  const ok = work.filter((w) => w.supply);
  if (ok.length < 3) return null;
  const byPos = ["A", "B", "C"].map((p) => ok.find((w) => (w.ch.position ?? "").toUpperCase() === p));
  if (byPos.every(Boolean)) return byPos as CurrentChannelWork[];
  return ok.slice(0, 3);
}

/**
 * One rotor verdict from the phases: a rotor fault shows on all three, so the levels are averaged in dB over the
 * phases that are assessable; any phase flagging load oscillation flags the result.
 */
function combinePhases(perPhase: BrokenBarResult[], nameplate: Nameplate, poles: number): BrokenBarResult {
  const first = perPhase[0];
  if (perPhase.length === 1) return first;
  const osc = perPhase.find((p) => p.loadOscillationSuspected);
  if (osc) return osc;
  const ok = perPhase.filter((p) => p.assessable && p.depthDb !== null);
  if (!ok.length) return first;
  const avg = (xs: Array<number | null>) => {
    const v = xs.filter((x): x is number => x !== null);
    return v.length ? v.reduce((a, b) => a + b, 0) / v.length : null;
  };
  const depth = avg(ok.map((p) => p.depthDb))!;
  const base = ok[0];
  const gradeOf = assessRotorGrade(depth);
  const bars = nameplate.rotorBars && base.estimatedBrokenBars !== null ? r(thomson(nameplate.rotorBars, poles / 2, depth, base.estimatedBrokenBars), 1) : base.estimatedBrokenBars;
  return {
    ...base,
    lowerDb: r(avg(ok.map((p) => p.lowerDb))!, 2),
    upperDb: avg(ok.map((p) => p.upperDb)) !== null ? r(avg(ok.map((p) => p.upperDb))!, 2) : null,
    depthDb: r(depth, 2),
    grade: gradeOf.grade,
    gradeName: gradeOf.name,
    estimatedBrokenBars: bars,
    confidence: r(Math.min(1, avg(ok.map((p) => p.confidence))! * (ok.length === perPhase.length ? 1 : 0.8)), 3),
    caveats: [...base.caveats, `Averaged over ${ok.length} phases.`],
  };
}

function assessRotorGrade(depth: number) {
  const grade = gradeFromDepth(depth);
  return { grade, name: ROTOR_GRADE_NAMES[grade] };
}
function thomson(R: number, p: number, depth: number, previous: number): number {
  return previous === 0 ? 0 : thomsonBrokenBars(R, p, depth);
}
