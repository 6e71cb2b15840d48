// Move a motor to another area (PATCH /assets/:id with its new areaId): the way to empty an area or a site before
// an admin deletes it. Captures, analyses, findings and inspections stay with the motor.
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { apiPatch } from "../../../lib/api.ts";
import type { AssetDetail } from "../../../lib/contracts.ts";
import { numberInput } from "../../../lib/forms.ts";
import { rootKeys } from "../../../lib/query.ts";
import { moveMotorBody, type MoveMotorBody } from "../../../shared/schemas/assets.ts";

/** The form: the server's schema (src/shared/schemas/assets.ts), the area select's string turned into a number. */
export const moveMotorSchema = moveMotorBody.extend({ areaId: numberInput(moveMotorBody.shape.areaId) });

export function useMoveMotor(assetId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: MoveMotorBody) => apiPatch<AssetDetail>(`/assets/${assetId}`, moveMotorBody.parse(body)),
    // The motor's site and area show on its page, in the lists, the fleet, findings, captures and inspections.
    onSuccess: () =>
      Promise.all(
        [rootKeys.assets, rootKeys.sites, rootKeys.fleet, rootKeys.findings, rootKeys.review, rootKeys.captures, rootKeys.inspections].map((k) =>
          qc.invalidateQueries({ queryKey: k }),
        ),
      ),
  });
}
