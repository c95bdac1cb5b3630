// The Freeman-Halton extension of Fisher's exact test to r x c tables (Freeman & Halton 1951): under
// independence and fixed margins a table has probability
//   P(T) = prod(r_i!) prod(c_j!) / (N! prod(n_ij!)),
// and the p-value sums P over all tables no more likely than the observed one (relative tolerance
// 1e-7). Two ways to get it: exact enumeration organised as a network over columns (after Mehta &
// Patel 1983), and Monte Carlo over random tables with the same margins.

import { LogSumAccumulator, logFactorialTable } from "./distributions";
import { createUniformSource, type UniformSource } from "./random";
import { logPrefixSums } from "./logPrefixSums";
import { sortAndMergePairs } from "./pairedSort";
import { countAtMost } from "./sortedSearch";

/** Two tables count as equally likely when their probabilities differ by less than this factor. */
const LOG_RELATIVE_TOLERANCE = Math.log1p(1e-7);

/** A table with its margins, without all-zero rows or columns (they change no probability). */
export interface CompactTable {
  cells: number[][];
  rowTotals: number[];
  columnTotals: number[];
  total: number;
}

/** Drops rows and columns whose total is 0. */
export function compactTable(table: number[][]): CompactTable {
  const rowSums = table.map((row) => row.reduce((s, v) => s + v, 0));
  const columnSums = table[0].map((_, j) => table.reduce((s, row) => s + row[j], 0));
  const keptRows = rowSums.flatMap((s, i) => (s > 0 ? [i] : []));
  const keptColumns = columnSums.flatMap((s, j) => (s > 0 ? [j] : []));
  const cells = keptRows.map((i) => keptColumns.map((j) => table[i][j]));
  return {
    cells,
    rowTotals: keptRows.map((i) => rowSums[i]),
    columnTotals: keptColumns.map((j) => columnSums[j]),
    total: rowSums.reduce((s, v) => s + v, 0),
  };
}

/** -sum ln(n_ij!): the log-probability of a table up to a constant fixed by its margins. */
function tableLogWeight(cells: number[][], logFactorials: Float64Array): number {
  let sum = 0;
  for (const row of cells) for (const v of row) sum -= logFactorials[v];
  return sum;
}

/** Smallest sum of ln(v_i!) over v with sum(v) = total and 0 <= v_i <= caps[i] (spread evenly). */
function evenSpreadCost(total: number, capsAscending: number[], logFactorials: Float64Array): number {
  let remaining = total;
  let cost = 0;
  for (let idx = 0; idx < capsAscending.length; idx++) {
    const slots = capsAscending.length - idx;
    const cap = capsAscending[idx];
    if (cap * slots <= remaining) {
      cost += logFactorials[cap];
      remaining -= cap;
      continue;
    }
    const quotient = Math.floor(remaining / slots);
    const extra = remaining - quotient * slots;
    return cost + extra * logFactorials[quotient + 1] + (slots - extra) * logFactorials[quotient];
  }
  return cost;
}

/** Largest sum of ln(v_i!) under the same constraints (fill the largest caps first). */
function concentratedCost(total: number, capsDescending: number[], logFactorials: Float64Array): number {
  let remaining = total;
  let cost = 0;
  for (let idx = 0; idx < capsDescending.length && remaining > 0; idx++) {
    const v = Math.min(capsDescending[idx], remaining);
    cost += logFactorials[v];
    remaining -= v;
  }
  return cost;
}

/** Bounds on the completions of a partial table, and the log of their summed weights. */
interface NodeBounds {
  /** Largest and smallest -sum ln(n_ij!) over the cells still to fill. */
  highest: number;
  lowest: number;
  /** ln of the sum over all completions of prod 1/n_ij! (= N'! / (prod r'_i! prod c'_j!)). */
  logCompletions: number;
}

interface NetworkNode extends NodeBounds {
  /** Row totals still to be filled, in decreasing order (rows are exchangeable from here on). */
  margins: number[];
  /** Partial log-weights (-sum ln n_ij! over the filled columns) with their path counts. */
  pasts: number[];
  counts: number[];
}

