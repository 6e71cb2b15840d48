import { queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet, type Paged } from "../../../lib/api.ts";
import type { Finding } from "../../../lib/contracts.ts";
import { captureKeys } from "./keys.ts";

/** The motor's findings (open ones first in the UI); the capture's own finding is picked from these. */
export const assetFindingsQueryOptions = (assetId: number) =>
  queryOptions({
    queryKey: captureKeys.findings(assetId),
    queryFn: ({ signal }) => apiGet<Paged<Finding>>("/findings", { assetId, sort: "-createdAt", pageSize: 50 }, signal),
  });

export const useAssetFindings = (assetId: number | undefined) =>
  useQuery({ ...assetFindingsQueryOptions(assetId ?? NaN), enabled: assetId !== undefined });
