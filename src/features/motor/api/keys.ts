// Query keys of the motor page, under the assets / captures / findings / inspections roots so live events refresh them.
import { rootKeys } from "../../../lib/query.ts";

export const motorKeys = {
  all: rootKeys.assets,
  detail: (id: number) => [...rootKeys.assets, "detail", id] as const,
  trend: (id: number) => [...rootKeys.assets, "detail", id, "trend"] as const,
  model: (id: number) => [...rootKeys.assets, "detail", id, "motor-model"] as const,
  capture: (captureId: number) => [...rootKeys.captures, "detail", captureId] as const,
  captures: (assetId: number, page: number) => [...rootKeys.captures, "list", { assetId, page, sort: "-takenAt" }] as const,
  findings: (assetId: number) => [...rootKeys.findings, "list", { assetId }] as const,
  inspections: (assetId: number) => [...rootKeys.inspections, "list", { assetId }] as const,
};
