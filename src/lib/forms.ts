// Form validation helpers shared by every form: zod on the client, and the server's 400 `fields` on top.
import type { z } from "zod";
import { ApiError } from "./api.ts";

export type FieldErrors = Record<string, string>;

/** zod issues → field path → first message ("_" for form-level issues). */
export function zodFieldErrors(error: z.ZodError): FieldErrors {
  const out: FieldErrors = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.map(String).join(".") : "_";
    if (!(key in out)) out[key] = issue.message;
  }
  return out;
}

export type ValidationResult<T> = { ok: true; data: T } | { ok: false; errors: FieldErrors };

export function validate<S extends z.ZodType>(schema: S, values: unknown): ValidationResult<z.output<S>> {
  const r = schema.safeParse(values);
  return r.success ? { ok: true, data: r.data } : { ok: false, errors: zodFieldErrors(r.error) };
}

/** The server's field messages of a 400 answer (empty for anything else). */
export function serverFieldErrors(err: unknown): FieldErrors {
  return err instanceof ApiError && err.fields ? { ...err.fields } : {};
}

/** A form-level message for a failed submit, unless every problem is already shown next to a field. */
export function formLevelMessage(err: unknown, knownFields: readonly string[]): string | null {
  if (!err) return null;
  if (err instanceof ApiError) {
    const fields = Object.keys(err.fields ?? {});
    if (fields.length && fields.every((f) => knownFields.includes(f))) return null;
    const extra = fields.filter((f) => !knownFields.includes(f)).map((f) => err.fields![f]);
    return extra.length ? `${err.message}: ${extra.join(" ")}` : err.message;
  }
  return err instanceof Error ? err.message : "Something went wrong.";
}
