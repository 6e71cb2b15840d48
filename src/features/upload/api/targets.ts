import { queryOptions } from "@tanstack/react-query";
import { apiGet, type Paged } from "../../../lib/api.ts";
import type { Asset, AssetDetail, Site } from "../../../lib/contracts.ts";
import { uploadKeys } from "./keys.ts";

export const siteAssetsQueryOptions = (siteId: number) =>
  queryOptions({
    queryKey: uploadKeys.assetsOfSite(siteId),
    queryFn: ({ signal }) => apiGet<Paged<Asset>>("/assets", { siteId, pageSize: 200, sort: "tag" }, signal).then((r) => r.items),
    enabled: siteId > 0,
  });

export const assetQueryOptions = (id: number) =>
  queryOptions({
    queryKey: uploadKeys.asset(id),
    queryFn: ({ signal }) => apiGet<AssetDetail>(`/assets/${id}`, undefined, signal),
    enabled: id > 0,
  });
