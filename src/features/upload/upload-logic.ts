// Pure rules of the Upload screen (tested in tests/client/plan-upload.test.ts).
import { z } from "zod";
import { ApiError } from "../../lib/api.ts";
import type { CaptureStatus } from "../../lib/contracts.ts";
import { uploadFields } from "../../shared/schemas/captures.ts";

export const ACCEPTED_EXTENSIONS = [".csv", ".wav"] as const;

/** Files we refuse before sending: wrong type or empty. Size limits are the server's (413). */
export function checkFile(file: { name: string; size: number }): string | null {
  const lower = file.name.toLowerCase();
  if (!ACCEPTED_EXTENSIONS.some((ext) => lower.endsWith(ext))) return `Not a CSV or WAV file (${extensionOf(file.name) || "no extension"}). Export the capture as .csv or .wav.`;
  if (file.size === 0) return "The file is empty.";
  return null;
}

export function extensionOf(name: string): string {
  const i = name.lastIndexOf(".");
  return i > 0 ? name.slice(i).toLowerCase() : "";
}

/** A clear sentence for a rejected upload, from the server's answer. */
export function rejectionMessage(err: unknown): string {
  if (err instanceof ApiError) {
    const fieldText = err.fields ? Object.values(err.fields).join(" ") : "";
    switch (err.status) {
      case 413:
        return `Too large for the server: ${err.message}`.replace(/: The file is larger than the server accepts\.$/, ": split the recording or shorten it.");
      case 415:
        return `File type not accepted: ${err.message}`;
      case 422:
        return `The file could not be read: ${err.message}${fieldText ? ` ${fieldText}` : ""}`;
      case 400:
        return fieldText ? `${err.message}: ${fieldText}` : err.message;
      case 0:
        return err.message;
      default:
        return err.message;
    }
  }
  return err instanceof Error ? err.message : "The upload failed.";
}

export const FINAL_STATUSES: readonly CaptureStatus[] = ["analysed", "failed"];
export const isFinalStatus = (s: string) => (FINAL_STATUSES as readonly string[]).includes(s);

export const STATUS_STEPS: { status: CaptureStatus; label: string }[] = [
  { status: "received", label: "Received" },
  { status: "queued", label: "Queued" },
  { status: "analysing", label: "Analysing" },
  { status: "analysed", label: "Analysed" },
];

/** Index of a status along the steps (failed counts as the last reached step). */
export function stepIndex(status: string): number {
  const i = STATUS_STEPS.findIndex((s) => s.status === status);
  return i === -1 ? (status === "failed" ? 3 : 0) : i;
}

/** The furthest step among statuses heard from different sources (the fetched capture, live events). */
export function furthestStatus(...statuses: (string | undefined)[]): string {
  let best = "received";
  for (const s of statuses) {
    if (!s) continue;
    const i = stepIndex(s);
    const b = stepIndex(best);
    if (i > b || (i === b && s === "failed")) best = s;
  }
  return best;
}

/** The form around the files: the server's upload fields (src/shared/schemas/captures.ts) plus the site picker. */
export const uploadFormSchema = uploadFields.extend({
  siteId: z.preprocess((v) => (v === "" ? undefined : Number(v)), z.number({ message: "Pick a site." }).int().positive("Pick a site.")),
});
export type UploadFormValues = z.output<typeof uploadFormSchema>;

export const SAFETY_ACK_KEY = "barhound.safety-acknowledged";
