// Sites and their areas: GET /sites (anyone signed in), create, edit and delete (admin). A site or area that still
// holds motors is never deleted: the answer is a 409 that says how many and what to do, and nothing changes.
import { areaBody, siteBody, sitePatchBody } from "../../src/shared/schemas/sites.ts";
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { conflict, notFound, parseOr400 } from "../errors.ts";
import { audit } from "../audit.ts";
import { idParam } from "../captures/paging.ts";


const isUnique = (err: unknown) => (err as { code?: string }).code === "23505";
const isForeignKey = (err: unknown) => (err as { code?: string }).code === "23503";

const motors = (n: number) => (n === 1 ? "1 motor" : `${n} motors`);
const them = (n: number) => (n === 1 ? "it" : "them");

export function siteRoutes(ctx: AppContext) {
  const r = guardedRouter("/api");
  const { db } = ctx;

  const siteOut = async (id: number) => {
    const s = await db("sites").where({ id }).first();
    if (!s) return null;
    const areas = await db("areas").where({ site_id: id }).orderBy("name").select("id", "name");
    return { id: s.id, code: s.code, name: s.name, timezone: s.timezone, areas };
  };

  r.get("/sites", "fleet.read", async (_req, res) => {
    const sites = await db("sites").orderBy("name").select("id", "code", "name", "timezone");
    const areas = await db("areas").orderBy("name").select("id", "site_id", "name");
    res.json({
      items: sites.map((s) => ({ ...s, areas: areas.filter((a) => a.site_id === s.id).map((a) => ({ id: a.id, name: a.name })) })),
    });
  });

  r.post("/sites", "sites.write", async (req, res) => {
    const body = parseOr400(siteBody, req.body);
    try {
      const [row] = await db("sites").insert(body).returning("id");
      await audit(db, { actor: req.user, action: "site.created", subjectType: "site", subjectId: row.id, details: body, ip: req.ip });
      res.status(201).json(await siteOut(row.id));
    } catch (err) {
      if (isUnique(err)) throw conflict(`A site with code ${body.code} already exists.`);
      throw err;
    }
  });

  r.patch("/sites/:id", "sites.write", async (req, res) => {
    const id = idParam(req.params.id, "site");
    const body = parseOr400(sitePatchBody, req.body);
    if (!(await db("sites").where({ id }).first())) throw notFound("No such site.");
    try {
      if (Object.keys(body).length) await db("sites").where({ id }).update({ ...body, updated_at: db.fn.now() });
    } catch (err) {
      if (isUnique(err)) throw conflict(`A site with code ${body.code} already exists.`);
      throw err;
    }
    await audit(db, { actor: req.user, action: "site.updated", subjectType: "site", subjectId: id, details: body, ip: req.ip });
    res.json(await siteOut(id));
  });

  r.post("/sites/:id/areas", "sites.write", async (req, res) => {
    const siteId = idParam(req.params.id, "site");
    const body = parseOr400(areaBody, req.body);
    if (!(await db("sites").where({ id: siteId }).first())) throw notFound("No such site.");
    try {
      const [row] = await db("areas").insert({ site_id: siteId, name: body.name }).returning(["id", "name"]);
      await audit(db, { actor: req.user, action: "area.created", subjectType: "area", subjectId: row.id, details: { siteId, name: body.name }, ip: req.ip });
      res.status(201).json({ id: row.id, name: row.name, siteId });
    } catch (err) {
      if (isUnique(err)) throw conflict(`This site already has an area named ${body.name}.`);
      throw err;
    }
  });

  r.patch("/areas/:id", "sites.write", async (req, res) => {
    const id = idParam(req.params.id, "area");
    const body = parseOr400(areaBody, req.body);
    const area = await db("areas").where({ id }).first();
    if (!area) throw notFound("No such area.");
    try {
      await db("areas").where({ id }).update({ name: body.name });
    } catch (err) {
      if (isUnique(err)) throw conflict(`This site already has an area named ${body.name}.`);
      throw err;
    }
    await audit(db, { actor: req.user, action: "area.renamed", subjectType: "area", subjectId: id, details: { from: area.name, to: body.name }, ip: req.ip });
    res.json({ id, name: body.name, siteId: area.site_id });
  });

  // The area row is locked first, so no motor can be added to it (its foreign key check waits) while it is counted.
  r.delete("/areas/:id", "sites.write", async (req, res) => {
    const id = idParam(req.params.id, "area");
    await db.transaction(async (trx) => {
      const area = await trx("areas as ar").join("sites as s", "s.id", "ar.site_id").where("ar.id", id).forUpdate("ar").first("ar.id", "ar.name", "ar.site_id", "s.name as site_name");
      if (!area) throw notFound("No such area.");
      const [{ count }] = await trx("assets").where({ area_id: id }).count<{ count: string }[]>({ count: "*" });
      if (Number(count) > 0)
        throw conflict(`Area ${area.name} (${area.site_name}) was not deleted. It still holds ${motors(Number(count))}: move ${them(Number(count))} to another area or delete ${them(Number(count))} first.`);
      try {
        await trx("areas").where({ id }).delete();
      } catch (err) {
        if (isForeignKey(err)) throw conflict(`Area ${area.name} (${area.site_name}) was not deleted. It still holds motors: move them to another area or delete them first.`);
        throw err;
      }
      await audit(trx, { actor: req.user, action: "area.deleted", subjectType: "area", subjectId: id, details: { siteId: area.site_id, name: area.name }, ip: req.ip });
    });
    res.status(204).end();
  });

  // A site goes with its (empty) areas. An active gateway of the site is a refusal too: with its site gone it would
  // no longer be held to one site. Revoked gateways stay listed, without a site (the audit row keeps which).
  r.delete("/sites/:id", "sites.write", async (req, res) => {
    const id = idParam(req.params.id, "site");
    await db.transaction(async (trx) => {
      const site = await trx("sites").where({ id }).forUpdate().first();
      if (!site) throw notFound("No such site.");
      const areas = await trx("areas").where({ site_id: id }).orderBy("name").forUpdate().select("id", "name");
      const held = await trx("assets as a")
        .join("areas as ar", "ar.id", "a.area_id")
        .where("ar.site_id", id)
        .groupBy("ar.name")
        .orderBy("ar.name")
        .select("ar.name")
        .count<{ name: string; count: string }[]>({ count: "*" });
      const gateways = await trx("gateways").where({ site_id: id }).select("id", "name", "revoked_at");
      const active = gateways.filter((g) => !g.revoked_at);
      const problems: string[] = [];
      if (held.length) {
        const total = held.reduce((n, h) => n + Number(h.count), 0);
        const where = held.map((h) => `${h.name}: ${h.count}`).join(", ");
        problems.push(`It still holds ${motors(total)} (${where}): move ${them(total)} to an area of another site or delete ${them(total)} first.`);
      }
      if (active.length)
        problems.push(`It has ${active.length === 1 ? "an active gateway" : `${active.length} active gateways`} (${active.map((g) => g.name).join(", ")}): revoke ${active.length === 1 ? "it" : "them"} under Admin → Gateways first.`);
      if (problems.length) throw conflict(`Site ${site.code} · ${site.name} was not deleted. ${problems.join(" ")}`);
      try {
        await trx("sites").where({ id }).delete(); // its areas go with it (ON DELETE CASCADE)
      } catch (err) {
        if (isForeignKey(err)) throw conflict(`Site ${site.code} · ${site.name} was not deleted. It still holds motors: move them to an area of another site or delete them first.`);
        throw err;
      }
      await audit(trx, {
        actor: req.user,
        action: "site.deleted",
        subjectType: "site",
        subjectId: id,
        details: { code: site.code, name: site.name, timezone: site.timezone, areas, revokedGateways: gateways.map((g) => g.id) },
        ip: req.ip,
      });
    });
    res.status(204).end();
  });

  return r.router;
}
