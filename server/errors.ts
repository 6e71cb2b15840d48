import type { ErrorRequestHandler } from "express";
import { ZodError, type ZodType } from "zod";

/** An error with an HTTP status and a message meant for the person using the API. */
export class HttpError extends Error {
  constructor(
    public status: number,
    message: string,
    public fields?: Record<string, string>,
    public code?: string,
  ) {
    super(message);
  }
}

export const badRequest = (message: string, fields?: Record<string, string>) => new HttpError(400, message, fields, "bad-request");
export const notFound = (what = "Not found") => new HttpError(404, what, undefined, "not-found");
export const forbidden = (message = "Your role may not do this.") => new HttpError(403, message, undefined, "forbidden");
export const unauthorized = (message = "Sign in first.") => new HttpError(401, message, undefined, "unauthorized");
export const conflict = (message: string) => new HttpError(409, message, undefined, "conflict");

/** Field path → first message, for 400 answers. */
export function zodFields(err: ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const issue of err.issues) {
    const key = issue.path.length ? issue.path.join(".") : "_";
    if (!(key in out)) out[key] = issue.message;
  }
  return out;
}

/** Parse with a zod schema or throw a 400 with field messages. */
export function parseOr400<T>(schema: ZodType<T>, value: unknown, what = "Invalid request"): T {
  const r = schema.safeParse(value);
  if (!r.success) throw badRequest(what, zodFields(r.error));
  return r.data;
}

export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  if (err instanceof HttpError) {
    res.status(err.status).json({ error: err.message, code: err.code, ...(err.fields ? { fields: err.fields } : {}) });
    return;
  }
  if (err instanceof ZodError) {
    res.status(400).json({ error: "Invalid request", code: "bad-request", fields: zodFields(err) });
    return;
  }
  const status = typeof err?.status === "number" ? err.status : typeof err?.statusCode === "number" ? err.statusCode : 500;
  if (status === 400 && err?.type === "entity.parse.failed") {
    res.status(400).json({ error: "The request body is not valid JSON.", code: "bad-json" });
    return;
  }
  if (status >= 500) (req as { log?: { error: (o: unknown, m: string) => void } }).log?.error({ err }, "request failed");
  res.status(status).json({ error: status >= 500 ? "Something went wrong on the server." : String(err?.message ?? "Error") });
};
