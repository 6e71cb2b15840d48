// Rolling-bearing defect frequencies and their search on the vibration spectrum. With the inner race turning at the
// shaft frequency fr and the outer race fixed (domain.md §7; Harris & Kotzalas, Rolling Bearing Analysis, 5th ed.
// 2006; Randall & Antoni, "Rolling element bearing diagnostics — a tutorial", MSSP 25(2), 2011):
//   FTF  = (fr/2)·(1 − (d/D)·cos φ)              cage (fundamental train)
//   BPFO = (Nb/2)·fr·(1 − (d/D)·cos φ)           ball pass, outer race
//   BPFI = (Nb/2)·fr·(1 + (d/D)·cos φ)           ball pass, inner race
//   BSF  = (D/(2d))·fr·(1 − (d/D)²·cos² φ)       rolling-element spin; a rolling-element defect often shows at 2×BSF
// Real lines sit 1–2 % below these because the rolling elements slip, so each harmonic is searched in a band reaching
// further below the expected frequency than above it. The result is an indication for the analyst, never a grade.
import type { BearingDefect, BearingDefectResult, BearingGeometry, BearingLine, BearingResult, BearingsResult, Marker } from "./types.ts";
import { findPeak, lineVelocityMmS, powerCentroidHz, realSpectrum, requiredProminenceDb, type LineSpectrum, type Peak } from "./spectrum.ts";
import { decimateReal } from "./zoom.ts";

export const BEARING_DEFECTS: readonly BearingDefect[] = ["FTF", "BPFO", "BPFI", "BSF"];
/** Harmonics searched of each defect frequency (1×, 2×, 3×). */
export const BEARING_HARMONICS = 3;
/**
 * Search band around each expected line: from 3 % below to 1 % above. Real frequencies sit 1–2 % low from
 * rolling-element slip (domain.md §7: common practice, Randall & Antoni 2011); the extra percent below and the one
 * above cover the speed estimate and the geometry's own tolerance (common practice).
 */
export const BEARING_TOLERANCE = { lowPct: 3, highPct: 1 } as const;

/** Why a geometry cannot give defect frequencies, or null when it can. */
export function bearingGeometryProblem(g: BearingGeometry): string | null {
  const phi = g.contactAngleDeg ?? 0;
  if (!Number.isInteger(g.rollingElements) || g.rollingElements < 3 || g.rollingElements > 60) return "the number of rolling elements must be a whole number from 3 to 60";
  if (!(g.elementDiameterMm > 0) || !Number.isFinite(g.elementDiameterMm)) return "the rolling-element diameter d must be above 0 mm";
  if (!(g.pitchDiameterMm > g.elementDiameterMm) || !Number.isFinite(g.pitchDiameterMm)) return "the pitch diameter D must be larger than the rolling-element diameter d";
  if (!(phi >= 0 && phi < 90)) return "the contact angle must be from 0° up to (not including) 90°";
  return null;
}

/** The four defect frequencies as multiples of the shaft frequency (geometry only). Throws on an impossible geometry. */
export function defectOrders(g: BearingGeometry): Record<BearingDefect, number> {
  const problem = bearingGeometryProblem(g);
  if (problem) throw new RangeError(`Bearing ${g.position}: ${problem}.`);
  const ratio = (g.elementDiameterMm / g.pitchDiameterMm) * Math.cos(((g.contactAngleDeg ?? 0) * Math.PI) / 180);
  const nb = g.rollingElements;
  return {
    FTF: 0.5 * (1 - ratio),
    BPFO: (nb / 2) * (1 - ratio),
    BPFI: (nb / 2) * (1 + ratio),
    BSF: (g.pitchDiameterMm / (2 * g.elementDiameterMm)) * (1 - ratio * ratio),
  };
}

