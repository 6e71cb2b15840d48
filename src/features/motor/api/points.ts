// Measurement points of a motor (admins): POST /assets/:id/points, PATCH /points/:id, DELETE /points/:id. The points
// come with the motor's detail (and the upload form's motor), so each change refreshes that one key.
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { apiDelete, apiPatch, apiPost } from "../../../lib/api.ts";
import type { MeasurementPoint } from "../../../lib/contracts.ts";
import type { PointBody } from "../../../shared/schemas/points.ts";
import { motorKeys } from "./keys.ts";

function usePointMutation<A>(assetId: number, fn: (a: A) => Promise<unknown>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => qc.invalidateQueries({ queryKey: motorKeys.detail(assetId), exact: true }) });
}

export const useCreatePoint = (assetId: number) => usePointMutation(assetId, (body: PointBody) => apiPost<MeasurementPoint>(`/assets/${assetId}/points`, body));

export const useUpdatePoint = (assetId: number) =>
  usePointMutation(assetId, ({ id, body }: { id: number; body: PointBody }) => apiPatch<MeasurementPoint>(`/points/${id}`, body));

export const useDeletePoint = (assetId: number) => usePointMutation(assetId, (id: number) => apiDelete(`/points/${id}`));
