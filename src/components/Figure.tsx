import type { ReactNode } from "react";
import { formatNumber } from "../lib/format.ts";

export interface FigureProps {
  value: number | null | undefined;
  /** Always give the unit: "Hz", "kW", "%", "dB", "mm/s", "rpm", … */
  unit?: ReactNode;
  digits?: number;
  /** Marks an estimate ("≈"), with the method in the tooltip. */
  estimate?: boolean | string;
  /** Show a leading + for positive values (changes, offsets). */
  signed?: boolean;
  className?: string;
}

/** A number in JetBrains Mono with tabular digits, followed by its unit. */
export function Figure({ value, unit, digits = 0, estimate, signed, className = "" }: FigureProps) {
  const missing = value === null || value === undefined || !Number.isFinite(value);
  const text = formatNumber(value, digits);
  const sign = signed && !missing && value! > 0 ? "+" : "";
  return (
    <span
      className={`num whitespace-nowrap ${className}`}
      title={estimate ? (typeof estimate === "string" ? `Estimate: ${estimate}` : "Estimate") : undefined}
    >
      {estimate && !missing && <span className="text-ink-muted">≈</span>}
      {sign}
      {text}
      {unit && !missing && <span className="ml-[0.25em] text-ink-muted">{unit}</span>}
    </span>
  );
}
