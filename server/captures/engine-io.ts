// Small adapters between the engine's objects and what the database and the API store.
import type { AnalysisResult, BearingGeometry, Capture, Nameplate } from "../../src/engine/types.ts";
import type { CaptureMeta } from "./ingest.ts";

/** One channel's full-range display spectrum, encoded for the blob store (server/captures/spectrum-store.ts). */
export interface EncodedSpectrum {
  channel: string;
  bytes: Uint8Array;
}

export type AnalysisTaskOutput =
  | { engineVersion: string; meta: Required<CaptureMeta>; result: AnalysisResult; spectra?: EncodedSpectrum[]; parseError?: undefined }
  | { parseError: { code: string; message: string } };

/** Sample rate, duration and channel list of a parsed capture, for the captures row. */
export function summariseCapture(capture: Capture): Required<CaptureMeta> {
  const n = capture.channels[0]?.data.length ?? 0;
  return {
    sampleRate: capture.sampleRate,
    durationS: capture.sampleRate > 0 ? n / capture.sampleRate : 0,
    channels: capture.channels.map((c) => ({ name: c.name, kind: c.kind, unit: c.unit, position: c.position ?? null })),
  };
}

/** Typed arrays → plain arrays, non-finite numbers → null, so the result stores as JSON exactly as it reads. */
export function toPlainJson(value: unknown): unknown {
  return JSON.parse(
    JSON.stringify(value, (_k, v) => {
      if (ArrayBuffer.isView(v) && !(v instanceof DataView)) return Array.from(v as unknown as ArrayLike<number>);
      if (typeof v === "number" && !Number.isFinite(v)) return null;
      return v;
    }),
  );
}

/** The bearings of an assets row that have the geometry the defect frequencies need (Nb, d and D). */
export function bearingsOf(asset: Record<string, any>): BearingGeometry[] {
  const out: BearingGeometry[] = [];
  for (const end of ["de", "nde"] as const) {
    const nb = asset[`bearing_${end}_elements`];
    const d = asset[`bearing_${end}_element_mm`];
    const D = asset[`bearing_${end}_pitch_mm`];
    if (nb === null || nb === undefined || d === null || d === undefined || D === null || D === undefined) continue;
    const designation = asset[`bearing_${end}_designation`];
    out.push({
      position: end === "de" ? "DE" : "NDE",
      ...(designation ? { designation: String(designation) } : {}),
      rollingElements: Number(nb),
      elementDiameterMm: Number(d),
      pitchDiameterMm: Number(D),
      contactAngleDeg: Number(asset[`bearing_${end}_contact_deg`] ?? 0),
    });
  }
  return out;
}

/** The engine's nameplate from an assets row (with its bearings, when any has its geometry). */
export function nameplateOf(asset: Record<string, any>): Nameplate {
  const opt = (v: unknown) => (v === null || v === undefined ? undefined : Number(v));
  const bearings = bearingsOf(asset);
  return {
    poles: Number(asset.poles),
    ratedRpm: Number(asset.rated_rpm),
    ratedHz: opt(asset.rated_hz),
    ratedKw: opt(asset.rated_kw),
    ratedVoltage: opt(asset.rated_voltage),
    ratedCurrent: opt(asset.rated_current),
    rotorBars: opt(asset.rotor_bars),
    statorSlots: opt(asset.stator_slots),
    machineGroup: asset.machine_group === 1 ? 1 : 2,
    support: asset.support === "flexible" ? "flexible" : "rigid",
    driveFed: !!asset.drive_fed,
    ...(bearings.length ? { bearings } : {}),
  };
}
