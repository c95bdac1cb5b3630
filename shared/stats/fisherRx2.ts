import { LogSumAccumulator, logFactorialTable } from "./distributions";
import type { CompactTable } from "./freemanHalton";

/** Two tables count as equally likely when their probabilities differ by less than this factor (as R's fisher.test). */
const LOG_RELATIVE_TOLERANCE = Math.log1p(1e-7);

/**
 * Exact two-sided Fisher-Freeman-Halton p-value of an r x 2 (or 2 x c) table by a network
 * algorithm (Mehta & Patel 1983): with the margins fixed, a table is a path through the rows
 * choosing how many of the first column's count fall in each, its probability is
 * prod C(n_i, x_i) / C(N, V), and the log-probability is a sum over rows. At each node (rows done,
 * count placed so far) the largest and smallest log-probability the remaining rows can add come
 * from a dynamic programme; when even the largest keeps every completion at or below the
 * observed table's probability, all completions count at once (their total is C(N_rest, V_rest)
 * by Vandermonde's identity), and when even the smallest lifts them all above it, none does.
 * Returns null when the bounds or the walk would take more than `nodeLimit` steps (the caller then
 * tries the general enumeration or simulates).
 *
 * @example
 * fisherRx2({ cells: [[3, 1], [1, 3]], rowTotals: [4, 4], columnTotals: [4, 4], total: 8 }) // => { logPValue: ln(34/70) }
 */
export function fisherRx2(table: CompactTable, nodeLimit = 5_000_000): { logPValue: number; nodes: number } | null {
  const columns = table.columnTotals.length;
  const rows = table.rowTotals.length;
  let counts: number[];
  let sizes: number[];
  if (columns === 2) {
    counts = table.cells.map((row) => row[0]);
    sizes = table.rowTotals;
  } else if (rows === 2) {
    counts = table.cells[0];
    sizes = table.columnTotals;
  } else {
    return null;
  }
  const r = sizes.length;
  const placed = counts.reduce((a, v) => a + v, 0);
  const N = table.total;
  const lf = logFactorialTable(N);
  const logChoose = (n: number, k: number): number => (k < 0 || k > n ? -Infinity : lf[n] - lf[k] - lf[n - k]);
  // The bounds' dynamic programme costs about sum_k (count placed) x (row size): give up early when
  // that alone exceeds the budget (large tables go to the caller's other methods).
  let programme = 0;
  for (const n of sizes) programme += (Math.min(placed, N) + 1) * (n + 1);
  if (programme > nodeLimit) return null;
  // Most and least log-weight the rows k.. can add when they hold `need` of the first column.
  const max: Float64Array[] = Array.from({ length: r + 1 }, () => new Float64Array(placed + 1).fill(-Infinity));
  const min: Float64Array[] = Array.from({ length: r + 1 }, () => new Float64Array(placed + 1).fill(Infinity));
  max[r][0] = 0;
  min[r][0] = 0;
  const logC: Float64Array[] = sizes.map((n) => Float64Array.from({ length: n + 1 }, (_, x) => logChoose(n, x)));
  const rest = new Array<number>(r + 1).fill(0);
  for (let k = r - 1; k >= 0; k--) rest[k] = rest[k + 1] + sizes[k];
  for (let k = r - 1; k >= 0; k--) {
    for (let need = 0; need <= Math.min(placed, rest[k]); need++) {
      let hi = -Infinity;
      let lo = Infinity;
      for (let x = Math.max(0, need - rest[k + 1]); x <= Math.min(sizes[k], need); x++) {
        const below = need - x;
        if (!Number.isFinite(max[k + 1][below])) continue;
        hi = Math.max(hi, logC[k][x] + max[k + 1][below]);
        lo = Math.min(lo, logC[k][x] + min[k + 1][below]);
      }
      max[k][need] = hi;
      min[k][need] = lo;
    }
  }
  let observed = 0;
  for (let k = 0; k < r; k++) observed += logC[k][counts[k]];
  const cutoff = observed + LOG_RELATIVE_TOLERANCE;
  const logTotal = logChoose(N, placed);
  const terms = new LogSumAccumulator();
  let any = false;
  let nodes = 0;
  let aborted = false;
  const visit = (k: number, need: number, so: number): void => {
    if (aborted) return;
    if (++nodes > nodeLimit) {
      aborted = true;
      return;
    }
    if (!Number.isFinite(max[k][need])) return;
    if (so + max[k][need] <= cutoff) {
      terms.add(so + logChoose(rest[k], need) - logTotal);
      any = true;
      return;
    }
    if (so + min[k][need] > cutoff) return;
    const from = Math.max(0, need - rest[k + 1]);
    const to = Math.min(sizes[k], need);
    nodes += to - from;
    for (let x = from; x <= to; x++) visit(k + 1, need - x, so + logC[k][x]);
  };
  visit(0, placed, 0);
  if (aborted) return null;
  if (!any) return { logPValue: -Infinity, nodes };
  return { logPValue: Math.min(0, terms.value()), nodes };
}
