/** Barhound's mark: a rotor end-ring with its bars, one of them picked out. */
export function Logo({ className = "" }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" className={className} aria-hidden="true">
      <rect width="32" height="32" rx="7" fill="var(--color-brand)" />
      <circle cx="16" cy="16" r="10" fill="none" stroke="#fff" strokeWidth="2" />
      {[0, 1, 2, 3, 4, 5, 6, 7].map((i) => {
        const a = (i * Math.PI) / 4;
        return (
          <line
            key={i}
            x1={16 + Math.cos(a) * 4}
            y1={16 + Math.sin(a) * 4}
            x2={16 + Math.cos(a) * 8}
            y2={16 + Math.sin(a) * 8}
            stroke={i === 1 ? "var(--color-grade-3)" : "#fff"}
            strokeWidth="2"
            strokeLinecap="round"
          />
        );
      })}
    </svg>
  );
}
