// Supply (electrical fundamental) frequency from the current spectrum: the dominant line between 5 and 120 Hz
// (drive-fed motors are not at 50/60 Hz), refined by Hann-kernel interpolation on the full-length low band, plus
// sub-block estimates to judge whether the supply stayed steady during the capture.
import { realSpectrum, findPeak, type LineSpectrum } from "./spectrum.ts";
import { realFftScratch, nextPow2 } from "./fft.ts";
import { hann } from "./windows.ts";
import { decimateReal, type Decimated } from "./zoom.ts";

export const SUPPLY_MIN_HZ = 5;
export const SUPPLY_MAX_HZ = 120;

/** Coarse fundamental from one ~1–3 s block at the full rate (cheap; only to size the low band). */
export function coarseSupplyHz(x: ArrayLike<number>, fs: number): number | null {
  const want = Math.min(x.length, Math.max(256, Math.round(fs * 2)));
  let len = 1;
  while (len * 2 <= want) len *= 2;
  const start = Math.max(0, Math.floor((x.length - len) / 2));
  const seg = new Float64Array(len);
  let mu = 0;
  for (let i = 0; i < len; i++) mu += x[start + i];
  mu /= len;
  for (let i = 0; i < len; i++) seg[i] = x[start + i] - mu;
  const spec = realSpectrum(seg, fs);
  const p = findPeak(spec, SUPPLY_MIN_HZ, Math.min(SUPPLY_MAX_HZ, fs / 2.2));
  return p && p.isLocalMax ? p.hz : null;
}

export interface LowBand {
  dec: Decimated;
  spectrum: LineSpectrum;
}

/** Band kept around the supply: f ± fr (≤ 2f), the 3rd…7th harmonics when the rate allows. */
export function lowBandPassHz(fs: number, coarseHz: number): number {
  return Math.min(fs / 2.5, Math.max(2.3 * coarseHz + 20, 7.4 * coarseHz));
}

export function lowBand(x: ArrayLike<number>, fs: number, passHz: number): LowBand {
  const dec = decimateReal(x, fs, passHz);
  return { dec, spectrum: realSpectrum(dec.data, dec.sampleRate) };
}

export interface SupplyEstimate {
  /** Mean supply frequency over the capture (phase-tracked). */
  hz: number;
  /** Interpolated spectral peak of the whole capture. */
  peakHz: number;
  /** Peak amplitude of the fundamental (signal units). */
  amplitude: number;
  prominenceDb: number;
  /** Sub-block estimates (Hz) and their spread (max − min). */
  blocks: number[];
  spreadHz: number;
  blockSeconds: number;
}

/** Fine supply estimate on the low band, searched within ±searchHz of a coarse value. */
export function estimateSupply(band: LowBand, coarseHz: number, searchHz = 1.5): SupplyEstimate | null {
  const spec = band.spectrum;
  const p = findPeak(spec, Math.max(SUPPLY_MIN_HZ, coarseHz - searchHz), Math.min(SUPPLY_MAX_HZ, coarseHz + searchHz));
  if (!p || !p.isLocalMax) return null;
  const { blocks, blockSeconds } = subBlockEstimates(band.dec, p.hz);
  const spread = blocks.length ? Math.max(...blocks) - Math.min(...blocks) : 0;
  // The interpolated peak is the mean frequency of a steady line; when the supply wanders during the capture the
  // peak leans toward where it dwelt longest, so the reported value is the phase-tracked mean instead.
  const tracked = phaseTrackedHz(band.dec, p.hz);
  const hz = tracked !== null && Math.abs(tracked - p.hz) < 2 / spec.seconds ? tracked : p.hz;
  return { hz, peakHz: p.hz, amplitude: p.amp, prominenceDb: p.prominenceDb, blocks, spreadHz: spread, blockSeconds };
}

/**
 * Mean frequency from the phase of the line in short overlapping Hann blocks (≥ 0.5 s and ≥ 4 cycles, hop ½):
 * unwrap the block phases relative to f0 and take (φ_last − φ_first)/(2π·Δt) — the average of the instantaneous
 * frequency between the first and last block centres.
 */
