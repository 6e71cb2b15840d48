import { queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet } from "../../../lib/api.ts";
import type { Site } from "../../../lib/contracts.ts";
import { rootKeys } from "../../../lib/query.ts";

/** Sites for the site picker (same key and answer as the register's, so they share the cache). */
export const sitesQueryOptions = () =>
  queryOptions({
    queryKey: [...rootKeys.sites, "list"] as const,
    queryFn: ({ signal }) => apiGet<{ items: Site[] }>("/sites", undefined, signal),
    staleTime: 5 * 60_000,
  });
export const useSites = () => useQuery(sitesQueryOptions());
