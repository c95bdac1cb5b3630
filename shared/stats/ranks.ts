// Ranks with ties, shared by the rank-based statistics.

/** Ranks 1..n of the values, tied values sharing the average of the ranks they span. */
export function averageRanks(values: ArrayLike<number>): Float64Array {
  const n = values.length;
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => values[a] - values[b]);
  const ranks = new Float64Array(n);
  let start = 0;
  while (start < n) {
    let end = start;
    while (end + 1 < n && values[order[end + 1]] === values[order[start]]) end++;
    const shared = (start + end) / 2 + 1;
    for (let k = start; k <= end; k++) ranks[order[k]] = shared;
    start = end + 1;
  }
  return ranks;
}
