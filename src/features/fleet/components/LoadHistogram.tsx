// Histogram of load % across the fleet (10 % bins, last bin open), as SVG bars with both axes labelled.
// Bins below the under-load limit and above the over-load limit are hatched and named under the axis.
import type { FleetHealth } from "../api/get-fleet.ts";

export function LoadHistogram({ load }: { load: FleetHealth["load"] }) {
  const W = 640;
  const H = 220;
  const m = { l: 44, r: 12, t: 12, b: 46 };
  const bins = load.bins;
  const maxCount = Math.max(1, ...bins.map((b) => b.count));
  const step = niceStep(maxCount);
  const top = Math.ceil(maxCount / step) * step;
  const bw = (W - m.l - m.r) / bins.length;
  const y = (c: number) => m.t + (H - m.t - m.b) * (1 - c / top);
  const ticks = Array.from({ length: top / step + 1 }, (_, i) => i * step);
  const xOf = (pct: number) => m.l + (pct / load.binPct) * bw;
  return (
    <svg viewBox={`0 0 ${W} ${H}`} className="w-full" role="img" aria-label={`Load histogram: ${bins.map((b) => `${b.fromPct}${b.toPct === null ? "+" : `–${b.toPct}`} %: ${b.count}`).join(", ")}`}>
      <defs>
        <pattern id="bh-load-hatch" patternUnits="userSpaceOnUse" width="6" height="6" patternTransform="rotate(45)">
          <line x1="0" y1="0" x2="0" y2="6" stroke="rgba(255,255,255,0.55)" strokeWidth="2" />
        </pattern>
      </defs>
      {ticks.map((t) => (
        <g key={t}>
          <line x1={m.l} x2={W - m.r} y1={y(t)} y2={y(t)} stroke="var(--color-line)" />
          <text x={m.l - 6} y={y(t)} textAnchor="end" dominantBaseline="middle" className="num" fontSize="11" fill="var(--color-ink-muted)">
            {t}
          </text>
        </g>
      ))}
      {bins.map((b, i) => {
        const outside = b.fromPct < load.underPct || (b.toPct ?? Infinity) > load.overPct;
        const x = m.l + i * bw + 2;
        return (
          <g key={b.fromPct}>
            <rect x={x} y={y(b.count)} width={bw - 4} height={y(0) - y(b.count)} fill={outside ? "var(--color-grade-4)" : "var(--color-brand)"} />
            {outside && <rect x={x} y={y(b.count)} width={bw - 4} height={y(0) - y(b.count)} fill="url(#bh-load-hatch)" />}
            {b.count > 0 && (
              <text x={x + (bw - 4) / 2} y={y(b.count) - 3} textAnchor="middle" className="num" fontSize="10.5" fill="var(--color-ink)">
                {b.count}
              </text>
            )}
            <title>{`${b.fromPct}${b.toPct === null ? " % and above" : `–${b.toPct} %`}: ${b.count} motors`}</title>
          </g>
        );
      })}
      <line x1={m.l} x2={W - m.r} y1={y(0)} y2={y(0)} stroke="var(--color-ink-muted)" />
      {bins.map((b, i) => (
        <text key={b.fromPct} x={m.l + i * bw} y={y(0) + 13} textAnchor="middle" className="num" fontSize="10.5" fill="var(--color-ink-muted)">
          {b.fromPct}
        </text>
      ))}
      <text x={m.l + bins.length * bw} y={y(0) + 13} textAnchor="middle" className="num" fontSize="10.5" fill="var(--color-ink-muted)">
        +
      </text>
      {[load.underPct, load.overPct].map((p) => (
        <line key={p} x1={xOf(p)} x2={xOf(p)} y1={m.t} y2={y(0)} stroke="var(--color-ink)" strokeDasharray="4 3" />
      ))}
      <text x={xOf(load.underPct) - 4} y={m.t + 10} textAnchor="end" fontSize="11" fill="var(--color-ink)">
        under {load.underPct} %
      </text>
      <text x={xOf(load.overPct) + 4} y={m.t + 10} fontSize="11" fill="var(--color-ink)">
        over {load.overPct} %
      </text>
      <text x={(m.l + W - m.r) / 2} y={H - 6} textAnchor="middle" fontSize="12" fill="var(--color-ink-muted)">
        Load (% of rated, estimate) · 10 % bins
      </text>
      <text x={12} y={(m.t + y(0)) / 2} textAnchor="middle" fontSize="12" fill="var(--color-ink-muted)" transform={`rotate(-90 12 ${(m.t + y(0)) / 2})`}>
        Motors
      </text>
    </svg>
  );
}

function niceStep(max: number): number {
  const raw = max / 4;
  const p = 10 ** Math.floor(Math.log10(Math.max(raw, 1)));
  for (const k of [1, 2, 5, 10]) if (k * p >= raw) return Math.max(1, k * p);
  return Math.max(1, 10 * p);
}
