import { queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet, type Paged } from "../../../lib/api.ts";
import type { Capture } from "../../../lib/contracts.ts";
import { captureKeys } from "./keys.ts";

/** The motor's analysed captures, newest first: the overlay picker. */
export const motorCapturesQueryOptions = (assetId: number) =>
  queryOptions({
    queryKey: captureKeys.list({ assetId, status: "analysed", sort: "-takenAt" }),
    queryFn: ({ signal }) =>
      apiGet<Paged<Capture>>("/captures", { assetId, status: "analysed", sort: "-takenAt", pageSize: 100 }, signal),
  });

export const useMotorCaptures = (assetId: number | undefined) =>
  useQuery({ ...motorCapturesQueryOptions(assetId ?? NaN), enabled: assetId !== undefined });
