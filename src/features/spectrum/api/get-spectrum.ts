import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet } from "../../../lib/api.ts";
import { captureKeys, type SpectrumParams } from "./keys.ts";

export interface SpectrumResponse {
  channel: string;
  unit: string;
  fMin: number;
  fMax: number;
  /** Frequency resolution 1/T. */
  resolutionHz: number;
  /** Bin spacing of the full-resolution spectrum (finer than resolutionHz when the transform was zero-padded). */
  binHz: number;
  /** Velocity integrated from acceleration: below this frequency nothing is shown (0). */
  lowCutHz: number | null;
  decimated: boolean;
  /** Width of a bucket when decimated, else null. */
  bucketHz: number | null;
  /** Each point's frequency: a bin's, that of its bucket's max when decimated. */
  hz: number[];
  /** Where each bucket's min is (a bin's frequency) when decimated, else null (min = max, at hz). */
  minHz: number[] | null;
  min: number[];
  max: number[];
}

/** Spectra never change once computed: cache for good and skip structural sharing of the big arrays. */
export const spectrumQueryOptions = (captureId: number, p: SpectrumParams) =>
  queryOptions({
    queryKey: captureKeys.spectrum(captureId, p),
    queryFn: ({ signal }) => apiGet<SpectrumResponse>(`/captures/${captureId}/spectrum`, { ...p }, signal),
    staleTime: Infinity,
    structuralSharing: false,
    placeholderData: keepPreviousData,
  });

export const useSpectrum = (captureId: number | null, p: SpectrumParams | null) =>
  useQuery({ ...spectrumQueryOptions(captureId ?? NaN, p ?? { channel: "", kind: "current", buckets: 0 }), enabled: captureId !== null && p !== null && !!p.channel });
