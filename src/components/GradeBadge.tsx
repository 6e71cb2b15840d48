import { gradeInfo, NOT_ASSESSABLE, parseGrade, type Grade } from "../lib/grades.ts";

const FILL: Record<Grade | "na", string> = {
  1: "bg-grade-1 text-grade-1-ink border-grade-2",
  2: "bg-grade-2 text-grade-2-ink border-grade-3",
  3: "bg-grade-3 text-grade-3-ink border-grade-4",
  4: "bg-grade-4 text-grade-4-ink border-grade-5",
  5: "bg-grade-5 text-grade-5-ink border-grade-5",
  na: "bg-grade-na text-grade-na-ink border-line-strong border-dashed",
};

export interface GradeBadgeProps {
  /** 1..5, "R1".."R5" or a grade name; null/undefined with assessable=false → Not assessable. */
  grade: unknown;
  /** false → Not assessable (the grade is ignored). */
  assessable?: boolean | null;
  /** Why it is not assessable (light load, capture too short, …); shown as a tooltip and to screen readers. */
  reason?: string | null;
  /** Smaller padding for table cells. */
  compact?: boolean;
  className?: string;
}

/** A rotor grade: R-number, name and a five-tick meter with as many ticks filled as the grade. Never colour alone. */
export function GradeBadge({ grade, assessable, reason, compact, className = "" }: GradeBadgeProps) {
  const g = assessable === false ? null : parseGrade(grade);
  if (g === null && assessable !== false && (grade === null || grade === undefined)) {
    return <span className={`text-ink-faint ${className}`} aria-label="No grade yet">—</span>;
  }
  const info = g ? gradeInfo(g) : null;
  const label = info ? `Rotor grade ${info.code} ${info.name}` : `Rotor grade not assessable${reason ? `: ${reason}` : ""}`;
  return (
    <span
      role="img"
      aria-label={label}
      title={info ? `${info.code} ${info.name} (sideband ${info.band} below supply)` : reason ? `${NOT_ASSESSABLE}: ${reason}` : NOT_ASSESSABLE}
      data-grade={info ? info.code : "na"}
      className={`inline-flex items-center whitespace-nowrap rounded-sm border ${FILL[g ?? "na"]} ${compact ? "gap-1.5 px-1.5 py-px text-caption" : "gap-2 px-2 py-0.5 text-body"} ${className}`}
    >
      <span className="num font-semibold">{info ? info.code : "R–"}</span>
      <span className="font-medium">{info ? info.name : NOT_ASSESSABLE}</span>
      <TickMeter filled={g ?? 0} compact={compact} />
    </span>
  );
}

/** Five ticks, rising in height; `filled` of them solid. */
export function TickMeter({ filled, compact }: { filled: number; compact?: boolean }) {
  const h = compact ? [5, 6, 7, 8, 9] : [6, 7.5, 9, 10.5, 12];
  return (
    <span aria-hidden="true" className="inline-flex items-end gap-[2px]">
      {h.map((height, i) => (
        <span
          key={i}
          className={`inline-block w-[3px] rounded-[1px] ${i < filled ? "bg-current" : "bg-current opacity-25"}`}
          style={{ height }}
        />
      ))}
    </span>
  );
}
