import type { ReactNode } from "react";

export const SAFETY_TEXT =
  "Measuring on energised equipment is for qualified persons only. Wear the right protective equipment, and follow local electrical codes and your site's rules.";

/** The caution shown wherever someone is about to measure on energised equipment. */
export function SafetyCaution({ children, compact }: { children?: ReactNode; compact?: boolean }) {
  return (
    <aside
      role="note"
      aria-label="Safety caution"
      data-testid="safety-caution"
      className={`flex gap-3 rounded-md border border-caution/30 bg-caution-soft text-caution ${compact ? "p-2.5 text-caption" : "p-4"}`}
    >
      <svg aria-hidden="true" viewBox="0 0 24 24" className={`${compact ? "size-4" : "size-5"} shrink-0`} fill="none" stroke="currentColor" strokeWidth="1.8">
        <path d="M12 3.5 2.8 19.5h18.4L12 3.5Z" strokeLinejoin="round" />
        <path d="M12 10v4.5M12 17h.01" strokeLinecap="round" />
      </svg>
      <div>
        <p className="font-semibold">Caution: live equipment</p>
        <p>{SAFETY_TEXT}</p>
        {children}
      </div>
    </aside>
  );
}
