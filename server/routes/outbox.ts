import { z } from "zod";
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { notFound, parseOr400 } from "../errors.ts";

const idParam = z.coerce.number().int().positive();

/** Mail caught by the local SMTP fake (development and tests). */
export function outboxRoutes(ctx: AppContext) {
  const { db } = ctx;
  const r = guardedRouter("/api");
  r.get("/outbox", "outbox.read", async (_req, res) => {
    const rows = await db("caught_mail").orderBy("id", "desc").limit(200).select("id", "received_at", "mail_from", "mail_to", "subject", "text_body", "attachments");
    res.json({
      items: rows.map((m) => ({
        id: m.id,
        receivedAt: m.received_at,
        from: m.mail_from,
        to: m.mail_to,
        subject: m.subject,
        text: m.text_body,
        attachments: (m.attachments ?? []).map((a: { filename: string; contentType: string; size: number }) => ({ filename: a.filename, contentType: a.contentType, size: a.size })),
      })),
    });
  });
  r.get("/outbox/:id/attachments/:index", "outbox.read", async (req, res) => {
    const id = parseOr400(idParam, req.params.id);
    const m = await db("caught_mail").where({ id }).first("attachments");
    const a = m?.attachments?.[Number(req.params.index)];
    if (!a) throw notFound("No such attachment.");
    res.type(a.contentType).attachment(a.filename).send(Buffer.from(a.content, "base64"));
  });
  return r.router;
}
