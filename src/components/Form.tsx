import { useId, useState, type FormEvent, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes, type TextareaHTMLAttributes } from "react";
import type { z } from "zod";
import { formLevelMessage, serverFieldErrors, validate, type FieldErrors } from "../lib/forms.ts";
import { Alert } from "./Alert.tsx";

const CONTROL =
  "rounded-md border border-line-strong bg-surface px-2.5 py-1.5 text-body text-ink placeholder:text-ink-faint focus:border-brand focus:outline-none focus:ring-2 focus:ring-brand/20 aria-invalid:border-danger disabled:bg-sunken";

export interface FieldProps {
  label: ReactNode;
  error?: string | null;
  hint?: ReactNode;
  /** Render prop gets the id and aria props for the control. */
  children: (p: { id: string; "aria-invalid"?: true; "aria-describedby"?: string }) => ReactNode;
  className?: string;
  optional?: boolean;
}

/** A label, a control, a hint and the field's error message (client or server). */
export function Field({ label, error, hint, children, className = "", optional }: FieldProps) {
  const id = useId();
  const describedBy = [hint ? `${id}-hint` : "", error ? `${id}-err` : ""].filter(Boolean).join(" ") || undefined;
  return (
    <div className={`flex flex-col gap-1 ${className}`}>
      <label htmlFor={id} className="text-caption font-medium text-ink-muted">
        {label}
        {optional && <span className="font-normal text-ink-faint"> (optional)</span>}
      </label>
      {children({ id, "aria-invalid": error ? true : undefined, "aria-describedby": describedBy })}
      {hint && !error && (
        <p id={`${id}-hint`} className="text-caption text-ink-faint">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${id}-err`} className="text-caption text-danger">
          {error}
        </p>
      )}
    </div>
  );
}

/** Full width unless the caller sets a width. */
const width = (className: string) => (/(^|\s)(w-|min-w-|max-w-)/.test(className) ? "" : "w-full");

export function TextInput({ className = "", ...p }: InputHTMLAttributes<HTMLInputElement>) {
  return <input className={`${CONTROL} ${width(className)} ${className}`} {...p} />;
}
/** A number input with its unit beside it (the unit is also read out with the value: put it in the label too). */
export function UnitInput({ unit, className = "", ...p }: InputHTMLAttributes<HTMLInputElement> & { unit?: string }) {
  if (!unit) return <TextInput inputMode="decimal" className={`num ${className}`} {...p} />;
  return (
    <div className={`flex items-stretch ${width(className)} ${className}`}>
      <input inputMode="decimal" className={`${CONTROL} num min-w-0 flex-1 rounded-r-none`} {...p} />
      <span aria-hidden="true" className="num inline-flex shrink-0 items-center rounded-r-md border border-l-0 border-line-strong bg-sunken px-2 text-caption text-ink-muted">
        {unit}
      </span>
    </div>
  );
}
export function Select({ className = "", ...p }: SelectHTMLAttributes<HTMLSelectElement>) {
  return <select className={`${CONTROL} ${width(className)} ${className}`} {...p} />;
}
export function TextArea({ className = "", ...p }: TextareaHTMLAttributes<HTMLTextAreaElement>) {
  return <textarea className={`${CONTROL} ${width(className)} min-h-20 ${className}`} {...p} />;
}

export function FormError({ message }: { message: string | null | undefined }) {
  return message ? <Alert tone="error">{message}</Alert> : null;
}

/**
 * Small form state for a zod schema: values, per-field errors (client-side from the schema, then the server's 400
 * `fields`), and a submit handler that only calls `onValid` with parsed data.
 */
export function useZodForm<S extends z.ZodType, V extends Record<string, unknown>>(schema: S, initial: V) {
  const [values, setValues] = useState<V>(initial);
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [submitting, setSubmitting] = useState(false);

  const set = <K extends keyof V>(name: K, value: V[K]) => {
    setValues((v) => ({ ...v, [name]: value }));
    setErrors((e) => {
      if (!(name in e)) return e;
      const { [name as string]: _gone, ...rest } = e;
      return rest;
    });
  };

  const submit = (onValid: (data: z.output<S>) => Promise<unknown> | unknown) => async (ev?: FormEvent) => {
    ev?.preventDefault();
    setFormError(null);
    const r = validate(schema, values);
    if (!r.ok) {
      setErrors(r.errors);
      if (r.errors._) setFormError(r.errors._);
      return;
    }
    setErrors({});
    setSubmitting(true);
    try {
      await onValid(r.data);
    } catch (err) {
      setErrors(serverFieldErrors(err));
      setFormError(formLevelMessage(err, Object.keys(values)));
    } finally {
      setSubmitting(false);
    }
  };

  const reset = (next: V = initial) => {
    setValues(next);
    setErrors({});
    setFormError(null);
  };

  return { values, set, errors, formError, submitting, submit, reset, setValues };
}
