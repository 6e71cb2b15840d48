import type { Knex } from "knex";
import { createPrefixedToken, sha256 } from "../tokens.ts";
import { can, isRole, type Role } from "../permissions.ts";
import { unauthorized } from "../errors.ts";

// Personal calendar feed links: a secret URL (GET /api/calendar/<token>.ics) that a calendar application fetches on
// its own schedule, without a session. Tokens are made like gateway tokens (createPrefixedToken: "bhc_<8 hex>_<secret>",
// only the sha256 of the whole token stored, the prefix kept to tell links apart). One active link per user;
// issuing a new one revokes the old one in the same transaction. What a feed may show is decided at every fetch
// from the owner's current role and state, never from what they could do when the link was made.

export const FEED_TOKEN_TAG = "bhc";
const FEED_TOKEN_RE = /^bhc_[0-9a-f]{8}_[A-Za-z0-9_-]{32,}$/;
/** The feed's path as the router sees it, for keeping tokens out of request logs. */
const FEED_PATH_RE = /(\/api\/calendar\/)[^/?#]+?(\.ics)/;

/** "plan": every open inspection (the roles that read reports); "assigned": only those assigned to the owner. */
export type FeedScope = "plan" | "assigned";

/** What a role's feed holds, or null when the role may not have a feed (any more). */
export function feedScope(role: Role | string | null | undefined): FeedScope | null {
  if (!isRole(role) || !can(role, "calendar.subscribe")) return null;
  return can(role, "reports.read") ? "plan" : "assigned";
}

export interface FeedLink {
  /** "bhc_3f9a1c0e_…": enough to recognise the link, useless to fetch it. */
  prefix: string;
  createdAt: Date;
  lastUsedAt: Date | null;
}

interface FeedRow {
  id: number;
  user_id: number;
  token_prefix: string;
  created_at: Date;
  last_used_at: Date | null;
  revoked_at: Date | null;
}

const toLink = (r: FeedRow): FeedLink => ({ prefix: `${FEED_TOKEN_TAG}_${r.token_prefix}_…`, createdAt: r.created_at, lastUsedAt: r.last_used_at });

export const feedUrl = (publicUrl: string, token: string) => `${publicUrl.replace(/\/+$/, "")}/api/calendar/${token}.ics`;

/** A request URL with a feed token replaced by "…", for logs. */
export const redactFeedUrl = (url: string) => url.replace(FEED_PATH_RE, "$1…$2");

export async function activeFeedLink(db: Knex, userId: number): Promise<FeedLink | null> {
  const row = (await db("calendar_feeds").where({ user_id: userId }).whereNull("revoked_at").first()) as FeedRow | undefined;
  return row ? toLink(row) : null;
}

/** A new link for the user; an active one is revoked at the same moment. The token is only in the answer. */
export async function issueFeedLink(db: Knex, userId: number): Promise<{ token: string; link: FeedLink; replaced: string | null }> {
  const { token, prefix, hash } = createPrefixedToken(FEED_TOKEN_TAG);
  return db.transaction(async (trx) => {
    // One issue at a time per user, so two clicks cannot leave two active links (the partial unique index backs this).
    // A deactivation revokes the user's link in the transaction that updates this row: one that committed while
    // this waited leaves the user inactive, and no new link is made for them.
    const user = await trx("users").where({ id: userId }).forUpdate().first("id", "active");
    if (!user?.active) throw unauthorized();
    const [old] = (await trx("calendar_feeds").where({ user_id: userId }).whereNull("revoked_at").update({ revoked_at: trx.fn.now() }).returning("token_prefix")) as { token_prefix: string }[];
    const [row] = (await trx("calendar_feeds").insert({ user_id: userId, token_prefix: prefix, token_hash: hash }).returning("*")) as FeedRow[];
    return { token, link: toLink(row), replaced: old ? `${FEED_TOKEN_TAG}_${old.token_prefix}_…` : null };
  });
}

/** Revoke the user's active link (on their request, or with their deactivation: pass its transaction); the revoked
 * link, or null when there was none. */
export async function revokeFeedLink(db: Knex, userId: number): Promise<FeedLink | null> {
  const [row] = (await db("calendar_feeds").where({ user_id: userId }).whereNull("revoked_at").update({ revoked_at: db.fn.now() }).returning("*")) as FeedRow[];
  return row ? toLink(row) : null;
}

export interface FeedOwner {
  feedId: number;
  userId: number;
  role: string;
  active: boolean;
}

/** The active link a token opens and its owner, or null (unknown, malformed and revoked alike). */
export async function feedOwner(db: Knex, token: string): Promise<FeedOwner | null> {
  if (!FEED_TOKEN_RE.test(token)) return null;
  const row = await db("calendar_feeds as f")
    .join("users as u", "u.id", "f.user_id")
    .where("f.token_hash", sha256(token))
    .whereNull("f.revoked_at")
    .first("f.id as feed_id", "u.id as user_id", "u.role", "u.active");
  return row ? { feedId: row.feed_id, userId: row.user_id, role: row.role, active: !!row.active } : null;
}

export async function markFeedUsed(db: Knex, feedId: number): Promise<void> {
  await db("calendar_feeds").where({ id: feedId }).update({ last_used_at: db.fn.now() });
}
