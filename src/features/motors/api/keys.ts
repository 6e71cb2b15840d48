import { rootKeys } from "../../../lib/query.ts";

export const motorsKeys = {
  all: rootKeys.assets,
  lists: () => [...rootKeys.assets, "list"] as const,
  list: (query: Record<string, unknown>) => [...rootKeys.assets, "list", query] as const,
};
