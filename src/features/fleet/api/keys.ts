import { rootKeys } from "../../../lib/query.ts";

export const fleetKeys = {
  all: rootKeys.fleet,
  health: (siteId: number | null) => [...rootKeys.fleet, "health", { siteId }] as const,
};
