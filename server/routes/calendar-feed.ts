import { rateLimit } from "express-rate-limit";
import type { AppContext } from "../context.ts";
import { guardedRouter, type SessionUser } from "../http.ts";
import { forbidden, notFound } from "../errors.ts";
import { audit } from "../audit.ts";
import { sha256 } from "../tokens.ts";
import { activeFeedLink, feedOwner, feedScope, feedUrl, issueFeedLink, markFeedUsed, revokeFeedLink, type FeedScope } from "../plan/feed-links.ts";
import { PLAN_CALENDAR_NAME, planCalendar, WHOLE_PLAN } from "../plan/plan-calendar.ts";

// Calendar subscription: each user who may read the plan keeps one personal feed link (server/plan/feed-links.ts).
// Managing the link needs the session; the feed itself is public and answers by its secret token alone.

/** How often calendar applications are asked to fetch again, and how long they may keep an answer. */
export const FEED_REFRESH_MINUTES = 30;
const WINDOW_MS = 15 * 60_000;
/** Failed fetches allowed per address: this many times the per-link budget (config.feedRateLimit). */
export const FAILED_PER_ADDRESS_FACTOR = 20;

const CALENDAR_NAME: Record<FeedScope, string> = { plan: PLAN_CALENDAR_NAME, assigned: "Barhound: my inspections" };

export function calendarFeedRoutes(ctx: AppContext) {
  const { db } = ctx;
  const r = guardedRouter("/api");

  const status = async (user: SessionUser) => ({ scope: feedScope(user.role), link: await activeFeedLink(db, user.id) });

  r.get("/calendar-feed", "calendar.subscribe", async (req, res) => {
    res.json(await status(req.user!));
  });

  // Create, or rotate: a new link, and the old one (if any) stops working in the same transaction.
  r.post("/calendar-feed", "calendar.subscribe", async (req, res) => {
    const user = req.user!;
    const { token, link, replaced } = await issueFeedLink(db, user.id);
    await audit(db, {
      actor: user,
      action: replaced ? "calendar-feed.rotated" : "calendar-feed.created",
      subjectType: "user",
      subjectId: user.id,
      details: { tokenPrefix: link.prefix, ...(replaced ? { replaced } : {}) },
      ip: req.ip,
    });
    res.status(201).json({ scope: feedScope(user.role), link, token, url: feedUrl(ctx.config.publicUrl, token) });
  });

  r.delete("/calendar-feed", "calendar.subscribe", async (req, res) => {
    const user = req.user!;
    const revoked = await revokeFeedLink(db, user.id);
    if (revoked) await audit(db, { actor: user, action: "calendar-feed.revoked", subjectType: "user", subjectId: user.id, details: { tokenPrefix: revoked.prefix }, ip: req.ip });
    res.json(await status(user));
  });

  // --- the feed -------------------------------------------------------------------------------------------
  // Fetches are limited per link: each link (known or not) has its own budget, so a stale subscription that a
  // calendar service keeps polling after a rotation does not use up the budget of others fetched from the same
  // addresses. Behind that, failed fetches per address are capped well above it, against someone trying tokens.
  const rateLimited = { error: "Too many calendar requests. Wait 15 minutes and try again.", code: "rate-limited" };
  const failedPerAddress = rateLimit({
    windowMs: WINDOW_MS,
    limit: ctx.config.feedRateLimit * FAILED_PER_ADDRESS_FACTOR,
    standardHeaders: "draft-8",
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    requestWasSuccessful: (_req, res) => res.statusCode < 400 || res.statusCode === 429,
    message: rateLimited,
  });
  const perLink = rateLimit({
    windowMs: WINDOW_MS,
    limit: ctx.config.feedRateLimit,
    standardHeaders: "draft-8",
    legacyHeaders: false,
    keyGenerator: (req) => sha256(String(req.params.token)),
    message: rateLimited,
  });

  r.get("/calendar/:token.ics", "public", failedPerAddress, perLink, async (req, res) => {
    const owner = await feedOwner(db, String(req.params.token));
    if (!owner) throw notFound("No such calendar.");
    const scope = owner.active ? feedScope(owner.role) : null;
    if (!scope) throw forbidden("This calendar link can no longer be used.");
    const ics = await planCalendar(ctx, { ...WHOLE_PLAN, mine: scope === "assigned" }, owner.userId, { name: CALENDAR_NAME[scope], refreshMinutes: FEED_REFRESH_MINUTES });
    await markFeedUsed(db, owner.feedId);
    // private: the URL is a secret, so no shared cache may keep the answer.
    res.set("Cache-Control", `private, max-age=${FEED_REFRESH_MINUTES * 60}`);
    res.set("X-Robots-Tag", "noindex, nofollow");
    res.set("Content-Disposition", 'inline; filename="barhound-plan.ics"');
    res.type("text/calendar; charset=utf-8").send(ics);
  });

  return r.router;
}
