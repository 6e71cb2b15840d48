import { rootKeys } from "../../../lib/query.ts";

export const uploadKeys = {
  sites: () => [...rootKeys.sites, "list"] as const,
  assetsOfSite: (siteId: number) => [...rootKeys.assets, "list", { siteId, pageSize: 200, sort: "tag" }] as const,
  asset: (id: number) => [...rootKeys.assets, "detail", id] as const,
  capture: (id: number) => [...rootKeys.captures, "detail", id] as const,
};
