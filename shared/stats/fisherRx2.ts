import { LogSumAccumulator, logFactorialTable } from "./distributions";
import { logPrefixSums } from "./logPrefixSums";
import type { CompactTable } from "./freemanHalton";
import { mergeCloseKeys, sortAndMergePairs } from "./pairedSort";
import { countAtMost } from "./sortedSearch";

/** Two tables count as equally likely when their probabilities differ by less than this factor (as R's fisher.test). */
const LOG_RELATIVE_TOLERANCE = Math.log1p(1e-7);
/** Partial log-weights closer than this are the same sum reached in another order (rounding only). */
const MERGE_TOLERANCE = 1e-9;
/** Completions of the last rows kept as sorted lists, at most. */
const COMPLETION_LIMIT = 4_000_000;

/** The scores (ascending) the listed rows can add for one count still to place, with ln cumulative weights. */
interface CompletionList {
  scores: Float64Array;
  logCumulative: Float64Array;
}

/** Scores (ascending) of one node's paths with how many paths reach each. */
interface Paths {
  scores: Float64Array;
  counts: Float64Array;
}

/**
 * Exact two-sided Fisher-Freeman-Halton p-value of an r x 2 (or 2 x c) table by a network
 * algorithm (Mehta & Patel 1983, JASA 78:427): with the margins fixed, a table is a path through
 * the rows choosing how many of the first column's count V fall in each; its probability is
 * prod C(n_i, x_i) / C(N, V), so its log-probability is a sum over rows (a "score").
 *
 * Rows are taken smallest first. The paths through the first rows are carried level by level,
 * merged where two paths reach the same node (rows done, count still to place) with the same
 * score, and settled early by bounds: at each node the largest and smallest score the remaining
 * rows can add come from a dynamic programme, so when even the largest keeps every completion at
 * or below the observed table's score all completions count at once (their total is
 * C(N_rest, V_rest) by Vandermonde's identity), and when even the smallest lifts them all above it
 * none does. The largest rows at the end are not walked path by path: their completions are
 * enumerated once per count still to place, sorted, and summed cumulatively, so each path that
 * reaches them is finished by one binary search (meeting in the middle).
 *
 * Returns null when the work (paths carried plus completions listed) would pass `workLimit`;
 * the caller then simulates. `completionLimit` bounds the completions listed (tests lower it to
 * make the walk do more of the work).
 *
 * @example
 * fisherRx2({ cells: [[3, 1], [1, 3]], rowTotals: [4, 4], columnTotals: [4, 4], total: 8 }) // => { logPValue: ln(34/70) }
 */
