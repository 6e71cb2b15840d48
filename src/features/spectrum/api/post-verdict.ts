import { useMutation, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { apiPost } from "../../../lib/api.ts";
import type { Finding } from "../../../lib/contracts.ts";
import { rootKeys } from "../../../lib/query.ts";

export const VERDICTS = [
  { value: "confirmed", label: "Confirm", help: "The finding is real." },
  { value: "dismissed", label: "Dismiss", help: "Not a rotor or vibration problem (e.g. load oscillation, bad capture)." },
  { value: "remeasure", label: "Ask for a re-measure", help: "The capture cannot decide it; a technician measures again." },
] as const;

export const verdictSchema = z.object({
  verdict: z.enum(["confirmed", "dismissed", "remeasure"]),
  note: z.string().trim().max(2000, "Keep the note under 2000 characters"),
});
export type VerdictInput = z.infer<typeof verdictSchema>;

export function usePostVerdict() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ findingId, input }: { findingId: number; input: VerdictInput }) =>
      apiPost<Finding>(`/findings/${findingId}/verdict`, verdictSchema.parse(input)),
    onSuccess: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: rootKeys.findings }),
        qc.invalidateQueries({ queryKey: rootKeys.review }),
        qc.invalidateQueries({ queryKey: rootKeys.fleet }),
        qc.invalidateQueries({ queryKey: rootKeys.assets }),
      ]),
  });
}
