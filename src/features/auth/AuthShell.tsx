import { useEffect, type ReactNode } from "react";
import { Logo } from "../../components/Logo.tsx";

/** The frame of the signed-out screens. */
export function AuthShell({ title, children, footer }: { title: string; children: ReactNode; footer?: ReactNode }) {
  useEffect(() => {
    document.title = `${title} · Barhound`;
  }, [title]);
  return (
    <div className="flex min-h-screen flex-col items-center justify-center bg-canvas px-4 py-10">
      <div className="w-full max-w-sm">
        <div className="mb-6 flex items-center gap-2.5">
          <Logo className="size-9" />
          <div>
            <p className="text-heading font-semibold leading-tight">Barhound</p>
            <p className="text-caption text-ink-muted">Rotor, load and vibration checks for motor fleets</p>
          </div>
        </div>
        <main className="rounded-lg border border-line bg-surface p-6 shadow-card">
          <h1 className="mb-4 text-title font-semibold tracking-tight">{title}</h1>
          {children}
        </main>
        {footer && <div className="mt-4 text-center text-caption text-ink-muted">{footer}</div>}
      </div>
    </div>
  );
}
