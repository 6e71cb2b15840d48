import nodemailer from "nodemailer";
import type { Config } from "../config.ts";

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
  attachments?: { filename: string; content: string | Buffer; contentType?: string }[];
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<void>;
}

/** Mail goes through SMTP: the local fake in development and tests, a real relay in production. */
export function createMailer(config: Config): Mailer {
  const transport = nodemailer.createTransport({
    host: config.smtp.host,
    port: config.smtp.port,
    secure: config.smtp.secure,
    auth: config.smtp.user ? { user: config.smtp.user, pass: config.smtp.pass ?? "" } : undefined,
    tls: { rejectUnauthorized: config.env === "production" },
    ignoreTLS: config.mailFake,
  });
  return {
    async send(mail) {
      await transport.sendMail({ from: config.mailFrom, ...mail });
    },
  };
}