/**
 * Sorts a node's partial log-weights in increasing order and merges those that agree to within
 * 1e-9 (paths with the same cell values in another order), adding their counts.
 */
function sortAndMerge(node: NetworkNode): { pasts: Float64Array; counts: Float64Array } {
  const pasts = Float64Array.from(node.pasts);
  const counts = Float64Array.from(node.counts);
  const kept = sortAndMergePairs(pasts, counts, 1e-9);
  return { pasts: pasts.subarray(0, kept), counts: counts.subarray(0, kept) };
}

/**
 * Exact Freeman-Halton p-value by enumeration over a network of partial tables: columns are filled
 * one at a time, and partial tables that leave the same multiset of row totals share a node. Bounds
 * on the most and least likely completion of a node settle most partial tables at once: when even
 * the most likely completion is no more likely than the observed table, all completions count, and
 * their total probability has a closed form; when even the least likely one is more likely, none
 * count. Only the partial tables in between are carried to the next column.
 *
 * Returns ln p, or null when the work (child nodes and carried partial tables) would exceed
 * `workLimit`.
 */
export function freemanHaltonExact(table: CompactTable, workLimit: number): { logPValue: number; work: number } | null {
  // Rows index the node state, so the shorter dimension goes there; large columns go first, which
  // leaves small remaining networks with tight bounds.
  const transpose = table.rowTotals.length > table.columnTotals.length;
  const cells = transpose ? table.columnTotals.map((_, j) => table.cells.map((row) => row[j])) : table.cells;
  const rowTotals = transpose ? table.columnTotals : table.rowTotals;
  const columnTotals = [...(transpose ? table.rowTotals : table.columnTotals)].sort((a, b) => b - a);
  const logFactorials = logFactorialTable(table.total);
  const columns = columnTotals.length;

  const threshold = tableLogWeight(cells, logFactorials) + LOG_RELATIVE_TOLERANCE;
  let constant = -logFactorials[table.total];
  for (const r of rowTotals) constant += logFactorials[r];
  for (const c of columnTotals) constant += logFactorials[c];

  const remainingDescending = columnTotals.map((_, j) => columnTotals.slice(j));
  const remainingAscending = remainingDescending.map((list) => [...list].reverse());
  const remainingLogFactorialSum = columnTotals.map((_, j) => columnTotals.slice(j).reduce((s, c) => s + logFactorials[c], 0));
  const nodeKey = marginKeyFunction(Math.max(...rowTotals) + 1, rowTotals.length);

  // Bounds for a node whose columns j.. are still empty.
  const boundsFor = (margins: number[], j: number): NodeBounds => {
    const marginsAscending = [...margins].reverse();
    let evenByColumns = 0;
    let concentratedByColumns = 0;
    for (const c of remainingDescending[j]) {
      evenByColumns += evenSpreadCost(c, marginsAscending, logFactorials);
      concentratedByColumns += concentratedCost(c, margins, logFactorials);
    }
    let evenByRows = 0;
    let concentratedByRows = 0;
    let remainingTotal = 0;
    let logCompletions = -remainingLogFactorialSum[j];
    for (const r of margins) {
      evenByRows += evenSpreadCost(r, remainingAscending[j], logFactorials);
      concentratedByRows += concentratedCost(r, remainingDescending[j], logFactorials);
      remainingTotal += r;
      logCompletions -= logFactorials[r];
    }
    logCompletions += logFactorials[remainingTotal];
    // Relaxing either the row or the column constraints gives valid bounds; keep the tighter.
    return {
      highest: -Math.max(evenByColumns, evenByRows),
      lowest: -Math.min(concentratedByColumns, concentratedByRows),
      logCompletions,
    };
  };

  const accumulator = new LogSumAccumulator();
  const rootMargins = [...rowTotals].sort((a, b) => b - a);
  const root: NetworkNode = { margins: rootMargins, ...boundsFor(rootMargins, 0), pasts: [0], counts: [1] };
  if (root.highest <= threshold) return { logPValue: 0, work: 0 };
  let stage = new Map<number | string, NetworkNode>([[nodeKey(rootMargins), root]]);
  let work = 0;

  for (let j = 0; j < columns - 1; j++) {
    const childIsLast = j + 1 === columns - 1;
    const next = new Map<number | string, NetworkNode>();
    for (const node of stage.values()) {
      if (node.pasts.length === 0) continue;
      // Sort the node's partial weights and form log prefix sums of count * exp(past).
      const { pasts, counts } = sortAndMerge(node);
      node.pasts = [];
      node.counts = [];
      const logPrefix = logPrefixSums(pasts, counts);
      const completed = expandColumn(node.margins, columnTotals[j], logFactorials, (childMargins, delta) => {
        work++;
        let bounds: NodeBounds;
        let child: NetworkNode | undefined;
        if (childIsLast) {
          let only = 0;
          for (const r of childMargins) only -= logFactorials[r];
          bounds = { highest: only, lowest: only, logCompletions: only };
        } else {
          const key = nodeKey(childMargins);
          child = next.get(key);
          if (!child) {
            const margins = [...childMargins];
            child = { margins, ...boundsFor(margins, j + 1), pasts: [], counts: [] };
            next.set(key, child);
          }
          bounds = child;
        }
        const allCount = countAtMost(pasts, threshold - delta - bounds.highest);
        if (allCount > 0) accumulator.add(logPrefix[allCount - 1] + delta + constant + bounds.logCompletions);
        const openEnd = countAtMost(pasts, threshold - delta - bounds.lowest);
        if (child) {
          for (let i = allCount; i < openEnd; i++) {
            child.pasts.push(pasts[i] + delta);
            child.counts.push(counts[i]);
          }
        }
        work += openEnd - allCount;
        return work <= workLimit;
      });
      if (!completed) return null;
    }
    stage = next;
  }
  return { logPValue: Math.min(0, accumulator.value()), work };
}

