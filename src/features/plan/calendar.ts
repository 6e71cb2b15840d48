// Month grid for the Plan calendar: weeks start on Monday; days outside the month are included to fill the weeks.

export interface CalendarDay {
  iso: string; // YYYY-MM-DD
  day: number;
  inMonth: boolean;
}

const p2 = (n: number) => String(n).padStart(2, "0");
const iso = (d: Date) => `${d.getFullYear()}-${p2(d.getMonth() + 1)}-${p2(d.getDate())}`;

/** month: 0–11. */
export function monthGrid(year: number, month: number): CalendarDay[][] {
  const first = new Date(year, month, 1);
  const offset = (first.getDay() + 6) % 7; // Monday = 0
  const start = new Date(year, month, 1 - offset);
  const last = new Date(year, month + 1, 0);
  const weeks: CalendarDay[][] = [];
  const cur = new Date(start);
  while (cur <= last || weeks.length === 0 || weeks[weeks.length - 1].length < 7) {
    if (!weeks.length || weeks[weeks.length - 1].length === 7) {
      if (cur > last) break;
      weeks.push([]);
    }
    weeks[weeks.length - 1].push({ iso: iso(cur), day: cur.getDate(), inMonth: cur.getMonth() === month });
    cur.setDate(cur.getDate() + 1);
  }
  return weeks;
}

/** The from/to (inclusive dates) the grid shows, for the API query. */
export function gridRange(weeks: CalendarDay[][]): { from: string; to: string } {
  return { from: weeks[0][0].iso, to: weeks[weeks.length - 1][6].iso };
}

/** "2025-03" ↔ { year, month } */
export function parseMonth(s: string | null, now = new Date()): { year: number; month: number } {
  const m = s ? /^(\d{4})-(\d{2})$/.exec(s) : null;
  if (m && Number(m[2]) >= 1 && Number(m[2]) <= 12) return { year: Number(m[1]), month: Number(m[2]) - 1 };
  return { year: now.getFullYear(), month: now.getMonth() };
}
export function formatMonthParam(year: number, month: number): string {
  const d = new Date(year, month, 1);
  return `${d.getFullYear()}-${p2(d.getMonth() + 1)}`;
}
