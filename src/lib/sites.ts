// Sites with their areas, for every site picker: one query key, so all screens share the cached answer.
import { queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet } from "./api.ts";
import type { Site } from "./contracts.ts";
import { rootKeys } from "./query.ts";

export const sitesQueryOptions = () =>
  queryOptions({
    queryKey: [...rootKeys.sites, "list"] as const,
    queryFn: ({ signal }) => apiGet<{ items: Site[] }>("/sites", undefined, signal).then((r) => r.items),
    staleTime: 5 * 60_000,
  });

export const useSites = () => useQuery(sitesQueryOptions());
