import { z } from "zod";
import { inviteBody, userPatchBody } from "../../src/shared/schemas/users.ts";
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { conflict, notFound, parseOr400, badRequest } from "../errors.ts";
import { audit } from "../audit.ts";
import { createUserToken } from "../tokens.ts";
import { revokeFeedLink } from "../plan/feed-links.ts";

const idParam = z.coerce.number().int().positive();

const publicUser = (u: Record<string, unknown>) => ({
  id: u.id,
  email: u.email,
  name: u.name,
  role: u.role,
  active: u.active,
  invited: !u.password_hash,
  lastSignInAt: u.last_sign_in_at,
  createdAt: u.created_at,
});

export function userRoutes(ctx: AppContext) {
  const { db, config, mailer } = ctx;
  const r = guardedRouter("/api");

  r.get("/users", "users.manage", async (_req, res) => {
    const rows = await db("users").orderBy("name");
    res.json({ items: rows.map(publicUser) });
  });

  // People that work can be assigned to (for planners' forms).
  r.get("/people", "fleet.read", async (req, res) => {
    const q = db("users").where({ active: true }).orderBy("name").select("id", "name", "role");
    if (typeof req.query.role === "string") q.where({ role: req.query.role });
    res.json({ items: await q });
  });

  r.post("/users/invite", "users.manage", async (req, res) => {
    const body = parseOr400(inviteBody, req.body);
    const email = body.email.toLowerCase();
    if (await db("users").whereRaw("lower(email) = ?", [email]).first()) throw conflict("A user with this e-mail already exists.");
    const [user] = await db("users").insert({ email, name: body.name, role: body.role, active: true }).returning("*");
    const token = await createUserToken(db, user.id, "invite", 72);
    const link = `${config.publicUrl}/set-password?token=${token}`;
    await mailer.send({
      to: email,
      subject: "You are invited to Barhound",
      text: `Hello ${body.name},\n\n${req.user!.name} has invited you to Barhound as ${body.role}. Open this link within 72 hours to choose your password:\n\n${link}\n`,
    });
    await audit(db, { actor: req.user, action: "user.invited", subjectType: "user", subjectId: user.id, details: { email, role: body.role }, ip: req.ip });
    res.status(201).json(publicUser(user));
  });

  r.patch("/users/:id", "users.manage", async (req, res) => {
    const id = parseOr400(idParam, req.params.id);
    const body = parseOr400(userPatchBody, req.body);
    const before = await db("users").where({ id }).first();
    if (!before) throw notFound("No such user.");
    if (id === req.user!.id && (body.active === false || (body.role && body.role !== "admin")))
      throw badRequest("You cannot remove your own admin access.");
    // One transaction: the change, its audit lines, and on deactivation the revocation of their calendar feed link
    // (a reactivated user makes a new one). The user row is updated first, so a link being issued at the same moment
    // (issueFeedLink locks that row) waits, then sees the user inactive and makes none.
    const after = await db.transaction(async (trx) => {
      const [row] = await trx("users").where({ id }).update({ ...body, updated_at: trx.fn.now() }).returning("*");
      if (body.role && body.role !== before.role)
        await audit(trx, { actor: req.user, action: "user.role-changed", subjectType: "user", subjectId: id, details: { from: before.role, to: body.role }, ip: req.ip });
      if (body.active !== undefined && body.active !== before.active)
        await audit(trx, { actor: req.user, action: body.active ? "user.reactivated" : "user.deactivated", subjectType: "user", subjectId: id, ip: req.ip });
      if (body.active === false) {
        const revoked = await revokeFeedLink(trx, id);
        if (revoked)
          await audit(trx, { actor: req.user, action: "calendar-feed.revoked", subjectType: "user", subjectId: id, details: { tokenPrefix: revoked.prefix, reason: "user deactivated" }, ip: req.ip });
      }
      return row;
    });
    // Their open browser sockets are closed now (on every server process): a deactivated user receives nothing
    // more, and after a role change the browser reconnects into the rooms of the new role.
    const disconnectUser = ctx.services.disconnectUser as ((id: number, reason: "deactivated" | "role-changed") => void) | undefined;
    if (body.active === false && before.active) disconnectUser?.(id, "deactivated");
    else if (body.role && body.role !== before.role) disconnectUser?.(id, "role-changed");
    res.json(publicUser(after));
  });

  return r.router;
}
