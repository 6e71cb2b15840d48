// Form validation helpers shared by every form: zod on the client, and the server's 400 `fields` on top.
// The rules themselves are the server's request schemas (src/shared/schemas/); a form wraps them with the
// preprocessing below, since inputs and selects give strings, and only adds rules of its own on top.
import { z } from "zod";
import { ApiError } from "./api.ts";

/** What an input or select gives for a number: "" → not given, "12" → 12, "0,5" → 0.5 (a decimal comma is fine). */
export function inputNumber(v: unknown): unknown {
  if (v === null || v === undefined) return undefined;
  if (typeof v !== "string") return v;
  const s = v.trim();
  return s === "" ? undefined : Number(s.replace(",", "."));
}

/** A shared number rule for a text input or select: the rule and its messages stay the server's. */
export const numberInput = <S extends z.ZodType>(rule: S) => z.preprocess(inputNumber, rule);

/** A shared optional rule for a text input: an empty (or blank) field means "not given". */
export const optionalInput = <S extends z.ZodType>(rule: S) => z.preprocess((v) => (typeof v === "string" && v.trim() === "" ? undefined : v), rule);

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
