import { useEffect, useState } from "react";

/**
 * The value once it has stayed the same for `delayMs` (compared as JSON, so a new object with the
 * same content does not restart the wait): keeps a design preview from asking on every click.
 */
export function useDebounced<T>(value: T, delayMs: number): T {
  const [settled, setSettled] = useState(value);
  const key = JSON.stringify(value);
  useEffect(() => {
    const timer = window.setTimeout(() => setSettled(JSON.parse(key) as T), delayMs);
    return () => window.clearTimeout(timer);
  }, [key, delayMs]);
  return settled;
}
