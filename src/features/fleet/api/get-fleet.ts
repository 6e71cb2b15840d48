import { queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet } from "../../../lib/api.ts";
import type { FleetHealth } from "../../../../server/reports/fleet-data.ts";
import { fleetKeys } from "./keys.ts";

export type { FleetHealth, FleetMotor, FleetSite, FleetArea, GradeCounts } from "../../../../server/reports/fleet-data.ts";

export const fleetQueryOptions = (siteId: number | null) =>
  queryOptions({
    queryKey: fleetKeys.health(siteId),
    queryFn: ({ signal }) => apiGet<FleetHealth>("/fleet", { siteId }, signal),
  });
export const useFleet = (siteId: number | null) => useQuery(fleetQueryOptions(siteId));
