import type { ReactNode } from "react";
import { errorMessage } from "../lib/api.ts";

const TONE = {
  error: "border-danger/30 bg-danger-soft text-danger",
  success: "border-ok/30 bg-ok-soft text-ok",
  info: "border-brand/25 bg-brand-soft text-brand-strong",
  caution: "border-caution/30 bg-caution-soft text-caution",
};

export function Alert({ tone = "info", children, title }: { tone?: keyof typeof TONE; children?: ReactNode; title?: ReactNode }) {
  return (
    <div role={tone === "error" ? "alert" : "status"} className={`rounded-md border px-3 py-2 [overflow-wrap:anywhere] ${TONE[tone]}`}>
      {title && <p className="font-semibold">{title}</p>}
      {children}
    </div>
  );
}

/** The message of a failed request, or nothing. */
export function ErrorNote({ error }: { error: unknown }) {
  if (!error) return null;
  return <Alert tone="error">{errorMessage(error)}</Alert>;
}
