// Add a motor to the register (POST /assets, admins): the "Add motor" form on the Motors screen. A 409 (tag taken)
// comes back with the message on the tag field.
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { apiPost } from "../../../lib/api.ts";
import type { Asset } from "../../../lib/contracts.ts";
import type { MotorFormData } from "../../../lib/motor-form.ts";
import { rootKeys } from "../../../lib/query.ts";

export function useCreateMotor() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: MotorFormData) => apiPost<Asset>("/assets", body),
    // The register lists it; the fleet counts it in its area.
    onSuccess: () => Promise.all([rootKeys.assets, rootKeys.fleet].map((k) => qc.invalidateQueries({ queryKey: k }))),
  });
}
