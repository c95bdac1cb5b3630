// Counting by binary search in arrays sorted in increasing order.

/** Number of entries of the ascending array `sorted` strictly below x. */
export function countBelow(sorted: ArrayLike<number>, x: number): number {
  let low = 0;
  let high = sorted.length;
  while (low < high) {
    const mid = (low + high) >> 1;
    if (sorted[mid] < x) low = mid + 1;
    else high = mid;
  }
  return low;
}

/** Number of entries of the ascending array `sorted` at most x. */
export function countAtMost(sorted: ArrayLike<number>, x: number): number {
  let low = 0;
  let high = sorted.length;
  while (low < high) {
    const mid = (low + high) >> 1;
    if (sorted[mid] <= x) low = mid + 1;
    else high = mid;
  }
  return low;
}