/** Key of a sorted margin vector: a number while base^length stays exact, otherwise a string. */
function marginKeyFunction(base: number, length: number): (margins: number[]) => number | string {
  if (Math.pow(base, length) < Number.MAX_SAFE_INTEGER) {
    return (margins) => {
      let key = 0;
      for (const m of margins) key = key * base + m;
      return key;
    };
  }
  return (margins) => margins.join(",");
}

/**
 * Calls `visit` for every way to fill one column of total `columnTotal` from rows with the given
 * remaining totals, with the rows' new remaining totals (sorted decreasing, in a scratch array that
 * `visit` must copy to keep) and -sum ln(v_i!). Stops early, returning false, as soon as `visit`
 * returns false.
 */
function expandColumn(
  margins: number[],
  columnTotal: number,
  logFactorials: Float64Array,
  visit: (childMargins: number[], delta: number) => boolean,
): boolean {
  const rows = margins.length;
  const capacityFrom = new Array<number>(rows + 1).fill(0);
  for (let i = rows - 1; i >= 0; i--) capacityFrom[i] = capacityFrom[i + 1] + margins[i];
  const taken = new Array<number>(rows).fill(0);
  const child = new Array<number>(rows).fill(0);
  const recurse = (i: number, remaining: number, delta: number): boolean => {
    if (i === rows - 1) {
      taken[i] = remaining;
      // Insertion sort into decreasing order: rows are few, and this runs once per child.
      for (let r = 0; r < rows; r++) {
        const value = margins[r] - taken[r];
        let at = r;
        while (at > 0 && child[at - 1] < value) {
          child[at] = child[at - 1];
          at--;
        }
        child[at] = value;
      }
      return visit(child, delta - logFactorials[remaining]);
    }
    const lowest = Math.max(0, remaining - capacityFrom[i + 1]);
    const highest = Math.min(margins[i], remaining);
    for (let v = lowest; v <= highest; v++) {
      taken[i] = v;
      if (!recurse(i + 1, remaining - v, delta - logFactorials[v])) return false;
    }
    return true;
  };
  return recurse(0, columnTotal, 0);
}