/** Defect frequencies in Hz at shaft frequency `shaftHz` (= rpm / 60). */
export function defectFrequencies(g: BearingGeometry, shaftHz: number): Record<BearingDefect, number> {
  const o = defectOrders(g);
  return { FTF: o.FTF * shaftHz, BPFO: o.BPFO * shaftHz, BPFI: o.BPFI * shaftHz, BSF: o.BSF * shaftHz };
}

/**
 * Band searched for a line expected at `expectedHz`: the tolerance band, widened by two resolution cells each side so
 * a line is never lost to the spectrum's own grid.
 */
export function bearingSearchBand(expectedHz: number, resolutionHz: number): [number, number] {
  return [expectedHz * (1 - BEARING_TOLERANCE.lowPct / 100) - 2 * resolutionHz, expectedHz * (1 + BEARING_TOLERANCE.highPct / 100) + 2 * resolutionHz];
}

export interface BearingContext {
  shaftHz: number;
  supplyHz: number | null;
  /** Pole-pass frequency 2sf (sidebands of 1× and 2×), Hz. */
  polePassHz: number | null;
  /** How far the supply frequency moved over the capture, Hz (supply.ts): the speed, and every line, moves with it. */
  supplySpreadHz?: number;
}

/** A line that is not a bearing line: a running-speed harmonic, a pole-pass sideband, a multiple of 2×LF. */
export interface OtherLine {
  hz: number;
  amp: number;
  /**
   * How far the line wanders over the capture, Hz: 0.1 % of its frequency for speed variation (common practice), plus
   * its share of the supply's own spread (a line at n·f moves n times as far as f).
   */
  wanderHz: number;
}

/**
 * Lines that are not bearing lines but can fall into a search band: the running-speed harmonics k·fr, the pole-pass
 * sidebands 1× ± Fp and 2× ± Fp, and the multiples of twice the line frequency — each where it stands out of the
 * spectrum (a local maximum ≥ 10 dB over its floor, the rule vibration.ts uses for 2× and 2×LF) within a resolution
 * cell, plus its wander, of where it belongs.
 */
export function otherLines(spec: LineSpectrum, ctx: BearingContext, maxHz: number): OtherLine[] {
  const res = 1 / spec.seconds;
  const spread = ctx.supplyHz && ctx.supplySpreadHz ? ctx.supplySpreadHz / ctx.supplyHz : 0;
  const fr = ctx.shaftHz;
  const fp = ctx.polePassHz ?? 0;
  const centres: number[] = [];
  for (let k = 1; k * fr <= maxHz + fr; k++) centres.push(k * fr);
  if (fp > 0) centres.push(fr - fp, fr + fp, 2 * fr - fp, 2 * fr + fp);
  if (ctx.supplyHz) for (let k = 1; k * 2 * ctx.supplyHz <= maxHz + 2 * ctx.supplyHz; k++) centres.push(k * 2 * ctx.supplyHz);
  const out: OtherLine[] = [];
  for (const c of centres) {
    if (!(c > 0)) continue;
    // within a resolution cell (plus the wander) of where the line belongs: a bearing line a few cells away is not it
    const w = res + (0.001 + spread) * c;
    const p = findPeak(spec, c - w, c + w);
    if (!p || !p.isLocalMax || p.prominenceDb < 10) continue;
    // A wandering line's tallest bin can be one of its modulation sidebands; its power centroid is its mean frequency.
    out.push({ hz: powerCentroidHz(spec, p.hz, w + 2 * res, p.floorAmp), amp: p.amp, wanderHz: (0.001 + spread) * p.hz });
  }
  return out;
}

/**
 * Upper bound of another line's Hann leakage at `hz`, in amplitude: the kernel |sinc ν/(1 − ν²)| (spectrum.ts) with
 * |sin πν| ≤ 1 gives ≤ 1/(π·ν·(ν² − 1)) for ν > 1 cells of 1/T from the line (−32 dB at 2.5 cells, −64 dB at 8;
 * domain.md check value 20). Inside the main lobe (ν ≤ 2) the line itself: Infinity.
 */
