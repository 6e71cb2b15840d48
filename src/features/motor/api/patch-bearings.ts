// The motor's rolling bearings (PATCH /assets/:id with `bearings`): the edit form on the motor page (admins). A
// change starts a new nameplate version, as a nameplate change does; with `reanalyse` the stored captures are queued
// again (PATCH …?reanalyse=1), so their analyses use the new bearings.
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { ApiError, apiPatch } from "../../../lib/api.ts";
import type { AssetBearing, AssetDetail } from "../../../lib/contracts.ts";
import { numberInput, optionalInput } from "../../../lib/forms.ts";
import { rootKeys } from "../../../lib/query.ts";
import { bearingFields, bearingsBody, checkBearingGeometry, type BearingsBody } from "../../../shared/schemas/bearings.ts";

export const BEARING_ENDS = ["de", "nde"] as const;
export type BearingEnd = (typeof BEARING_ENDS)[number];
export const BEARING_FIELDS = ["designation", "rollingElements", "elementDiameterMm", "pitchDiameterMm", "contactAngleDeg"] as const;
type Field = (typeof BEARING_FIELDS)[number];

/** The form's values: one text input per end and field, named "de.pitchDiameterMm" (so errors land by name). */
export type BearingFormValues = Record<`${BearingEnd}.${Field}`, string>;

const key = (end: BearingEnd, f: Field) => `${end}.${f}` as const;

/**
 * The form: the server's bearing rules (src/shared/schemas/bearings.ts) on text inputs (an empty input is "not given",
 * a decimal comma is fine). An end with every input empty is sent as null: nothing on record for it.
 */
export const bearingFormSchema = z
  .object(
    Object.fromEntries(
      BEARING_ENDS.flatMap((end) =>
        BEARING_FIELDS.map((f) => [key(end, f), f === "designation" ? optionalInput(bearingFields.designation) : numberInput(bearingFields[f])]),
      ),
    ) as unknown as Record<`${BearingEnd}.${Field}`, z.ZodType>,
  )
  .superRefine((v, ctx) => {
    for (const end of BEARING_ENDS) checkBearingGeometry(pickEnd(v, end), ctx, `${end}.`);
  })
  .transform((v): BearingsBody => {
    const out: BearingsBody = {};
    for (const end of BEARING_ENDS) {
      const b = pickEnd(v, end);
      out[end] = BEARING_FIELDS.every((f) => b[f] === undefined || b[f] === null) ? null : b;
    }
    return out;
  });

function pickEnd(v: Record<string, unknown>, end: BearingEnd) {
  return Object.fromEntries(BEARING_FIELDS.map((f) => [f, v[key(end, f)] ?? null])) as { designation: string | null; rollingElements: number | null; elementDiameterMm: number | null; pitchDiameterMm: number | null; contactAngleDeg: number | null };
}

/** The stored bearings as the form's starting values. */
export function bearingFormValues(bearings: AssetDetail["bearings"]): BearingFormValues {
  const out = {} as BearingFormValues;
  for (const end of BEARING_ENDS) {
    const b: AssetBearing | null = bearings?.[end] ?? null;
    for (const f of BEARING_FIELDS) out[key(end, f)] = b?.[f] === null || b?.[f] === undefined ? "" : String(b[f]);
  }
  return out;
}

export function usePatchBearings(assetId: number) {
  const qc = useQueryClient();
  return useMutation({
    /** `reanalyse`: queue every stored capture of the motor again, so its analyses use the new bearings. */
    mutationFn: async ({ body, reanalyse }: { body: BearingsBody; reanalyse: boolean }) => {
      try {
        return await apiPatch<AssetDetail & { queued?: number }>(`/assets/${assetId}${reanalyse ? "?reanalyse=1" : ""}`, { bearings: bearingsBody.parse(body) });
      } catch (err) {
        // The server names fields "bearings.de.…"; the form's inputs are "de.…".
        if (err instanceof ApiError && err.fields)
          throw new ApiError(err.status, err.message, { code: err.code, fields: Object.fromEntries(Object.entries(err.fields).map(([k, m]) => [k.replace(/^bearings\./, ""), m])) });
        throw err;
      }
    },
    onSuccess: (_data, { reanalyse }) =>
      Promise.all([rootKeys.assets, ...(reanalyse ? [rootKeys.captures, rootKeys.review] : [])].map((k) => qc.invalidateQueries({ queryKey: k }))),
  });
}