/**
 * Draws one hypergeometric variate: successes among `draws` items taken without replacement from
 * `population` items of which `successes` are successes. Inversion by searching outward from the
 * mode (Kemp 1986), so the expected cost grows with the standard deviation, not the range.
 */
function sampleHypergeometric(
  random: UniformSource,
  population: number,
  successes: number,
  draws: number,
  logFactorials: Float64Array,
): number {
  const failures = population - successes;
  const lo = Math.max(0, draws - failures);
  const hi = Math.min(draws, successes);
  if (lo === hi) return lo;
  const mode = Math.min(hi, Math.max(lo, Math.floor(((draws + 1) * (successes + 1)) / (population + 2))));
  const logModeProbability =
    logFactorials[successes] - logFactorials[mode] - logFactorials[successes - mode] +
    logFactorials[failures] - logFactorials[draws - mode] - logFactorials[failures - draws + mode] -
    (logFactorials[population] - logFactorials[draws] - logFactorials[population - draws]);
  let u = random();
  const modeProbability = Math.exp(logModeProbability);
  u -= modeProbability;
  if (u <= 0) return mode;
  let up = mode;
  let down = mode;
  let pUp = modeProbability;
  let pDown = modeProbability;
  while (up < hi || down > lo) {
    if (up < hi) {
      pUp *= ((successes - up) * (draws - up)) / ((up + 1) * (failures - draws + up + 1));
      up++;
      u -= pUp;
      if (u <= 0) return up;
    }
    if (down > lo) {
      pDown *= (down * (failures - draws + down)) / ((successes - down + 1) * (draws - down + 1));
      down--;
      u -= pDown;
      if (u <= 0) return down;
    }
  }
  return mode; // only rounding leftovers reach here
}

/**
 * Monte Carlo Freeman-Halton p-value from `replicates` random tables with the observed margins.
 * Each column is drawn as a multivariate hypergeometric sample, row by row from the conditional
 * hypergeometric distributions, which gives the same distribution over tables as Patefield's
 * algorithm (Patefield 1981, Applied Statistics 30: 91-97). The estimate is (1 + hits)/(1 + B),
 * which never reports 0 (Davison & Hinkley 1997, section 4.2), with standard error sqrt(p(1-p)/B).
 */
export function freemanHaltonMonteCarlo(
  table: CompactTable,
  replicates: number,
  seed: number,
): { pValue: number; standardError: number; hits: number } {
  const logFactorials = logFactorialTable(table.total);
  const threshold = tableLogWeight(table.cells, logFactorials) + LOG_RELATIVE_TOLERANCE;
  const random = createUniformSource(seed);
  const rows = table.rowTotals.length;
  const columns = table.columnTotals.length;
  const remaining = new Array<number>(rows);
  let hits = 0;
  for (let b = 0; b < replicates; b++) {
    for (let i = 0; i < rows; i++) remaining[i] = table.rowTotals[i];
    let pool = table.total;
    let logWeight = 0;
    for (let j = 0; j < columns - 1; j++) {
      let need = table.columnTotals[j];
      let rowPool = pool;
      for (let i = 0; i < rows; i++) {
        const available = remaining[i];
        const v = i === rows - 1 ? need : need === 0 ? 0 : sampleHypergeometric(random, rowPool, available, need, logFactorials);
        rowPool -= available;
        remaining[i] = available - v;
        need -= v;
        logWeight -= logFactorials[v];
      }
      pool -= table.columnTotals[j];
    }
    for (let i = 0; i < rows; i++) logWeight -= logFactorials[remaining[i]];
    if (logWeight <= threshold) hits++;
  }
  const pValue = (1 + hits) / (1 + replicates);
  return { pValue, standardError: Math.sqrt((pValue * (1 - pValue)) / replicates), hits };
}
