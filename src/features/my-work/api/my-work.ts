import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { api, apiGet, apiUpload, type Paged } from "../../../lib/api.ts";
import type { Capture, Inspection, InspectionStatus } from "../../../lib/contracts.ts";
import { rootKeys } from "../../../lib/query.ts";

export const myWorkKeys = {
  inspections: (status: string) => [...rootKeys.inspections, "list", { mine: 1, status }] as const,
  /** The same key as Plan's detail query: one cache entry per inspection. */
  inspection: (id: number) => [...rootKeys.inspections, "detail", id] as const,
  captures: () => [...rootKeys.captures, "list", { mine: 1, pageSize: 10, sort: "-createdAt" }] as const,
};

export const myInspectionsQueryOptions = (status: "open" | "done") =>
  queryOptions({
    queryKey: myWorkKeys.inspections(status),
    queryFn: async ({ signal }) => {
      const r = await apiGet<Paged<Inspection>>("/inspections", { mine: 1, pageSize: 100, sort: status === "open" ? "dueDate" : "-updatedAt", status: status === "done" ? "done" : "planned,in_progress" }, signal);
      return status === "open" ? r.items.filter((i) => i.status === "planned" || i.status === "in_progress") : r.items.slice(0, 10);
    },
  });

/** One inspection by id (a link from mail or a calendar entry): also one no longer on the list, to say what became of it. */
export const myInspectionQueryOptions = (id: number) =>
  queryOptions({
    queryKey: myWorkKeys.inspection(id),
    queryFn: ({ signal }) => apiGet<Inspection>(`/inspections/${id}`, undefined, signal),
  });

export const myCapturesQueryOptions = () =>
  queryOptions({
    queryKey: myWorkKeys.captures(),
    queryFn: ({ signal }) => apiGet<Paged<Capture>>("/captures", { mine: 1, pageSize: 10, sort: "-createdAt" }, signal),
  });

export function useMoveInspection() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...body }: { id: number; status: InspectionStatus; outcome?: string; completionNote?: string }) =>
      api<Inspection>(`/inspections/${id}`, { method: "PATCH", body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: rootKeys.inspections }),
  });
}

/** A photo or a capture file attached to an inspection. */
export function uploadAttachment(id: number, file: File, onProgress?: (f: number) => void) {
  const form = new FormData();
  form.append("file", file, file.name);
  return apiUpload(`/inspections/${id}/attachments`, form, { onProgress: (l, t) => onProgress?.(t ? l / t : 0) });
}
