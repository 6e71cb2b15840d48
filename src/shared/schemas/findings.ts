// An analyst's verdict on a finding: the request body of POST /api/findings/:id/verdict.
import { z } from "zod";

export const VERDICTS = ["confirmed", "dismissed", "remeasure"] as const;

export const verdictBody = z.object({
  verdict: z.enum(VERDICTS, { message: "Pick a verdict: confirmed, dismissed or remeasure." }),
  note: z.string({ message: "The note is text." }).trim().max(4000, "Keep the note under 4000 characters.").optional().default(""),
});
export type VerdictBody = z.output<typeof verdictBody>;
