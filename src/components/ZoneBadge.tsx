import { parseZone, ZONES, type Zone } from "../lib/grades.ts";

const STYLE: Record<Zone, string> = {
  A: "bg-surface text-ink border-line-strong",
  B: "bg-grade-1 text-grade-1-ink border-grade-3",
  C: "bg-grade-3 text-grade-3-ink border-grade-4",
  D: "bg-grade-5 text-grade-5-ink border-grade-5",
};

/** A vibration zone (ISO 20816-3) shown as its letter; the meaning is in the tooltip and for screen readers. */
export function ZoneBadge({ zone, withWord, className = "" }: { zone: unknown; withWord?: boolean; className?: string }) {
  const z = parseZone(zone);
  if (!z) return <span className={`text-ink-faint ${className}`} aria-label="No vibration zone">—</span>;
  const meaning = ZONES.find((x) => x.zone === z)!.meaning;
  return (
    <span className={`inline-flex items-center gap-1.5 ${className}`} title={meaning} role="img" aria-label={`Vibration ${meaning}`} data-zone={z}>
      {withWord && <span className="text-ink-muted">Zone</span>}
      <span className={`num inline-grid size-5.5 place-items-center rounded-full border text-caption font-semibold ${STYLE[z]}`}>{z}</span>
    </span>
  );
}