export function leakageBound(line: OtherLine, hz: number, resolutionHz: number): number {
  const nu = (Math.abs(hz - line.hz) - line.wanderHz) / resolutionHz;
  if (nu <= 2) return Infinity;
  return line.amp / (Math.PI * nu * (nu * nu - 1));
}

/** A bearing line must stand this far above any other line's leakage bound where it is found (dB). */
export const LEAKAGE_MARGIN_DB = 10;
/** …and this far above the spectrum at its mirror image about a nearby other line (dB). */
export const MIRROR_MARGIN_DB = 6;
/** Other lines within this many resolution cells (plus three times their wander) get the mirror test. */
const MIRROR_CELLS = 40;

/** Largest amplitude within ±1 resolution cell of hz. */
function maxNear(spec: LineSpectrum, hz: number): number {
  const k0 = Math.max(0, Math.ceil((hz - 1 / spec.seconds - spec.hz0) / spec.df));
  const k1 = Math.min(spec.amp.length - 1, Math.floor((hz + 1 / spec.seconds - spec.hz0) / spec.df));
  let m = 0;
  for (let k = k0; k <= k1; k++) m = Math.max(m, spec.amp[k]);
  return m;
}

/**
 * True when a peak near another line may be that line's own skirt: below its Hann leakage bound + 10 dB, or not
 * 6 dB above the spectrum at the mirror image about that line. Leakage and the smear of a wandering line (frequency
 * modulation) are both nearly symmetric about the line; a bearing line beside it is not mirrored.
 */
export function skirtOfOtherLine(spec: LineSpectrum, p: { hz: number; amp: number }, others: OtherLine[]): boolean {
  const res = 1 / spec.seconds;
  const leak = 10 ** (LEAKAGE_MARGIN_DB / 20);
  const mirror = 10 ** (MIRROR_MARGIN_DB / 20);
  return others.some((l) => {
    if (p.amp < leakageBound(l, p.hz, res) * leak) return true;
    if (Math.abs(p.hz - l.hz) > MIRROR_CELLS * res + 3 * l.wanderHz) return false;
    return p.amp < maxNear(spec, 2 * l.hz - p.hz) * mirror;
  });
}

/**
 * The bearing peak in a band, or null. It counts as found when it is a true local maximum standing out of its floor
 * by more than chance allows (requiredProminenceDb) and is no other line's skirt (outside every other line's main
 * lobe, above its leakage and its mirror image), so neither a running-speed harmonic nor its side lobes or smear
 * are taken for a bearing line, while a real bearing line a few cells beside one is still found. A rejected peak is
 * skipped and the band searched again.
 */
export function bearingPeak(spec: LineSpectrum, band: [number, number], others: OtherLine[]): Peak | null {
  const res = 1 / spec.seconds;
  const exclude: Array<[number, number]> = others.map((l) => [l.hz - 2 * res - l.wanderHz, l.hz + 2 * res + l.wanderHz]);
  for (let attempt = 0; attempt < 4; attempt++) {
    const p = findPeak(spec, band[0], band[1], { exclude });
    if (!p || !p.isLocalMax || p.prominenceDb < requiredProminenceDb(p.searchCells)) return null;
    if (!skirtOfOtherLine(spec, p, others)) return p;
    exclude.push([p.hz - 2 * res, p.hz + 2 * res]);
  }
  return null;
}

/** Highest frequency any searched band reaches, Hz (before the sample-rate limit). */
export function bearingSearchTopHz(bearings: BearingGeometry[], shaftHz: number): number {
  let top = 0;
  for (const g of bearings) {
    const f = defectFrequencies(g, shaftHz);
    for (const d of BEARING_DEFECTS) top = Math.max(top, BEARING_HARMONICS * f[d] * (1 + BEARING_TOLERANCE.highPct / 100));
  }
  return top;
}

export interface BearingChannel {
  name: string;
  unit: string;
  data: ArrayLike<number>;
  /** The channel's fine low-band spectrum (vibration.ts), reused when it reaches high enough. */
  lowSpectrum: LineSpectrum;
  /** Pass band edge of lowSpectrum, Hz: lines above it are attenuated by the decimation filter. */
  lowPassHz: number;
}