export function fisherRx2(
  table: CompactTable,
  workLimit = 5_000_000,
  completionLimit = COMPLETION_LIMIT,
): { logPValue: number; nodes: number } | null {
  const rowsOf = twoColumnRows(table);
  if (!rowsOf) return null;
  // Smallest rows first: few choices each while the paths are many.
  const order = rowsOf.sizes.map((_, i) => i).sort((a, b) => rowsOf.sizes[a] - rowsOf.sizes[b]);
  const sizes = order.map((i) => rowsOf.sizes[i]);
  const counts = order.map((i) => rowsOf.counts[i]);
  const r = sizes.length;
  const placed = counts.reduce((a, v) => a + v, 0);
  const N = table.total;
  const lf = logFactorialTable(N);
  const logChoose = (n: number, k: number): number => (k < 0 || k > n ? -Infinity : lf[n] - lf[k] - lf[n - k]);
  const logC: Float64Array[] = sizes.map((n) => Float64Array.from({ length: n + 1 }, (_, x) => logChoose(n, x)));
  const rest = new Array<number>(r + 1).fill(0);
  for (let k = r - 1; k >= 0; k--) rest[k] = rest[k + 1] + sizes[k];

  // The bounds' dynamic programme costs about sum_k (count placed) x (row size).
  let work = 0;
  for (const n of sizes) work += (placed + 1) * (n + 1);
  if (work > workLimit) return null;
  const { max, min } = completionBounds(sizes, logC, rest, placed);

  let observed = 0;
  for (let k = 0; k < r; k++) observed += logC[k][counts[k]];
  const cutoff = observed + LOG_RELATIVE_TOLERANCE;
  const logTotal = logChoose(N, placed);
  const terms = new LogSumAccumulator();

  // The last rows, whose completions are listed rather than walked.
  let back = r;
  let completions = 1;
  while (back > 0 && completions * (sizes[back - 1] + 1) <= Math.min(completionLimit, workLimit)) {
    completions *= sizes[back - 1] + 1;
    back--;
  }
  work += completions;
  if (work > workLimit) return null;
  const tails = completionLists(sizes, logC, back, placed);

  // Paths i in [from, to) of a node, moved by `step`, meet the listed completions: those at or below
  // what is left of the cutoff count. Scores ascend, so what is left descends: one walk down the list.
  const finishPaths = (paths: Paths, from: number, to: number, step: number, tail: CompletionList | undefined): void => {
    if (!tail) return;
    let counted = countAtMost(tail.scores, cutoff - step - paths.scores[from]);
    for (let i = from; i < to && counted > 0; i++) {
      const left = cutoff - step - paths.scores[i];
      while (counted > 0 && tail.scores[counted - 1] > left) counted--;
      if (counted > 0) terms.add(Math.log(paths.counts[i]) + paths.scores[i] + step + tail.logCumulative[counted - 1] - logTotal);
    }
  };

  // The paths at each node are kept sorted by score with ln prefix sums of their weights, so for
  // each choice of x the paths all of whose completions count are one prefix (summed at once),
  // those none of whose completions count one suffix (dropped), and only the paths in between move on.
  let level = new Map<number, Paths>([[placed, { scores: Float64Array.of(0), counts: Float64Array.of(1) }]]);
  for (let k = 0; k < back; k++) {
    const workBefore = work;
    let pathsIn = 0;
    for (const paths of level.values()) pathsIn += paths.scores.length;
    const grow = new Map<number, Paths[]>();
    for (const [need, paths] of level) {
      const logPrefix = logPrefixSums(paths.scores, paths.counts);
      for (let x = Math.max(0, need - rest[k + 1]); x <= Math.min(sizes[k], need); x++) {
        const child = need - x;
        if (!Number.isFinite(max[k + 1][child])) continue;
        const step = logC[k][x];
        const allCount = countAtMost(paths.scores, cutoff - step - max[k + 1][child]);
        if (allCount > 0) terms.add(logPrefix[allCount - 1] + step + logChoose(rest[k + 1], child) - logTotal);
        const openEnd = countAtMost(paths.scores, cutoff - step - min[k + 1][child]);
        if (openEnd <= allCount) continue;
        work += 1 + openEnd - allCount;
        if (work > workLimit) return null;
        if (k === back - 1) {
          // The last walked row: finish these paths against the listed completions right away.
          finishPaths(paths, allCount, openEnd, step, tails[child]);
          continue;
        }
        // The open paths, moved by the same step, stay in order: a sorted run for the child.
        const scores = paths.scores.slice(allCount, openEnd);
        for (let i = 0; i < scores.length; i++) scores[i] += step;
        const runs = grow.get(child);
        const run = { scores, counts: paths.counts.slice(allCount, openEnd) };
        if (runs) runs.push(run);
        else grow.set(child, [run]);
      }
    }
    level = new Map();
    let pathsOut = 0;
    for (const [need, runs] of grow) {
      const merged = mergeRuns(runs);
      level.set(need, merged);
      pathsOut += merged.scores.length;
    }
    // Give up early when, even if the paths stopped multiplying, the rows still to walk would cost
    // more than the budget left (each path costing what one did at this row): a table that far out
    // of reach should reach Monte Carlo without spending the whole budget first.
    const perPath = (work - workBefore) / Math.max(1, pathsIn);
    if (work + pathsOut * perPath * (back - 1 - k) > workLimit) return null;
  }

  // Every row listed (small tables): the one path, at the root, meets them all.
  if (back === 0) finishPaths(level.get(placed)!, 0, 1, 0, tails[placed]);
  const logPValue = terms.value();
  return { logPValue: logPValue === -Infinity ? -Infinity : Math.min(0, logPValue), nodes: work };
}

