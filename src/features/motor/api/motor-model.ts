// Save measured circuit values on a motor (PUT /assets/:id/motor-model, admins) or go back to the nameplate estimate
// (DELETE). With `reanalyse` the motor's stored captures are queued again (…?reanalyse=1) and the answer says how many.
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api.ts";
import { rootKeys } from "../../../lib/query.ts";
import { assetMotorModelBody, type AssetMotorModelBody } from "../../../shared/schemas/motor-model.ts";
import type { MotorModelResponse } from "./get-motor.ts";
import { motorKeys } from "./keys.ts";

const query = (reanalyse: boolean) => (reanalyse ? "?reanalyse=1" : "");

/** The model, the motor (its latest reading), and re-queued captures in the history and review. */
const refresh = (qc: ReturnType<typeof useQueryClient>, assetId: number) =>
  Promise.all([motorKeys.model(assetId), rootKeys.assets, rootKeys.captures, rootKeys.review].map((k) => qc.invalidateQueries({ queryKey: k })));

export function useSaveMotorModel(assetId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ body, reanalyse }: { body: AssetMotorModelBody; reanalyse: boolean }) =>
      api<MotorModelResponse & { queued?: number }>(`/assets/${assetId}/motor-model${query(reanalyse)}`, { method: "PUT", body: assetMotorModelBody.parse(body) }),
    onSuccess: () => refresh(qc, assetId),
  });
}

export function useClearMotorModel(assetId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ reanalyse }: { reanalyse: boolean }) => api<{ cleared: boolean; queued?: number }>(`/assets/${assetId}/motor-model${query(reanalyse)}`, { method: "DELETE" }),
    onSuccess: () => refresh(qc, assetId),
  });
}
