import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { Section } from "./Page.tsx";
import { Button, buttonClass } from "./Button.tsx";
import { Alert, ErrorNote } from "./Alert.tsx";
import { Spinner } from "./Spinner.tsx";
import { formatDateTime } from "../lib/format.ts";
import { calendarFeedQueryOptions, FEED_SCOPE_TEXT, lastFetchedText, useIssueCalendarFeed, useRevokeCalendarFeed, webcalUrl } from "../lib/calendar-feed.ts";

/**
 * "Calendar subscription": the signed-in user's personal feed link for a calendar application (create, copy,
 * rotate, revoke, when it was last fetched). Shown on Plan and on My work; the server decides what the feed holds.
 */
export function CalendarFeedPanel({ className = "" }: { className?: string }) {
  const status = useQuery(calendarFeedQueryOptions());
  const issue = useIssueCalendarFeed();
  const revoke = useRevokeCalendarFeed();
  const [fresh, setFresh] = useState<string | null>(null);
  const [copied, setCopied] = useState<"yes" | "failed" | null>(null);
  const busy = issue.isPending || revoke.isPending;
  const link = status.data?.link ?? null;

  const makeLink = async () => {
    revoke.reset();
    const r = await issue.mutateAsync().catch(() => null);
    if (r) {
      setFresh(r.url);
      setCopied(null);
    }
  };
  const rotate = () => {
    if (confirm("Rotate the calendar link? The current link stops working at once; calendars subscribed to it must be given the new one.")) void makeLink();
  };
  const revokeLink = () => {
    if (!confirm("Revoke the calendar link? Calendars subscribed to it stop receiving the plan.")) return;
    issue.reset();
    revoke.mutate(undefined, { onSuccess: () => setFresh(null) });
  };
  const copy = async (url: string) => {
    try {
      await navigator.clipboard.writeText(url);
      setCopied("yes");
    } catch {
      setCopied("failed");
    }
  };

  return (
    <Section title="Calendar subscription" className={`h-fit ${className}`}>
      <div className="flex flex-col gap-3" data-testid="calendar-feed">
        {status.isPending ? (
          <Spinner />
        ) : status.isError ? (
          <ErrorNote error={status.error} />
        ) : (
          <>
            <p className="text-ink-muted">
              Subscribe from your calendar application to see {FEED_SCOPE_TEXT[status.data.scope]}. The application fetches the link
              on its own; changes show after its next fetch. The link is personal: anyone who has it can read these inspections.
            </p>

            {fresh && (
              <div className="flex flex-col gap-2">
                <Alert tone="caution" title="Copy the link now">
                  It is shown only this once. In your calendar application, add a calendar from a URL (subscribe) and paste it.
                </Alert>
                <code className="num block break-all rounded-md border border-line bg-sunken p-2 text-caption" data-testid="calendar-feed-url">
                  {fresh}
                </code>
                <div className="flex flex-wrap items-center gap-2">
                  <Button size="sm" variant="primary" onClick={() => copy(fresh)}>
                    {copied === "yes" ? "Copied" : "Copy link"}
                  </Button>
                  <a className={`${buttonClass("secondary", "sm")} no-underline`} href={webcalUrl(fresh)}>
                    Open in calendar app
                  </a>
                  <Button size="sm" variant="ghost" onClick={() => setFresh(null)}>
                    I have stored it
                  </Button>
                </div>
                {copied === "failed" && <p className="text-caption text-danger">The browser did not allow copying. Select the link above and copy it by hand.</p>}
              </div>
            )}

            {link ? (
              <>
                <dl className="grid grid-cols-[auto_minmax(0,1fr)] gap-x-4 gap-y-1 text-caption">
                  <dt className="text-ink-muted">Link</dt>
                  <dd className="num truncate" data-testid="calendar-feed-prefix">{link.prefix}</dd>
                  <dt className="text-ink-muted">Created</dt>
                  <dd className="num">{formatDateTime(link.createdAt)}</dd>
                  <dt className="text-ink-muted">Last fetched</dt>
                  <dd className={link.lastUsedAt ? "num" : "text-ink-faint"} data-testid="calendar-feed-last-used">{lastFetchedText(link)}</dd>
                </dl>
                <div className="flex flex-wrap gap-2">
                  <Button size="sm" disabled={busy} onClick={rotate}>
                    Rotate link
                  </Button>
                  <Button size="sm" variant="danger" disabled={busy} onClick={revokeLink}>
                    Revoke
                  </Button>
                </div>
              </>
            ) : (
              <div>
                <Button variant="primary" disabled={busy} onClick={makeLink}>
                  Create link
                </Button>
              </div>
            )}
            <ErrorNote error={issue.error ?? revoke.error} />
          </>
        )}
      </div>
    </Section>
  );
}
