// Gateway tokens: "bhg_<prefix>_<secret>". Only the sha256 of the whole token is stored; the prefix is kept in
// clear so an admin can tell which token a device holds ("bhg_3f9a1c0e_…") without the secret.

import type { Knex } from "knex";
import { createPrefixedToken, sha256 } from "../tokens.ts";
import type { ConnectRefusal } from "./protocol.ts";

const TOKEN_RE = /^bhg_([0-9a-f]{8})_([A-Za-z0-9_-]{32,})$/;

export interface NewGatewayToken {
  token: string;
  prefix: string;
  hash: string;
}

export function createGatewayToken(): NewGatewayToken {
  return createPrefixedToken("bhg");
}

export interface GatewayRow {
  id: number;
  site_id: number | null;
  name: string;
  token_prefix: string;
  revoked_at: Date | null;
}

/**
 * Who a token belongs to, or why it cannot be used: `problem` is shown to the integrator, `reason` lets a gateway
 * tell a token it should check (missing, malformed, unknown) from one an admin revoked.
 */
export async function gatewayFromToken(db: Knex, token: unknown): Promise<{ gateway: GatewayRow } | { problem: string; reason: ConnectRefusal }> {
  if (typeof token !== "string" || token === "")
    return {
      problem: "No gateway token given. Connect with auth: { token: \"bhg_…\" } (an admin creates tokens under Admin → Gateways).",
      reason: "missing-token",
    };
  if (!TOKEN_RE.test(token)) return { problem: "This is not a gateway token (they look like bhg_<8 hex digits>_<secret>).", reason: "malformed-token" };
  const row = (await db("gateways").where({ token_hash: sha256(token) }).first("id", "site_id", "name", "token_prefix", "revoked_at")) as
    | GatewayRow
    | undefined;
  if (!row) return { problem: "Unknown gateway token. Check it was copied whole, or ask an admin for a new one.", reason: "unknown-token" };
  if (row.revoked_at)
    return { problem: `The token of gateway "${row.name}" (bhg_${row.token_prefix}_…) was revoked. Ask an admin for a new token.`, reason: "revoked" };
  return { gateway: row };
}