/**
 * Spectrum of a channel reaching `topHz` plus room for the floor around the top band: the low-band spectrum when it
 * reaches that high, else the same decimate-and-transform at a higher pass band (capped at fs/2.5).
 */
export function bearingSpectrum(ch: BearingChannel, fs: number, topHz: number): { spectrum: LineSpectrum; passHz: number } {
  const need = topHz * 1.06 + 1;
  if (need <= ch.lowPassHz) return { spectrum: ch.lowSpectrum, passHz: ch.lowPassHz };
  const passHz = Math.min(need, fs / 2.5);
  const dec = decimateReal(ch.data, fs, passHz);
  return { spectrum: realSpectrum(dec.data, dec.sampleRate), passHz };
}

const round = (v: number, d: number) => Math.round(v * 10 ** d) / 10 ** d;
const sig = (v: number) => Number(v.toPrecision(4));

interface PlannedLine {
  bearing: number;
  defect: BearingDefect;
  harmonic: number;
  label: string;
  expectedHz: number;
}

export function bearingLabel(defect: BearingDefect, harmonic: number, position: string): string {
  return `${harmonic > 1 ? `${harmonic}×` : ""}${defect} ${position}`;
}

/**
 * Search every bearing's defect lines on every vibration channel. Per line the result keeps the channel where the
 * peak stands out most; the markers are per channel (what that channel shows): the fundamental of each defect (and
 * 2×BSF) at the found peak or, when not found there, at the expected frequency with level 0, plus every found
 * harmonic. Levels of markers are mm/s r.m.s., as for the other vibration markers.
 */
