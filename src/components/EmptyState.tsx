import type { ReactNode } from "react";

export function EmptyState({ title, children, action }: { title: string; children?: ReactNode; action?: ReactNode }) {
  return (
    <div className="flex flex-col items-center gap-2 rounded-md border border-dashed border-line-strong bg-canvas px-6 py-8 text-center">
      <svg aria-hidden="true" viewBox="0 0 24 24" className="size-6 text-ink-faint" fill="none" stroke="currentColor" strokeWidth="1.5">
        <circle cx="12" cy="12" r="8.5" />
        <path d="M8 12h8" />
      </svg>
      <p className="font-medium text-ink">{title}</p>
      {children && <div className="max-w-md text-ink-muted">{children}</div>}
      {action}
    </div>
  );
}
