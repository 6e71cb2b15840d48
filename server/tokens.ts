import crypto from "node:crypto";
import type { Knex } from "knex";

export type TokenKind = "invite" | "reset";

export const sha256 = (s: string) => crypto.createHash("sha256").update(s).digest("hex");

export interface PrefixedToken {
  token: string;
  prefix: string;
  hash: string;
}

/**
 * A long-lived bearer secret "<tag>_<8 hex>_<secret>" (gateway tokens, calendar feed links). Store only `hash`
 * (sha256 of the whole token) and `prefix`, which may be shown so people can tell their tokens apart.
 */
export function createPrefixedToken(tag: string): PrefixedToken {
  const prefix = crypto.randomBytes(4).toString("hex");
  const secret = crypto.randomBytes(32).toString("base64url");
  const token = `${tag}_${prefix}_${secret}`;
  return { token, prefix, hash: sha256(token) };
}

/** A single-use token for a set-password link; only its hash is stored. */
export async function createUserToken(db: Knex, userId: number, kind: TokenKind, hours: number): Promise<string> {
  const raw = crypto.randomBytes(24).toString("base64url");
  await db("user_tokens").insert({
    user_id: userId,
    kind,
    token_hash: sha256(raw),
    expires_at: new Date(Date.now() + hours * 3600_000),
  });
  return raw;
}

export interface TokenRow {
  id: number;
  user_id: number;
  kind: TokenKind;
  expires_at: Date;
  used_at: Date | null;
}

/** Look a token up; returns why it cannot be used, or the row. */
export async function findUsableToken(db: Knex, raw: string): Promise<{ row: TokenRow } | { problem: string }> {
  const row = (await db("user_tokens").where({ token_hash: sha256(raw) }).first()) as TokenRow | undefined;
  if (!row) return { problem: "This link is not valid. Ask for a new one." };
  if (row.used_at) return { problem: "This link has already been used. Ask for a new one." };
  if (new Date(row.expires_at).getTime() < Date.now()) return { problem: "This link has expired. Ask for a new one." };
  return { row };
}
