import { QueryClient } from "@tanstack/react-query";
import { ApiError } from "./api.ts";

/**
 * Root query keys. Every feature's key factory starts with one of these, so live events (lib/socket.ts) and
 * mutations can refresh a whole family by prefix: e.g. `[...rootKeys.captures, "list", filters]`.
 */
export const rootKeys = {
  session: ["session"],
  sites: ["sites"],
  assets: ["assets"],
  captures: ["captures"],
  findings: ["findings"],
  review: ["review"],
  inspections: ["inspections"],
  fleet: ["fleet"],
  people: ["people"],
  users: ["users"],
  gateways: ["gateways"],
  outbox: ["outbox"],
  audit: ["audit"],
} as const;

export type RootKey = keyof typeof rootKeys;

/** Retry network and 5xx failures twice; a 4xx answer will not change by asking again. */
export function shouldRetry(failureCount: number, error: unknown): boolean {
  if (error instanceof ApiError && error.status >= 400 && error.status < 500) return false;
  return failureCount < 2;
}

export function createQueryClient() {
  return new QueryClient({
    defaultOptions: {
      queries: { staleTime: 30_000, retry: shouldRetry, refetchOnWindowFocus: false },
      mutations: { retry: false },
    },
  });
}

/** The app's client (tests make their own with createQueryClient()). */
export const queryClient = createQueryClient();
