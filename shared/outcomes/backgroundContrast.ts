/** Fewest other values from which a robust z is reported; below this the median and MAD are too unsteady. */
export const MIN_BACKGROUND_VALUES = 5;

/** 1 / Phi^-1(3/4): makes the MAD a consistent estimate of the standard deviation of normal data. */
export const MAD_NORMAL_CONSISTENCY = 1.4826;

export interface BackgroundContrast {
  /** Robust z of values[index] against the others; null when it cannot be given (see backgroundContrast). */
  z: number | null;
  /** Median of the other values; null when no other value remains. */
  median: number | null;
  /** Median absolute deviation of the other values from their median, unscaled; null when no other value remains. */
  mad: number | null;
  /** Number of other values used (finite, non-null, not index). */
  n: number;
}

function medianOf(sorted: number[]): number {
  const middle = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}

const ascending = (a: number, b: number) => a - b;

/**
 * How far one value (e.g. the crisis stage's extinction rate q) stands out from the other values (the other
 * stages of the study): a robust z, the distance from the median of the others in units of their scaled
 * median absolute deviation (MAD),
 *   z = (values[index] - median) / (1.4826 * mad),
 * where the others are every finite, non-null value except values[index], median is their median and mad the
 * median of their absolute deviations from it (unscaled). The factor 1.4826 = 1 / Phi^-1(0.75) makes the MAD
 * estimate the standard deviation under normality (Rousseeuw & Croux 1993, Alternatives to the median absolute
 * deviation, J. Am. Stat. Assoc. 88: 1273-1283); the same robust score is the "modified z-score" of Iglewicz &
 * Hoaglin (1993, How to detect and handle outliers, ASQC Quality Press), who suggest |z| > 3.5 as an outlier.
 * The value itself is left out of its background, so a crisis cannot hide itself by widening the spread.
 *
 * z is null when values[index] is null or not finite, when fewer than 5 others remain, or when the mad is 0
 * (half or more of the others are equal: there is no spread to measure against). median and mad are null when
 * no other value remains. An index outside the array is treated as a missing value (z null).
 *
 * @example
 * backgroundContrast([0.1, 0.2, 0.3, 0.2, 0.4, 1.5], 5)
 * // others 0.1, 0.2, 0.2, 0.3, 0.4: median 0.2; |deviations| 0.1, 0, 0, 0.1, 0.2: mad 0.1
 * // { z: 8.768 (= 1.3 / 0.14826), median: 0.2, mad: 0.1, n: 5 }
 */
export function backgroundContrast(values: Array<number | null>, index: number): BackgroundContrast {
  const others: number[] = [];
  values.forEach((value, position) => {
    if (position !== index && value !== null && Number.isFinite(value)) others.push(value);
  });
  const n = others.length;
  if (n === 0) return { z: null, median: null, mad: null, n };

  const median = medianOf(others.sort(ascending));
  const mad = medianOf(others.map((value) => Math.abs(value - median)).sort(ascending));
  const own = values[index];
  const z =
    own === null || own === undefined || !Number.isFinite(own) || n < MIN_BACKGROUND_VALUES || mad === 0
      ? null
      : (own - median) / (MAD_NORMAL_CONSISTENCY * mad);
  return { z, median, mad, n };
}
