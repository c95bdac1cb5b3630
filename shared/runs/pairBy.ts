// Pairing the items of two runs' lists (boundaries, traits, contrasts) for a side-by-side comparison.

/**
 * Pairs items of two lists by key (the n-th item of a key with the n-th of the same key), in the
 * order of the run and then the base's leftovers.
 *
 * @example
 * pairBy([{ k: "a" }], [{ k: "a" }, { k: "b" }], (x) => x.k);
 * // [{ key: "a", base: { k: "a" }, run: { k: "a" } }, { key: "b", base: null, run: { k: "b" } }]
 */
export function pairBy<T>(base: T[], run: T[], key: (item: T) => string): Array<{ key: string; base: T | null; run: T | null }> {
  const keyed = (list: T[]) => {
    const seen = new Map<string, number>();
    return list.map((item) => {
      const k = key(item);
      const n = seen.get(k) ?? 0;
      seen.set(k, n + 1);
      return { k, slot: `${k}\u0000${n}`, item };
    });
  };
  const baseSlots = new Map(keyed(base).map((b) => [b.slot, b.item]));
  const runKeyed = keyed(run);
  const out: Array<{ key: string; base: T | null; run: T | null }> = runKeyed.map((r) => ({ key: r.k, base: baseSlots.get(r.slot) ?? null, run: r.item }));
  const taken = new Set(runKeyed.map((r) => r.slot));
  for (const b of keyed(base)) if (!taken.has(b.slot)) out.push({ key: b.k, base: b.item, run: null });
  return out;
}

/** Which of the two runs holds a paired item. */
export const presence = (p: { base: unknown; run: unknown }) => (p.base && p.run ? "both" : p.base ? "baseOnly" : "runOnly") as "both" | "baseOnly" | "runOnly";
