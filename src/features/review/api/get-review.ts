import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet, type Paged, type QueryParams } from "../../../lib/api.ts";
import type { Finding } from "../../../lib/contracts.ts";
import { reviewKeys } from "./keys.ts";

/** One capture in the review queue: its findings (worst first) and the numbers to triage by. */
export interface ReviewItem {
  captureId: number;
  assetId: number;
  assetTag: string;
  assetName: string;
  takenAt: string | null;
  fileName: string | null;
  captureStatus: string;
  /** Worst finding level on one scale: rotor R2..R5 → 2..5, zone C → 3, D → 4. */
  severity: number;
  /** When the capture's newest finding still waiting for a verdict was raised; null once every finding has one (status=all). */
  raisedAt: string | null;
  findings: (Finding & { takenAt?: string | null })[];
}

export const reviewQueryOptions = (query: QueryParams) =>
  queryOptions({
    queryKey: reviewKeys.list(query),
    queryFn: ({ signal }) => apiGet<Paged<ReviewItem>>("/review", query, signal),
    placeholderData: keepPreviousData,
  });
export const useReview = (query: QueryParams) => useQuery(reviewQueryOptions(query));
