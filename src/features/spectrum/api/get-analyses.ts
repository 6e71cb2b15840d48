import { queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet } from "../../../lib/api.ts";
import type { AnalysisVersion, CaptureAnalysisVersion } from "../../../lib/contracts.ts";
import { captureKeys } from "./keys.ts";

export type { AnalysisVersion, CaptureAnalysisVersion } from "../../../lib/contracts.ts";

/** Every analysis of the capture, newest version first, with its readings (no full results). */
export const analysisVersionsQueryOptions = (captureId: number) =>
  queryOptions({
    queryKey: captureKeys.analyses(captureId),
    queryFn: ({ signal }) => apiGet<{ items: AnalysisVersion[] }>(`/captures/${captureId}/analyses`, undefined, signal),
  });

/** Only asked for when the capture has more than one version (`enabled`): one version needs no panel. */
export const useAnalysisVersions = (captureId: number, enabled = true) =>
  useQuery({ ...analysisVersionsQueryOptions(captureId), enabled: enabled && Number.isFinite(captureId) });

/** One stored result in full (the shape of the capture detail's `analysis`). */
export const analysisVersionQueryOptions = (captureId: number, analysisId: number) =>
  queryOptions({
    queryKey: captureKeys.analysis(captureId, analysisId),
    queryFn: ({ signal }) => apiGet<CaptureAnalysisVersion>(`/captures/${captureId}/analyses/${analysisId}`, undefined, signal),
  });

export const useAnalysisVersion = (captureId: number, analysisId: number | null, enabled = true) =>
  useQuery({ ...analysisVersionQueryOptions(captureId, analysisId ?? NaN), enabled: enabled && analysisId !== null });
