import { z } from "zod";
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { parseOr400 } from "../errors.ts";

const query = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
  action: z.string().optional(),
  subjectType: z.string().optional(),
  subjectId: z.string().optional(),
});

export function auditRoutes(ctx: AppContext) {
  const { db } = ctx;
  const r = guardedRouter("/api");
  r.get("/audit", "audit.read", async (req, res) => {
    const q = parseOr400(query, req.query);
    const base = db("audit_log");
    if (q.action) base.where("action", "like", `${q.action}%`);
    if (q.subjectType) base.where({ subject_type: q.subjectType });
    if (q.subjectId) base.where({ subject_id: q.subjectId });
    const [{ count }] = await base.clone().count({ count: "*" });
    const rows = await base.orderBy("id", "desc").limit(q.pageSize).offset((q.page - 1) * q.pageSize);
    res.json({
      items: rows.map((a) => ({ id: a.id, at: a.at, actor: a.actor_label, action: a.action, subjectType: a.subject_type, subjectId: a.subject_id, details: a.details })),
      total: Number(count),
      page: q.page,
      pageSize: q.pageSize,
    });
  });
  return r.router;
}
