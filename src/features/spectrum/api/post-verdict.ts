import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { z } from "zod";
import { verdictBody } from "../../../shared/schemas/findings.ts";
import { apiPost } from "../../../lib/api.ts";
import type { Finding } from "../../../lib/contracts.ts";
import { rootKeys } from "../../../lib/query.ts";

export const VERDICTS = [
  { value: "confirmed", label: "Confirm", help: "The finding is real." },
  { value: "dismissed", label: "Dismiss", help: "Not a rotor or vibration problem (e.g. load oscillation, bad capture)." },
  { value: "remeasure", label: "Ask for a re-measure", help: "The capture cannot decide it; a technician measures again." },
] as const;

/** What a note is needed for, in the form only: the API takes a dismissal or re-measure without one. */
export const NOTE_NEEDED = "Say why in the note: the technician and the next analyst will read it.";

/** The verdict form: the server's schema (src/shared/schemas/findings.ts), and a note unless confirming. */
export const verdictSchema = verdictBody.refine((v) => v.verdict === "confirmed" || v.note !== "", { path: ["note"], message: NOTE_NEEDED });
export type VerdictInput = z.output<typeof verdictBody>;

export function usePostVerdict() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ findingId, input }: { findingId: number; input: VerdictInput }) =>
      apiPost<Finding>(`/findings/${findingId}/verdict`, verdictBody.parse(input)),
    onSuccess: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: rootKeys.findings }),
        qc.invalidateQueries({ queryKey: rootKeys.review }),
        qc.invalidateQueries({ queryKey: rootKeys.fleet }),
        qc.invalidateQueries({ queryKey: rootKeys.assets }),
      ]),
  });
}
