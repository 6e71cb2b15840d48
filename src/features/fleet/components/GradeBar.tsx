// A stacked bar of how many motors sit in each grade. Each segment has its grade's fill AND its own hatch
// pattern, and is labelled with the R-number and count when wide enough (the table beside it has every number),
// so the bar never relies on colour alone.
import type { GradeCounts } from "../api/get-fleet.ts";

export const GRADE_KEYS = ["R5", "R4", "R3", "R2", "R1", "notAssessable", "noData"] as const;
export type GradeKey = (typeof GRADE_KEYS)[number];

const FILL: Record<GradeKey, string> = {
  R1: "var(--color-grade-1)",
  R2: "var(--color-grade-2)",
  R3: "var(--color-grade-3)",
  R4: "var(--color-grade-4)",
  R5: "var(--color-grade-5)",
  notAssessable: "var(--color-grade-na)",
  noData: "var(--color-surface)",
};
const INK: Record<GradeKey, string> = {
  R1: "var(--color-grade-1-ink)",
  R2: "var(--color-grade-2-ink)",
  R3: "var(--color-grade-3-ink)",
  R4: "var(--color-grade-4-ink)",
  R5: "var(--color-grade-5-ink)",
  notAssessable: "var(--color-grade-na-ink)",
  noData: "var(--color-ink-muted)",
};
export const SHORT: Record<GradeKey, string> = { R1: "R1", R2: "R2", R3: "R3", R4: "R4", R5: "R5", notAssessable: "N/A", noData: "none" };
export const LONG: Record<GradeKey, string> = {
  R1: "R1 Sound",
  R2: "R2 Watch",
  R3: "R3 Developing",
  R4: "R4 Serious",
  R5: "R5 Severe",
  notAssessable: "Not assessable",
  noData: "No data",
};

/** Hatch patterns, denser as the grade worsens; defined once per page by <GradePatterns/>. */
export function GradePatterns() {
  const line = (id: string, gap: number, angle: number, stroke: string, cross = false) => (
    <pattern id={id} patternUnits="userSpaceOnUse" width={gap} height={gap} patternTransform={`rotate(${angle})`}>
      <line x1="0" y1="0" x2="0" y2={gap} stroke={stroke} strokeWidth="1.4" />
      {cross && <line x1="0" y1="0" x2={gap} y2="0" stroke={stroke} strokeWidth="1.4" />}
    </pattern>
  );
  return (
    <svg width="0" height="0" className="absolute" aria-hidden="true">
      <defs>
        {line("bh-hatch-R2", 8, 45, "rgba(58,46,12,0.35)")}
        {line("bh-hatch-R3", 5, 45, "rgba(47,28,5,0.4)")}
        {line("bh-hatch-R4", 5, 45, "rgba(255,255,255,0.45)", true)}
        {line("bh-hatch-notAssessable", 6, -45, "rgba(74,76,80,0.35)")}
        <pattern id="bh-hatch-noData" patternUnits="userSpaceOnUse" width="6" height="6">
          <circle cx="3" cy="3" r="0.9" fill="rgba(89,92,97,0.5)" />
        </pattern>
      </defs>
    </svg>
  );
}

export function GradeBar({ counts, height = 22, label }: { counts: GradeCounts; height?: number; label: string }) {
  const total = GRADE_KEYS.reduce((s, k) => s + counts[k], 0);
  if (!total) return <div className="h-5 rounded-sm border border-dashed border-line-strong" aria-label={`${label}: no motors`} />;
  let x = 0;
  const summary = GRADE_KEYS.filter((k) => counts[k]).map((k) => `${counts[k]} ${LONG[k]}`).join(", ");
  return (
    <svg viewBox={`0 0 1000 ${height}`} preserveAspectRatio="none" className="block w-full overflow-visible rounded-sm" style={{ height }} role="img" aria-label={`${label}: ${summary}`}>
      {GRADE_KEYS.map((k) => {
        const n = counts[k];
        if (!n) return null;
        const w = (1000 * n) / total;
        const seg = (
          <g key={k}>
            <rect x={x} y={0} width={w} height={height} fill={FILL[k]} stroke="var(--color-line-strong)" strokeWidth={k === "noData" ? 1 : 0} vectorEffect="non-scaling-stroke" />
            {k !== "R1" && k !== "R5" && <rect x={x} y={0} width={w} height={height} fill={`url(#bh-hatch-${k})`} />}
            <title>{`${LONG[k]}: ${n}`}</title>
          </g>
        );
        x += w;
        return seg;
      })}
    </svg>
  );
}

/** The bar's labels as HTML (SVG text would stretch with preserveAspectRatio="none"). */
export function GradeBarLabels({ counts }: { counts: GradeCounts }) {
  const total = GRADE_KEYS.reduce((s, k) => s + counts[k], 0);
  if (!total) return null;
  return (
    <div className="relative flex w-full text-[0.7rem] leading-4">
      {GRADE_KEYS.map((k) =>
        counts[k] ? (
          <span key={k} className="num overflow-hidden whitespace-nowrap text-center text-ink-muted" style={{ width: `${(100 * counts[k]) / total}%` }}>
            {(100 * counts[k]) / total >= 7 ? `${SHORT[k]} ${counts[k]}` : ""}
          </span>
        ) : null,
      )}
    </div>
  );
}

export function GradeSwatch({ k }: { k: GradeKey }) {
  return (
    <svg width="14" height="14" aria-hidden="true" className="inline-block shrink-0 rounded-[2px] align-[-2px]">
      <rect width="14" height="14" fill={FILL[k]} stroke="var(--color-line-strong)" />
      {k !== "R1" && k !== "R5" && <rect width="14" height="14" fill={`url(#bh-hatch-${k})`} />}
    </svg>
  );
}

export { INK as GRADE_INK };
