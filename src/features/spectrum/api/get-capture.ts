import { queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet } from "../../../lib/api.ts";
import type { CaptureDetail } from "../../../lib/contracts.ts";
import { captureKeys } from "./keys.ts";

export type { CaptureAnalysis, CaptureDetail } from "../../../lib/contracts.ts";

export const captureQueryOptions = (id: number) =>
  queryOptions({
    queryKey: captureKeys.detail(id),
    queryFn: ({ signal }) => apiGet<CaptureDetail>(`/captures/${id}`, undefined, signal),
    enabled: Number.isFinite(id),
  });

export const useCapture = (id: number) => useQuery(captureQueryOptions(id));