/** The first column's counts and the row sizes of an r x 2 table (or of a 2 x c table read sideways). */
function twoColumnRows(table: CompactTable): { counts: number[]; sizes: number[] } | null {
  if (table.columnTotals.length === 2) return { counts: table.cells.map((row) => row[0]), sizes: table.rowTotals };
  if (table.rowTotals.length === 2) return { counts: table.cells[0], sizes: table.columnTotals };
  return null;
}

/** Most and least score the rows k.. can add when they hold `need` of the first column (-Infinity/Infinity: impossible). */
function completionBounds(sizes: number[], logC: Float64Array[], rest: number[], placed: number): { max: Float64Array[]; min: Float64Array[] } {
  const r = sizes.length;
  const max = Array.from({ length: r + 1 }, () => new Float64Array(placed + 1).fill(-Infinity));
  const min = Array.from({ length: r + 1 }, () => new Float64Array(placed + 1).fill(Infinity));
  max[r][0] = 0;
  min[r][0] = 0;
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
  return { max, min };
}

/**
 * For each count still to place, the scores the rows from `back` on can add (ascending, merged)
 * with ln of the cumulative sums of the completions' weights (in logs, so the least likely
 * completions keep their digits when only they count).
 */
function completionLists(
  sizes: number[],
  logC: Float64Array[],
  back: number,
  placed: number,
): Array<CompletionList | undefined> {
  let lists: Paths[] = [{ scores: Float64Array.of(0), counts: Float64Array.of(1) }];
  for (let k = sizes.length - 1; k >= back; k--) {
    const grown: Array<{ scores: number[]; counts: number[] }> = [];
    lists.forEach((list, need) => {
      for (let x = 0; x <= sizes[k] && need + x <= placed; x++) {
        const into = (grown[need + x] ??= { scores: [], counts: [] });
        for (let i = 0; i < list.scores.length; i++) {
          into.scores.push(list.scores[i] + logC[k][x]);
          into.counts.push(list.counts[i]);
        }
      }
    });
    lists = Array.from(grown, (g) => {
      const scores = Float64Array.from(g?.scores ?? []);
      const pathCounts = Float64Array.from(g?.counts ?? []);
      const kept = sortAndMergePairs(scores, pathCounts, MERGE_TOLERANCE);
      return { scores: scores.subarray(0, kept), counts: pathCounts.subarray(0, kept) };
    });
  }
  return lists.map((list) => (list.scores.length === 0 ? undefined : { scores: list.scores, logCumulative: logPrefixSums(list.scores, list.counts) }));
}

/** Merges sorted runs of paths into one sorted list, joining scores closer than MERGE_TOLERANCE. */
function mergeRuns(runs: Paths[]): Paths {
  let queue = runs;
  while (queue.length > 1) {
    const merged: Paths[] = [];
    for (let i = 0; i + 1 < queue.length; i += 2) merged.push(mergeTwo(queue[i], queue[i + 1]));
    if (queue.length % 2 === 1) merged.push(queue[queue.length - 1]);
    queue = merged;
  }
  const { scores, counts } = queue[0];
  const kept = mergeCloseKeys(scores, counts, MERGE_TOLERANCE);
  return { scores: scores.subarray(0, kept), counts: counts.subarray(0, kept) };
}

function mergeTwo(a: Paths, b: Paths): Paths {
  const length = a.scores.length + b.scores.length;
  const scores = new Float64Array(length);
  const counts = new Float64Array(length);
  let i = 0;
  let j = 0;
  for (let at = 0; at < length; at++) {
    if (j >= b.scores.length || (i < a.scores.length && a.scores[i] <= b.scores[j])) {
      scores[at] = a.scores[i];
      counts[at] = a.counts[i++];
    } else {
      scores[at] = b.scores[j];
      counts[at] = b.counts[j++];
    }
  }
  return { scores, counts };
}