export function phaseTrackedHz(dec: Decimated, f0: number): number | null {
  const fs = dec.sampleRate;
  const x = dec.data;
  const len = Math.round(Math.max(0.5, 4 / f0) * fs);
  const hop = Math.max(1, Math.floor(len / 2));
  if (x.length < len + hop) return null;
  const w = hann(len);
  const omega = (2 * Math.PI * f0) / fs;
  const kc = new Float64Array(len);
  const ks = new Float64Array(len);
  for (let n = 0; n < len; n++) {
    kc[n] = w[n] * Math.cos(omega * n);
    ks[n] = w[n] * Math.sin(omega * n);
  }
  let prev = 0;
  let unwrapped = 0;
  let first = 0;
  let firstT = 0;
  let lastT = 0;
  let count = 0;
  for (let start = 0; start + len <= x.length; start += hop) {
    let re = 0;
    let im = 0;
    for (let n = 0; n < len; n++) {
      const v = x[start + n];
      re += v * kc[n];
      im -= v * ks[n];
    }
    // phase of the block relative to the f0 reference at absolute sample `start`
    const ph = Math.atan2(im, re) - ((omega * start) % (2 * Math.PI));
    if (count === 0) {
      unwrapped = ph;
      first = ph;
      firstT = start / fs;
    } else {
      let d = ph - prev;
      d -= 2 * Math.PI * Math.round(d / (2 * Math.PI));
      unwrapped += d;
    }
    prev = ph;
    lastT = start / fs;
    count++;
  }
  if (count < 2 || lastT <= firstT) return null;
  return f0 + (unwrapped - first) / (2 * Math.PI * (lastT - firstT));
}

/** 4–8 blocks of ≥ 1 s each; each block's peak near the global estimate, Hann-interpolated. */
function subBlockEstimates(dec: Decimated, hz: number): { blocks: number[]; blockSeconds: number } {
  const fs = dec.sampleRate;
  const total = dec.data.length / fs;
  const count = Math.max(0, Math.min(8, Math.floor(total / 1.0)));
  if (count < 2) return { blocks: [], blockSeconds: total };
  const len = Math.floor(dec.data.length / count);
  const w = hann(len);
  const size = nextPow2(len);
  const out: number[] = [];
  for (let b = 0; b < count; b++) {
    const seg = dec.data.subarray(b * len, (b + 1) * len);
    const X = realFftScratch(seg, size, w);
    const nb = size / 2 + 1;
    const amp = new Float64Array(nb);
    for (let k = 0; k < nb; k++) amp[k] = Math.hypot(X[2 * k], X[2 * k + 1]);
    const spec: LineSpectrum = { hz0: 0, df: fs / size, amp, rho: size / len, window: "hann", seconds: len / fs, enbw: 1.5, averages: 1 };
    const p = findPeak(spec, hz - 2 / spec.seconds, hz + 2 / spec.seconds);
    if (p && p.isLocalMax) out.push(p.hz);
  }
  return { blocks: out, blockSeconds: len / fs };
}

/**
 * Subtract the fitted supply tone (least squares at the estimated frequency, via the Hann-windowed DTFT) so that
 * its leakage skirt does not mask sidebands a few bins away. Returns a new array.
 */
export function subtractTone(data: Float64Array, fs: number, hz: number): Float64Array {
  const n = data.length;
  const w = hann(n);
  const step = (2 * Math.PI * hz) / fs;
  // cos/sin of each sample's phase once, for the fit and the subtraction (the same values both times)
  const c = new Float64Array(n);
  const sn = new Float64Array(n);
  let re = 0;
  let im = 0;
  let wsum = 0;
  for (let i = 0; i < n; i++) {
    const ph = step * i;
    const ci = Math.cos(ph);
    const si = Math.sin(ph);
    c[i] = ci;
    sn[i] = si;
    const v = data[i] * w[i];
    re += v * ci;
    im -= v * si;
    wsum += w[i];
  }
  // X ≈ (A/2)e^{jφ}Σw  →  A e^{jφ} = 2X/Σw
  const ar = (2 * re) / wsum;
  const ai = (2 * im) / wsum;
  const out = c; // overwritten in place: out[i] needs only c[i] and sn[i]
  for (let i = 0; i < n; i++) out[i] = data[i] - (ar * c[i] - ai * sn[i]);
  return out;
}
