import { SMTPServer } from "smtp-server";
import { simpleParser } from "mailparser";
import type { Knex } from "knex";

/**
 * The local e-mail fake: an SMTP server on loopback that accepts every message and stores it in
 * the caught_mail table, where the admin-only Outbox screen lists it. Development and tests only.
 */
export async function startMailFake(opts: { db: Knex; port: number; host?: string }): Promise<{ port: number; close: () => Promise<void> }> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    logger: false,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          const to = Array.isArray(mail.to) ? mail.to.map((a) => a.text).join(", ") : (mail.to?.text ?? "");
          await opts.db("caught_mail").insert({
            mail_from: mail.from?.text ?? null,
            mail_to: to,
            subject: mail.subject ?? "",
            text_body: mail.text ?? "",
            html_body: typeof mail.html === "string" ? mail.html : null,
            attachments: JSON.stringify(
              mail.attachments.map((a) => ({ filename: a.filename, contentType: a.contentType, size: a.size, content: a.content.toString("base64") })),
            ),
          });
          callback();
        })
        .catch((err) => callback(err));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, opts.host ?? "127.0.0.1", () => resolve());
  });
  const address = (server as unknown as { server: { address(): { port: number } } }).server.address();
  return { port: address.port, close: () => new Promise<void>((r) => server.close(() => r())) };
}
