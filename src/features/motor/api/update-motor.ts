// Edit a motor (PATCH /assets/:id with the fields that changed, admins) and delete one (DELETE /assets/:id). A
// nameplate change starts a new nameplate version; with `reanalyse` the motor's stored captures are queued again
// (PATCH …?reanalyse=1) and the answer says how many. The server refuses to delete a motor with captures (409).
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { apiDelete, apiPatch } from "../../../lib/api.ts";
import type { Asset } from "../../../lib/contracts.ts";
import { rootKeys } from "../../../lib/query.ts";
import { assetPatchBody, type AssetPatchBody } from "../../../shared/schemas/assets.ts";

export function useUpdateMotor(assetId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ body, reanalyse }: { body: AssetPatchBody; reanalyse: boolean }) =>
      apiPatch<Asset & { queued?: number }>(`/assets/${assetId}${reanalyse ? "?reanalyse=1" : ""}`, assetPatchBody.parse(body)),
    // Tag, name, place and criticality show in the lists, the fleet, findings, review, captures and inspections;
    // re-queued captures change status in the history and the review.
    onSuccess: () =>
      Promise.all(
        [rootKeys.assets, rootKeys.fleet, rootKeys.findings, rootKeys.review, rootKeys.captures, rootKeys.inspections].map((k) => qc.invalidateQueries({ queryKey: k })),
      ),
  });
}

export function useDeleteMotor(assetId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => apiDelete(`/assets/${assetId}`),
    // Marked stale without refetching now: the motor's own page is still open until the caller leaves it, and its
    // detail would answer 404. The register and the fleet refetch when they show.
    onSuccess: () => Promise.all([rootKeys.assets, rootKeys.fleet].map((k) => qc.invalidateQueries({ queryKey: k, refetchType: "none" }))),
  });
}
