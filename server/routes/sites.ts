// Sites and their areas: GET /sites (anyone signed in), create and rename (admin).
import { areaBody, siteBody, sitePatchBody } from "../../src/shared/schemas/sites.ts";
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { conflict, notFound, parseOr400 } from "../errors.ts";
import { audit } from "../audit.ts";
import { idParam } from "../captures/paging.ts";


const isUnique = (err: unknown) => (err as { code?: string }).code === "23505";

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

  return r.router;
}
