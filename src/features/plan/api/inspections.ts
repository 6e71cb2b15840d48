import { keepPreviousData, queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { api, apiGet, type Paged, type QueryParams } from "../../../lib/api.ts";
import type { Asset, Finding, Inspection, InspectionCandidate, Person } from "../../../lib/contracts.ts";
import { rootKeys } from "../../../lib/query.ts";
import type { ScheduleInput } from "../../../lib/inspections.ts";
import { planKeys } from "./keys.ts";

export const inspectionsQueryOptions = (filters: QueryParams) =>
  queryOptions({
    queryKey: planKeys.inspectionList(filters),
    queryFn: ({ signal }) => apiGet<Paged<Inspection>>("/inspections", filters, signal),
    placeholderData: keepPreviousData,
  });

export const inspectionDetailQueryOptions = (id: number) =>
  queryOptions({
    queryKey: [...rootKeys.inspections, "detail", id] as const,
    queryFn: ({ signal }) => apiGet<Inspection>(`/inspections/${id}`, undefined, signal),
  });

/** Findings that need action and have no open inspection yet (open, confirmed or to re-measure), most urgent first. */
export const candidatesQueryOptions = () =>
  queryOptions({
    queryKey: planKeys.candidates(),
    queryFn: ({ signal }) => apiGet<{ items: InspectionCandidate[] }>("/inspections/candidates", undefined, signal).then((r) => r.items),
  });

export const techniciansQueryOptions = () =>
  queryOptions({
    queryKey: planKeys.technicians(),
    queryFn: ({ signal }) => apiGet<{ items: Person[] }>("/people", { role: "technician" }, signal).then((r) => r.items),
    staleTime: 5 * 60_000,
  });

export const motorPickerQueryOptions = (q: string, enabled = true) =>
  queryOptions({
    enabled,
    queryKey: planKeys.motorsForPicker(q),
    queryFn: ({ signal }): Promise<Asset[]> => apiGet<Paged<Asset>>("/assets", { q, pageSize: 50, sort: "tag" }, signal).then((r) => r.items),
  });

export function useScheduleInspection() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: ScheduleInput) => api<Inspection>("/inspections", { method: "POST", body }),
    onSuccess: () => Promise.all([qc.invalidateQueries({ queryKey: rootKeys.inspections }), qc.invalidateQueries({ queryKey: rootKeys.findings })]),
  });
}

export type InspectionPatch = Partial<Pick<Inspection, "dueDate" | "assigneeId" | "priority" | "instructions" | "status">> & { note?: string };

export function useUpdateInspection() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...body }: InspectionPatch & { id: number }) => api<Inspection>(`/inspections/${id}`, { method: "PATCH", body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: rootKeys.inspections }),
  });
}
