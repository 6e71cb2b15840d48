import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet, type Paged, type QueryParams } from "../../../lib/api.ts";
import type { Asset, Site } from "../../../lib/contracts.ts";
import { motorsKeys } from "./keys.ts";

export const assetsQueryOptions = (query: QueryParams) =>
  queryOptions({
    queryKey: motorsKeys.list(query),
    queryFn: ({ signal }) => apiGet<Paged<Asset>>("/assets", query, signal),
    placeholderData: keepPreviousData,
  });
export const useAssets = (query: QueryParams) => useQuery(assetsQueryOptions(query));

