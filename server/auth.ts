import crypto, { type KeyObject } from "node:crypto";
import jwt from "jsonwebtoken";
import bcrypt from "bcryptjs";
import type { Knex } from "knex";
import type { CookieOptions, RequestHandler } from "express";
import type { Config } from "./config.ts";
import type { SessionUser } from "./http.ts";
import { isRole } from "./permissions.ts";

export const SESSION_COOKIE = "bh_session";
export const BCRYPT_COST = 11;

export const hashPassword = (pw: string) => bcrypt.hash(pw, BCRYPT_COST);
export const checkPassword = (pw: string, hash: string) => bcrypt.compare(pw, hash);

// jsonwebtoken given a string secret tries to read it as a public key on every call (about 1 ms a request);
// a secret KeyObject made once per secret skips that.
const keys = new Map<string, KeyObject>();
function sessionKey(secret: string): KeyObject {
  let key = keys.get(secret);
  if (!key) keys.set(secret, (key = crypto.createSecretKey(Buffer.from(secret, "utf8"))));
  return key;
}

export function signSession(config: Config, user: SessionUser): string {
  return jwt.sign({ sub: String(user.id), role: user.role }, sessionKey(config.jwtSecret), { algorithm: "HS256", expiresIn: `${config.sessionHours}h` });
}

export function cookieOptions(config: Config): CookieOptions {
  return { httpOnly: true, sameSite: "lax", secure: config.env === "production", path: "/", maxAge: config.sessionHours * 3600_000 };
}

/** Resolve the session token to an active user, or null. Used by HTTP requests and socket.io handshakes. */
export async function userFromToken(db: Knex, config: Config, token: string | undefined): Promise<SessionUser | null> {
  if (!token) return null;
  let payload: jwt.JwtPayload;
  try {
    payload = jwt.verify(token, sessionKey(config.jwtSecret), { algorithms: ["HS256"] }) as jwt.JwtPayload;
  } catch {
    return null;
  }
  const row = await db("users").where({ id: Number(payload.sub), active: true }).first("id", "email", "name", "role");
  if (!row || !isRole(row.role)) return null;
  return { id: row.id, email: row.email, name: row.name, role: row.role };
}

/** Attach req.user when a valid session cookie is present; routes decide what to do without one. */
export function sessionMiddleware(db: Knex, config: Config): RequestHandler {
  return async (req, _res, next) => {
    try {
      const token = (req as { cookies?: Record<string, string> }).cookies?.[SESSION_COOKIE];
      const user = await userFromToken(db, config, token);
      if (user) req.user = user;
      next();
    } catch (err) {
      next(err);
    }
  };
}

/** Read the session token out of a raw Cookie header (socket.io handshakes). */
export function tokenFromCookieHeader(header: string | undefined): string | undefined {
  if (!header) return undefined;
  for (const part of header.split(";")) {
    const [k, ...v] = part.trim().split("=");
    if (k === SESSION_COOKIE) return decodeURIComponent(v.join("="));
  }
  return undefined;
}
