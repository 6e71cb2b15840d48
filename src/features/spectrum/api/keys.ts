// Query keys of the capture review screen. Details, lists and findings live under the captures/findings roots, so
// a `capture:status` or `finding:new` event (lib/socket.ts) refreshes them by prefix. Spectra and waveforms are
// views of the stored recording, which never changes: they sit under their own root that no live event touches,
// so a status change of some other capture does not refetch megabytes of spectrum.
import { rootKeys } from "../../../lib/query.ts";

export interface SpectrumParams {
  channel: string;
  kind: "current" | "vibration";
  fmin?: number;
  fmax?: number;
  buckets: number;
}

export interface WaveformParams {
  channel: string;
  from?: number;
  to?: number;
  buckets: number;
}

export const captureKeys = {
  all: rootKeys.captures,
  lists: () => [...rootKeys.captures, "list"] as const,
  list: (filters: Record<string, unknown>) => [...rootKeys.captures, "list", filters] as const,
  details: () => [...rootKeys.captures, "detail"] as const,
  detail: (id: number) => [...rootKeys.captures, "detail", id] as const,
  /** A capture's analysis versions: under its detail key, so whatever refreshes the capture refreshes them. */
  analyses: (id: number) => [...rootKeys.captures, "detail", id, "analyses"] as const,
  analysis: (id: number, analysisId: number) => [...rootKeys.captures, "detail", id, "analyses", analysisId] as const,
  signals: ["capture-signals"] as const,
  spectrum: (id: number, p: SpectrumParams) => ["capture-signals", id, "spectrum", p] as const,
  waveform: (id: number, p: WaveformParams) => ["capture-signals", id, "waveform", p] as const,
  findings: (assetId: number) => [...rootKeys.findings, "list", { assetId }] as const,
};
