import { useEffect, type ReactNode } from "react";

export interface PageProps {
  title: string;
  /** One line under the title. */
  description?: ReactNode;
  /** Buttons and links on the right of the header. */
  actions?: ReactNode;
  /** Small text above the title (e.g. the site or a back link). */
  eyebrow?: ReactNode;
  children?: ReactNode;
  /** Wider pages (spectra, tables). */
  wide?: boolean;
}

/** A screen's header and body. Sets the document title. */
export function Page({ title, description, actions, eyebrow, children, wide }: PageProps) {
  useEffect(() => {
    document.title = `${title} · Barhound`;
  }, [title]);
  return (
    <div className={`mx-auto w-full ${wide ? "max-w-[1600px]" : "max-w-6xl"} px-4 py-6 sm:px-6`}>
      <header className="mb-5 flex flex-wrap items-end justify-between gap-3">
        <div className="min-w-0">
          {eyebrow && <div className="mb-1 text-caption text-ink-muted">{eyebrow}</div>}
          <h1 className="text-title font-semibold tracking-tight text-ink">{title}</h1>
          {description && <p className="mt-1 text-ink-muted">{description}</p>}
        </div>
        {actions && <div className="flex flex-wrap items-center gap-2">{actions}</div>}
      </header>
      {children}
    </div>
  );
}

/** A titled block inside a page. */
export function Section({ title, actions, children, className = "" }: { title?: ReactNode; actions?: ReactNode; children?: ReactNode; className?: string }) {
  return (
    <section className={`rounded-md border border-line bg-surface p-4 shadow-card ${className}`}>
      {(title || actions) && (
        <div className="mb-3 flex flex-wrap items-center justify-between gap-2">
          {title && <h2 className="text-heading font-semibold">{title}</h2>}
          {actions}
        </div>
      )}
      {children}
    </section>
  );
}
