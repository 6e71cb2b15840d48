// The signed-in user's calendar subscription link (docs/api.md, "Calendar subscription"), for Plan and My work.
// The link's URL holds its secret: it is only in the answer to creating one, kept by the panel while shown, and
// never put in the query cache (which holds the status without it).
import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { api, apiGet } from "./api.ts";
import type { CalendarFeedStatus, IssuedCalendarFeed } from "./contracts.ts";
import { formatDateTime } from "./format.ts";
import { rootKeys } from "./query.ts";

export const calendarFeedKeys = {
  // Under the session root: the link is the user's own and goes with the session.
  status: () => [...rootKeys.session, "calendar-feed"] as const,
};

export const calendarFeedQueryOptions = () =>
  queryOptions({
    queryKey: calendarFeedKeys.status(),
    queryFn: ({ signal }) => apiGet<CalendarFeedStatus>("/calendar-feed", undefined, signal),
  });

/** Create a link, or rotate: the new one replaces the old one, which stops working at once. */
export function useIssueCalendarFeed() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api<IssuedCalendarFeed>("/calendar-feed", { method: "POST", body: {} }),
    onSuccess: ({ scope, link }) => qc.setQueryData(calendarFeedKeys.status(), { scope, link }),
  });
}

export function useRevokeCalendarFeed() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api<CalendarFeedStatus>("/calendar-feed", { method: "DELETE" }),
    onSuccess: (status) => qc.setQueryData(calendarFeedKeys.status(), status),
  });
}

export const FEED_SCOPE_TEXT: Record<CalendarFeedStatus["scope"], string> = {
  plan: "every open inspection of the plan (planned and in progress) on its due date",
  assigned: "the open inspections assigned to you (planned and in progress) on their due dates",
};

/** When a calendar application last fetched the link: "05 Dec 2026, 14:03", or "Not yet". */
export function lastFetchedText(link: { lastUsedAt: string | null }): string {
  return link.lastUsedAt ? formatDateTime(link.lastUsedAt) : "Not yet";
}

/** The same feed as a webcal: link, which opens the system's calendar application to subscribe. */
export function webcalUrl(url: string): string {
  return url.replace(/^https?:\/\//i, "webcal://");
}
