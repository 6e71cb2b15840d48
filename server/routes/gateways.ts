import { z } from "zod";
import { gatewayBody } from "../../src/shared/schemas/gateways.ts";
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { badRequest, notFound, parseOr400 } from "../errors.ts";
import { audit } from "../audit.ts";
import { createGatewayToken } from "../gateway/tokens.ts";

// Admin: site gateways and their tokens. The token is returned once, at creation; only its sha256 is kept.

const idParam = z.coerce.number().int().positive();
const SORTS = { name: "g.name", createdAt: "g.created_at", lastSeenAt: "g.last_seen_at", siteName: "s.name" } as const;
const listQuery = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
  sort: z
    .string()
    .regex(new RegExp(`^-?(${Object.keys(SORTS).join("|")})$`), `Sort by one of ${Object.keys(SORTS).join(", ")} (prefix - for descending).`)
    .default("name"),
  siteId: z.coerce.number().int().positive().optional(),
  revoked: z.enum(["0", "1"]).optional(),
});

const publicGateway = (g: Record<string, unknown>) => ({
  id: g.id,
  name: g.name,
  siteId: g.site_id,
  siteName: g.site_name ?? null,
  tokenPrefix: `bhg_${g.token_prefix}_…`,
  createdAt: g.created_at,
  createdBy: g.created_by_name ?? null,
  revokedAt: g.revoked_at,
  lastSeenAt: g.last_seen_at,
});

export function gatewayRoutes(ctx: AppContext) {
  const { db } = ctx;
  const r = guardedRouter("/api");

  const base = () =>
    db("gateways as g")
      .leftJoin("sites as s", "s.id", "g.site_id")
      .leftJoin("users as u", "u.id", "g.created_by")
      .select("g.*", "s.name as site_name", "u.name as created_by_name");

  r.get("/gateways", "gateways.manage", async (req, res) => {
    const q = parseOr400(listQuery, req.query);
    const filtered = () => {
      const b = db("gateways as g");
      if (q.siteId) b.where("g.site_id", q.siteId);
      if (q.revoked === "1") b.whereNotNull("g.revoked_at");
      if (q.revoked === "0") b.whereNull("g.revoked_at");
      return b;
    };
    const desc = q.sort.startsWith("-");
    const column = SORTS[q.sort.replace(/^-/, "") as keyof typeof SORTS];
    const rows = await base()
      .whereIn("g.id", filtered().select("g.id"))
      .orderByRaw(`${column} ${desc ? "desc" : "asc"} nulls last, g.id`)
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize);
    const [{ count }] = await filtered().count<{ count: string }[]>("* as count");
    res.json({ items: rows.map(publicGateway), total: Number(count), page: q.page, pageSize: q.pageSize });
  });

  r.post("/gateways", "gateways.manage", async (req, res) => {
    const body = parseOr400(gatewayBody, req.body);
    const site = await db("sites").where({ id: body.siteId }).first("id");
    if (!site) throw badRequest("Invalid request", { siteId: `There is no site with id ${body.siteId}.` });
    const { token, prefix, hash } = createGatewayToken();
    const [row] = await db("gateways")
      .insert({ name: body.name, site_id: body.siteId, token_prefix: prefix, token_hash: hash, created_by: req.user!.id })
      .returning("*");
    await audit(db, { actor: req.user, action: "gateway.created", subjectType: "gateway", subjectId: row.id, details: { name: body.name, siteId: body.siteId, tokenPrefix: prefix }, ip: req.ip });
    const full = await base().where("g.id", row.id).first();
    res.status(201).json({ ...publicGateway(full), token });
  });

  r.post("/gateways/:id/revoke", "gateways.manage", async (req, res) => {
    const id = parseOr400(idParam, req.params.id);
    const before = await db("gateways").where({ id }).first();
    if (!before) throw notFound("No such gateway.");
    if (!before.revoked_at) {
      await db("gateways").where({ id }).update({ revoked_at: db.fn.now() });
      await audit(db, { actor: req.user, action: "gateway.revoked", subjectType: "gateway", subjectId: id, details: { name: before.name, tokenPrefix: before.token_prefix }, ip: req.ip });
    }
    // Also on a repeated revoke: a device that somehow kept a connection is dropped now.
    const disconnect = ctx.services.disconnectGateway as ((id: number, message: string) => void) | undefined;
    disconnect?.(id, `The token of gateway "${before.name}" (bhg_${before.token_prefix}_…) was revoked by an admin. Ask an admin for a new token.`);
    res.json(publicGateway(await base().where("g.id", id).first()));
  });

  return r.router;
}
