// Small pure helpers of the review queue.

/** "3 h", "2 d", "5 wk": how long a finding has waited, from ISO time to now. */
export function ageLabel(iso: string | null | undefined, now = Date.now()): string {
  if (!iso) return "—";
  const ms = now - Date.parse(iso);
  if (!Number.isFinite(ms)) return "—";
  const h = ms / 3_600_000;
  if (h < 1) return `${Math.max(0, Math.round(ms / 60_000))} min`;
  if (h < 48) return `${Math.round(h)} h`;
  const d = h / 24;
  if (d < 21) return `${Math.round(d)} d`;
  return `${Math.round(d / 7)} wk`;
}
