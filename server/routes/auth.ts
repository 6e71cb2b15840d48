import { rateLimit } from "express-rate-limit";
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { parseOr400, badRequest, unauthorized } from "../errors.ts";
import { checkPassword, cookieOptions, hashPassword, SESSION_COOKIE, signSession } from "../auth.ts";
import { permissionsOf, isRole } from "../permissions.ts";
import { audit } from "../audit.ts";
import { createUserToken, findUsableToken } from "../tokens.ts";
import { forgotBody, loginBody, setPasswordBody } from "../../src/shared/schemas/auth.ts";

export function authRoutes(ctx: AppContext) {
  const { db, config, mailer } = ctx;
  const r = guardedRouter("/api");
  const loginLimiter = rateLimit({
    windowMs: 15 * 60_000,
    limit: config.loginRateLimit,
    standardHeaders: "draft-8",
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    message: { error: "Too many failed sign-ins. Wait 15 minutes and try again.", code: "rate-limited" },
  });

  r.post("/auth/login", "public", loginLimiter, async (req, res) => {
    const body = parseOr400(loginBody, req.body);
    const email = body.email.toLowerCase();
    const row = await db("users").whereRaw("lower(email) = ?", [email]).first();
    const ok = row && row.active && row.password_hash && (await checkPassword(body.password, row.password_hash));
    if (!ok || !isRole(row.role)) {
      await audit(db, { actorLabel: email, action: "sign-in.failed", ip: req.ip });
      throw unauthorized("Wrong e-mail or password.");
    }
    const user = { id: row.id, email: row.email, name: row.name, role: row.role };
    await db("users").where({ id: row.id }).update({ last_sign_in_at: db.fn.now() });
    await audit(db, { actor: user, action: "sign-in", ip: req.ip });
    res.cookie(SESSION_COOKIE, signSession(config, user), cookieOptions(config));
    res.json({ user, permissions: permissionsOf(user.role) });
  });

  r.post("/auth/logout", "public", async (req, res) => {
    if (req.user) await audit(db, { actor: req.user, action: "sign-out", ip: req.ip });
    const { maxAge: _m, ...opts } = cookieOptions(config);
    res.clearCookie(SESSION_COOKIE, opts);
    res.status(204).end();
  });

  r.get("/me", "session", (req, res) => {
    res.json({ user: req.user, permissions: permissionsOf(req.user!.role) });
  });

  // Password reset: always answers 202 so the form does not tell who has an account.
  r.post("/auth/forgot", "public", loginLimiter, async (req, res) => {
    const { email } = parseOr400(forgotBody, req.body);
    const row = await db("users").whereRaw("lower(email) = ?", [email.toLowerCase()]).andWhere({ active: true }).first();
    if (row) {
      const token = await createUserToken(db, row.id, "reset", 1);
      const link = `${config.publicUrl}/set-password?token=${token}`;
      await mailer.send({
        to: row.email,
        subject: "Barhound: reset your password",
        text: `Hello ${row.name},\n\nSomeone asked to reset the password of your Barhound account. Open this link within one hour to choose a new one:\n\n${link}\n\nIf it was not you, ignore this message.`,
      });
      await audit(db, { actor: { id: row.id, email: row.email }, action: "password.reset-requested", ip: req.ip });
    }
    res.status(202).json({ ok: true });
  });

  r.get("/auth/token/:token", "public", async (req, res) => {
    const found = await findUsableToken(db, String(req.params.token));
    if ("problem" in found) throw badRequest(found.problem);
    const user = await db("users").where({ id: found.row.user_id }).first("email", "name");
    res.json({ kind: found.row.kind, email: user.email, name: user.name });
  });

  // Completes both an invitation and a reset: sets the password, uses the token up.
  r.post("/auth/set-password", "public", async (req, res) => {
    const body = parseOr400(setPasswordBody, req.body);
    const found = await findUsableToken(db, body.token);
    if ("problem" in found) throw badRequest(found.problem, { token: found.problem });
    const hash = await hashPassword(body.password);
    await db.transaction(async (trx) => {
      const used = await trx("user_tokens").where({ id: found.row.id }).whereNull("used_at").update({ used_at: trx.fn.now() });
      if (used !== 1) throw badRequest("This link has already been used. Ask for a new one.");
      await trx("users").where({ id: found.row.user_id }).update({ password_hash: hash, updated_at: trx.fn.now() });
      const u = await trx("users").where({ id: found.row.user_id }).first("id", "email");
      await audit(trx, { actor: u, action: found.row.kind === "invite" ? "invite.accepted" : "password.reset", ip: req.ip });
    });
    res.json({ ok: true });
  });

  return r.router;
}
