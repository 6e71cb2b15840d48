// Tiny HTML helpers for server-rendered reports: everything interpolated goes through esc().

const ENTITIES: Record<string, string> = { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" };

export function esc(v: unknown): string {
  return v === null || v === undefined ? "" : String(v).replace(/[&<>"']/g, (c) => ENTITIES[c]);
}

/** A number with its unit, or an en dash when there is none. Narrow no-break space between value and unit. */
export function qty(v: number | null | undefined, unit: string, digits = 1): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "–";
  return `${v.toFixed(digits)}\u202f${unit}`;
}
