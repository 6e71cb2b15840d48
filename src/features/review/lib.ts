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

/** A verdict in words, as the capture page's verdict history says it. */
export const VERDICT_WORDS: Record<string, string> = { confirmed: "Confirmed", dismissed: "Dismissed", remeasure: "Re-measure asked" };

/** Where a finding stands: its latest verdict (word, who, when), or waiting for one. */
export type VerdictState = { waiting: true } | { waiting: false; verdict: string; word: string; by: string | null; at: string | null };

export function verdictState(f: { status: string; verdicts?: { verdict: string; analystName: string | null; createdAt: string }[] | null }): VerdictState {
  if (f.status === "open") return { waiting: true };
  const latest = f.verdicts?.length ? f.verdicts[f.verdicts.length - 1] : null; // oldest first
  const verdict = latest?.verdict ?? f.status; // a verdict moves the status to its own value
  return { waiting: false, verdict, word: VERDICT_WORDS[verdict] ?? verdict, by: latest?.analystName ?? null, at: latest?.createdAt ?? null };
}
