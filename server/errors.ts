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

/**
 * Field path → first message, for 400 answers. A field the schema does not know (a `.strict()` object) is named
 * on its own path, e.g. `{ "colour": "Unknown field \"colour\"." }`, rather than in one message on the object.
 */
export function zodFields(err: ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  const put = (path: PropertyKey[], message: string) => {
    const key = path.length ? path.map(String).join(".") : "_";
    if (!(key in out)) out[key] = message;
  };
  for (const issue of err.issues) {
    if (issue.code === "unrecognized_keys") for (const k of issue.keys) put([...issue.path, k], `Unknown field "${k}".`);
    else put(issue.path, issue.message);
  }
  return out;
}

/** Parse with a zod schema or throw a 400 with field messages. */
export function parseOr400<T>(schema: ZodType<T>, value: unknown, what = "Invalid request"): T {
  const r = schema.safeParse(value);
  if (!r.success) throw badRequest(what, zodFields(r.error));
  return r.data;
}

/** What a parent table's row is called in a message. */
const ROW_NAMES: Record<string, string> = {
  sites: "site",
  areas: "area (or its site)",
  assets: "motor",
  measurement_points: "measurement point",
  users: "user",
  gateways: "gateway",
  captures: "capture",
  analyses: "analysis",
  findings: "finding",
  inspections: "inspection",
};

/**
 * A foreign-key violation (PostgreSQL 23503) on insert or update of a child row whose parent is not there: the
 * parent was deleted while the request waited for its lock (a motor added while its site is deleted), or was never
 * there. A 409 that names what is gone; null for anything else, including a delete of a row still referred to
 * ("is still referenced from"), which the routes answer themselves.
 */
export function missingParent(err: unknown): HttpError | null {
  const e = err as { code?: unknown; detail?: unknown } | null;
  if (e?.code !== "23503" || typeof e.detail !== "string") return null;
  const m = /is not present in table "([^"]+)"/.exec(e.detail);
  if (!m) return null;
  const what = ROW_NAMES[m[1]] ?? "record it refers to";
  return conflict(`The ${what} no longer exists (it may have been deleted while this change waited). Nothing was saved.`);
}

export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  const gone = missingParent(err);
  if (gone) err = gone;
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
