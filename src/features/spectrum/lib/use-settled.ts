import { useCallback, useEffect, useRef, useState } from "react";

/**
 * A value and its settled copy. Wheel zoom and drag fire many times, so their changes settle `ms` after the last
 * one (one refetch when they stop); a key press or a button is one deliberate step and settles at once.
 */
export function useSettled<T>(initial: T, ms: number) {
  const [value, setValue] = useState(initial);
  const [settled, setSettled] = useState(initial);
  const latest = useRef(initial);
  const timer = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  useEffect(() => () => clearTimeout(timer.current), []);
  const set = useCallback(
    (next: T | ((prev: T) => T), how: "now" | "debounced") => {
      const v = typeof next === "function" ? (next as (prev: T) => T)(latest.current) : next;
      latest.current = v;
      setValue(v);
      clearTimeout(timer.current);
      if (how === "now") setSettled(v);
      else timer.current = setTimeout(() => setSettled(latest.current), ms);
    },
    [ms],
  );
  return [value, settled, set] as const;
}
