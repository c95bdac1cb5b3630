/** In-place quicksort of keys[lo..hi] carrying values along (median of three; insertion sort for short runs). */
export function sortPairs(keys: Float64Array, values: Float64Array, lo = 0, hi = keys.length - 1): void {
  while (hi - lo > 16) {
    const mid = (lo + hi) >> 1;
    if (keys[mid] < keys[lo]) swap(keys, values, mid, lo);
    if (keys[hi] < keys[lo]) swap(keys, values, hi, lo);
    if (keys[hi] < keys[mid]) swap(keys, values, hi, mid);
    const pivot = keys[mid];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (keys[i] < pivot) i++;
      while (keys[j] > pivot) j--;
      if (i <= j) {
        swap(keys, values, i, j);
        i++;
        j--;
      }
    }
    // Recurse into the smaller part and loop on the larger, so the stack stays logarithmic.
    if (j - lo < hi - i) {
      sortPairs(keys, values, lo, j);
      lo = i;
    } else {
      sortPairs(keys, values, i, hi);
      hi = j;
    }
  }
  for (let i = lo + 1; i <= hi; i++) {
    const key = keys[i];
    const value = values[i];
    let at = i;
    while (at > lo && keys[at - 1] > key) {
      keys[at] = keys[at - 1];
      values[at] = values[at - 1];
      at--;
    }
    keys[at] = key;
    values[at] = value;
  }
}

/**
 * Sorts keys (carrying values) and merges keys that agree to within `tolerance`, adding their
 * values; returns the length kept at the front of both arrays.
 */
export function sortAndMergePairs(keys: Float64Array, values: Float64Array, tolerance: number): number {
  sortPairs(keys, values, 0, keys.length - 1);
  return mergeCloseKeys(keys, values, tolerance);
}

/** On keys already ascending: merges keys within `tolerance` of the one kept before, adding values; returns the length kept. */
export function mergeCloseKeys(keys: Float64Array, values: Float64Array, tolerance: number): number {
  let kept = 0;
  for (let i = 0; i < keys.length; i++) {
    if (kept > 0 && keys[i] - keys[kept - 1] < tolerance) {
      values[kept - 1] += values[i];
    } else {
      keys[kept] = keys[i];
      values[kept] = values[i];
      kept++;
    }
  }
  return kept;
}

function swap(keys: Float64Array, values: Float64Array, a: number, b: number): void {
  const key = keys[a];
  keys[a] = keys[b];
  keys[b] = key;
  const value = values[a];
  values[a] = values[b];
  values[b] = value;
}