export function assessBearings(bearings: BearingGeometry[], ctx: BearingContext | null, channels: BearingChannel[], fs: number): { result: BearingsResult; markers: Marker[] } {
  const tolerance = { ...BEARING_TOLERANCE };
  const shaftHz = ctx?.shaftHz ?? null;
  const base = (expected: boolean): BearingResult[] =>
    bearings.map((g) => {
      const orders = defectOrders(g);
      return {
        position: g.position,
        designation: g.designation ?? null,
        defects: BEARING_DEFECTS.map((d) => ({
          defect: d,
          orderOfShaft: round(orders[d], 5),
          expectedHz: expected && shaftHz ? round(orders[d] * shaftHz, 4) : null,
          lines: [],
          found: false,
        })),
      };
    });
  const rpm = shaftHz ? round(shaftHz * 60, 2) : null;
  const shaft = shaftHz ? round(shaftHz, 4) : null;
  if (!ctx || !shaftHz) {
    return { result: { shaftHz: null, rpm: null, tolerance, channels: channels.map((c) => c.name), bearings: base(false), note: "Speed not found: the defect frequencies need the measured shaft speed." }, markers: [] };
  }
  if (!channels.length) {
    return { result: { shaftHz: shaft, rpm, tolerance, channels: [], bearings: base(true), note: "No vibration channel in this capture: the defect frequencies are given, nothing was searched." }, markers: [] };
  }

  const planned: PlannedLine[] = [];
  bearings.forEach((g, bi) => {
    const f = defectFrequencies(g, shaftHz);
    for (const d of BEARING_DEFECTS)
      for (let h = 1; h <= BEARING_HARMONICS; h++) planned.push({ bearing: bi, defect: d, harmonic: h, label: bearingLabel(d, h, g.position), expectedHz: h * f[d] });
  });
  const topHz = bearingSearchTopHz(bearings, shaftHz);
  const markers: Marker[] = [];
  // best outcome per planned line over the channels
  const best: Array<{ peak: Peak; channel: BearingChannel } | null> = planned.map(() => null);
  const bands: Array<[number, number]> = planned.map(() => [0, 0]);
  const above: boolean[] = planned.map(() => true);
  const notes: Array<string | null> = planned.map(() => null);
  for (const ch of channels) {
    const { spectrum, passHz } = bearingSpectrum(ch, fs, topHz);
    const res = 1 / spectrum.seconds;
    const others = otherLines(spectrum, ctx, Math.min(passHz, topHz * 1.06));
    const own: Array<Peak | null> = planned.map((line, i) => {
      const band = bearingSearchBand(line.expectedHz, res);
      bands[i] = band;
      // the band and its floor on either side must lie within the spectrum's pass band
      if (band[1] + (band[1] - band[0]) > passHz) return null;
      above[i] = false;
      return bearingPeak(spectrum, band, others);
    });
    // Bands of different lines can overlap: one peak is one line, kept by its best explanation.
    for (const [i, taker] of sharedPeaks(planned, own)) {
      notes[i] = `The peak at ${round(own[i]!.hz, 2)} Hz in this band is taken as ${planned[taker].label}.`;
      own[i] = null;
    }
    planned.forEach((line, i) => {
      const p = own[i];
      if (p && (!best[i] || p.prominenceDb > best[i]!.peak.prominenceDb)) best[i] = { peak: p, channel: ch };
      if (above[i]) return;
      const always = line.harmonic === 1 || (line.defect === "BSF" && line.harmonic === 2);
      if (!p && !always) return;
      markers.push({
        name: line.label,
        family: "bearing",
        hz: round(p ? p.hz : line.expectedHz, 4),
        level: p ? round(lineVelocityMmS(p.amp, p.hz, ch.unit), 3) : 0,
        channel: ch.name,
      });
    });
  }

  const out = base(true);
  planned.forEach((line, i) => {
    const b = best[i];
    const entry: BearingLine = {
      harmonic: line.harmonic,
      label: line.label,
      expectedHz: round(line.expectedHz, 4),
      searchHz: [round(bands[i][0], 4), round(bands[i][1], 4)],
      status: b ? "found" : above[i] ? "above band" : "not found",
      foundHz: b ? round(b.peak.hz, 4) : null,
      level: b ? sig(b.peak.amp / Math.SQRT2) : null,
      unit: b ? b.channel.unit : null,
      velocityMmS: b ? round(lineVelocityMmS(b.peak.amp, b.peak.hz, b.channel.unit), 3) : null,
      dbOverFloor: b ? round(b.peak.prominenceDb, 1) : null,
      channel: b ? b.channel.name : null,
      ...(!b && notes[i] ? { note: notes[i]! } : {}),
    };
    const defect = out[line.bearing].defects.find((d) => d.defect === line.defect) as BearingDefectResult;
    defect.lines.push(entry);
    if (b) defect.found = true;
  });
  return { result: { shaftHz: shaft, rpm, tolerance, channels: channels.map((c) => c.name), bearings: out, note: null }, markers };
}

/**
 * Lines whose bands found the same peak (same bin): the line that explains it best keeps it: the lowest harmonic,
 * then the one whose expected frequency, 1.5 % low, lies nearest. Returns [line that loses it, line that keeps it].
 */
export function sharedPeaks(planned: ReadonlyArray<{ harmonic: number; expectedHz: number }>, peaks: ReadonlyArray<Peak | null>): Array<[number, number]> {
  const byBin = new Map<number, number[]>();
  peaks.forEach((p, i) => {
    if (p) byBin.set(p.bin, [...(byBin.get(p.bin) ?? []), i]);
  });
  const out: Array<[number, number]> = [];
  for (const group of byBin.values()) {
    if (group.length < 2) continue;
    const miss = (i: number) => Math.abs(peaks[i]!.hz / (planned[i].expectedHz * 0.985) - 1);
    const keeper = group.reduce((a, b) => (planned[b].harmonic < planned[a].harmonic || (planned[b].harmonic === planned[a].harmonic && miss(b) < miss(a)) ? b : a));
    for (const i of group) if (i !== keeper) out.push([i, keeper]);
  }
  return out;
}
