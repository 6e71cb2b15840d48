// The fields of a capture upload: the multipart form of POST /api/captures (server/routes/captures.ts) and the
// Upload screen's form around the files (src/features/upload). Form values arrive as strings; "" means not given.
import { z } from "zod";

/** How far ahead of the server's clock a capture time may be (clocks on site laptops drift). */
export const TAKEN_AT_SLACK_MS = 5 * 60_000;
/** The highest sample rate accepted for a CSV without a time column (Hz). */
export const MAX_SAMPLE_RATE_HZ = 1_000_000;

const blankToUndefined = (v: unknown) => (v === "" || v === undefined || v === null ? undefined : v);
const numberFromForm = (v: unknown) => {
  const b = blankToUndefined(v);
  return b === undefined ? undefined : Number(b);
};

export const assetIdField = z.preprocess(numberFromForm, z.number({ message: "Pick a motor." }).int("Pick a motor.").positive("Pick a motor."));

/**
 * Capture time: anything Date parses (ISO 8601 from the API, "2026-12-01T08:30" from a datetime-local input, read
 * in the local time of whoever parses it, so the browser converts before sending). Out: ISO 8601 in UTC.
 */
export const takenAtField = z
  .string({ message: "Enter a date and time." })
  .trim()
  .optional()
  .transform((v, ctx) => {
    if (!v) return undefined;
    const t = Date.parse(v);
    if (Number.isNaN(t)) {
      ctx.addIssue({ code: "custom", message: "Enter a valid date and time (e.g. 2026-12-01T08:30:00Z)." });
      return z.NEVER;
    }
    if (t > Date.now() + TAKEN_AT_SLACK_MS) {
      ctx.addIssue({ code: "custom", message: "The capture time is in the future." });
      return z.NEVER;
    }
    return new Date(t).toISOString();
  });

export const uploadFields = z.object({
  assetId: assetIdField,
  measurementPointId: z.preprocess(numberFromForm, z.number().int("Not a measurement point.").positive("Not a measurement point.").optional()),
  takenAt: takenAtField,
  notes: z
    .string()
    .max(2000, "Keep notes under 2000 characters.")
    .optional()
    .transform((v) => v?.trim() || undefined),
  sampleRate: z.preprocess(
    numberFromForm,
    z
      .number({ message: "Enter the sample rate in Hz." })
      .positive("The sample rate must be above 0 Hz.")
      .max(MAX_SAMPLE_RATE_HZ, "Above 1 MHz is not a plausible sample rate.")
      .optional(),
  ),
});
export type UploadFields = z.output<typeof uploadFields>;
