import { queryOptions } from "@tanstack/react-query";
import { apiGet, apiUpload } from "../../../lib/api.ts";
import type { CaptureDetail, CaptureStatus } from "../../../lib/contracts.ts";
import { uploadKeys } from "./keys.ts";
import { isFinalStatus } from "../upload-logic.ts";

export interface UploadTarget {
  assetId: number;
  measurementPointId?: number;
  takenAt?: string;
  notes?: string;
  sampleRate?: number;
}

export type UploadAnswer = { captures: { id: number; status: CaptureStatus; fileName: string }[] };

/** One file per request, so each file has its own progress bar and its own rejection message. */
export function uploadCapture(file: File, target: UploadTarget, onProgress: (fraction: number) => void, signal?: AbortSignal) {
  const form = new FormData();
  form.append("assetId", String(target.assetId));
  if (target.measurementPointId) form.append("measurementPointId", String(target.measurementPointId));
  if (target.takenAt) form.append("takenAt", target.takenAt);
  if (target.notes) form.append("notes", target.notes);
  if (target.sampleRate) form.append("sampleRate", String(target.sampleRate));
  form.append("file", file, file.name);
  return apiUpload<UploadAnswer>("/captures", form, { onProgress: (l, t) => onProgress(t > 0 ? l / t : 0), signal });
}

/** A capture's state; polled slowly as a fallback while it is not final (socket events refresh it at once). */
export const captureQueryOptions = (id: number) =>
  queryOptions({
    queryKey: uploadKeys.capture(id),
    queryFn: ({ signal }) => apiGet<CaptureDetail>(`/captures/${id}`, undefined, signal),
    refetchInterval: (q) => (q.state.data && isFinalStatus(q.state.data.status) ? false : 5000),
  });
