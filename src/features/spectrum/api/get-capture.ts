import { queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet } from "../../../lib/api.ts";
import type { Capture } from "../../../lib/contracts.ts";
import type { AnalysisResult } from "../../../engine/types.ts";
import { captureKeys } from "./keys.ts";

export type CaptureAnalysis = AnalysisResult & { id: number; version: number; engineVersion: string };
export type CaptureDetail = Omit<Capture, "analysis"> & { analysis: CaptureAnalysis | null };

export const captureQueryOptions = (id: number) =>
  queryOptions({
    queryKey: captureKeys.detail(id),
    queryFn: ({ signal }) => apiGet<CaptureDetail>(`/captures/${id}`, undefined, signal),
    enabled: Number.isFinite(id),
  });

export const useCapture = (id: number) => useQuery(captureQueryOptions(id));
