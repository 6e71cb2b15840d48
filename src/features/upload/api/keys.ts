import { rootKeys } from "../../../lib/query.ts";

export const uploadKeys = {
  assetsOfSite: (siteId: number) => [...rootKeys.assets, "list", { siteId, pageSize: 200, sort: "tag" }] as const,
  asset: (id: number) => [...rootKeys.assets, "detail", id] as const,
  capture: (id: number) => [...rootKeys.captures, "detail", id] as const,
};
