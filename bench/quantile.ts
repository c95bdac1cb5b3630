// Percentiles of measured times, shared by the benches that report medians and tails.

/** The q-quantile of ascending `sorted`, interpolating linearly between neighbours; NaN when empty. */
export function quantile(sorted: number[], q: number): number {
  if (sorted.length === 0) return NaN;
  const pos = (sorted.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return sorted[lo] + (sorted[hi] - sorted[lo]) * (pos - lo);
}
