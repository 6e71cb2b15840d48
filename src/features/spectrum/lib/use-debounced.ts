import { useEffect, useState } from "react";

/** The value, settled for `ms` (zoom and pan fire many times; one refetch when they stop). */
export function useDebounced<T>(value: T, ms: number): T {
  const [v, setV] = useState(value);
  useEffect(() => {
    const t = setTimeout(() => setV(value), ms);
    return () => clearTimeout(t);
  }, [value, ms]);
  return v;
}
