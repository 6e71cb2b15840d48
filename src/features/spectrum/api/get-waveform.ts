import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet } from "../../../lib/api.ts";
import { captureKeys, type WaveformParams } from "./keys.ts";

export interface WaveformResponse {
  channel: string;
  unit: string;
  sampleRate: number;
  /** True when each point is the min/max of a bucket of samples, false when every sample is returned. */
  decimated: boolean;
  t: number[];
  min: number[];
  max: number[];
}

export const waveformQueryOptions = (captureId: number, p: WaveformParams) =>
  queryOptions({
    queryKey: captureKeys.waveform(captureId, p),
    queryFn: ({ signal }) => apiGet<WaveformResponse>(`/captures/${captureId}/waveform`, { ...p }, signal),
    staleTime: Infinity,
    structuralSharing: false,
    placeholderData: keepPreviousData,
  });

export const useWaveform = (captureId: number, p: WaveformParams | null) =>
  useQuery({ ...waveformQueryOptions(captureId, p ?? { channel: "", buckets: 0 }), enabled: p !== null && !!p.channel });
