// How ages (Ma, before present) and durations (Myr) read, in the client and in the text the shared
// code writes. Two rules, so a view never shows "94 Ma" beside "94.41 Ma":
// - an age keeps every decimal it has (never rounded away or padded: a chart boundary reads as the
//   chart gives it, 93.9 or 251.902, the same in every heading, chart and sentence), with at least
//   one, as the chart prints its round figures ("66.0");
// - a column or list of recorded ages (a taxon's range in the trait table, finds, the outcome
//   lists, ranges from finds, time bins) is written to one number of decimals, the most any of
//   them needs (agesWriter): 94.00 beside 94.41.
// Durations follow the same rules. At most four decimals (the chart's youngest bases: 0.0042 Ma).

/** The most decimals an age or duration is written with (the chart's 0.0042 Ma needs four). */
export const MAX_AGE_DECIMALS = 4;
/** The fewest: the chart prints its round bases with one decimal ("66.0", "307.0"). */
export const MIN_AGE_DECIMALS = 1;

const formats = new Map<number, Intl.NumberFormat>();

function formatWith(decimals: number): Intl.NumberFormat {
  let format = formats.get(decimals);
  if (!format) {
    format = new Intl.NumberFormat("en-GB", { minimumFractionDigits: decimals, maximumFractionDigits: decimals });
    formats.set(decimals, format);
  }
  return format;
}

/**
 * The decimals one age needs to be written exactly (trailing zeros aside), between one and four;
 * sums such as 93.9 + 6.6 = 100.49999999999999 count as the 100.5 they are.
 *
 * @example
 * ageDecimals(251.902) // => 3
 */
export function ageDecimals(age: number): number {
  if (!Number.isFinite(age)) return MIN_AGE_DECIMALS;
  for (let decimals = MIN_AGE_DECIMALS; decimals < MAX_AGE_DECIMALS; decimals++) {
    const scaled = age * 10 ** decimals;
    if (Math.abs(scaled - Math.round(scaled)) < 1e-6) return decimals;
  }
  return MAX_AGE_DECIMALS;
}

/**
 * The decimals for ages shown together: the most any of them needs, so every one is written exactly
 * and all alike. Missing values are passed over.
 *
 * @example
 * sharedAgeDecimals([94, 94.41, 93.9]) // => 2
 */
export function sharedAgeDecimals(ages: Iterable<number | null | undefined>): number {
  let decimals = MIN_AGE_DECIMALS;
  for (const age of ages) if (age !== null && age !== undefined && Number.isFinite(age)) decimals = Math.max(decimals, ageDecimals(age));
  return decimals;
}

/**
 * An age or duration without its unit: "93.9", "66.0", "94.00" (with decimals given), "4,567.0".
 *
 * @example
 * formatAgeNumber(94, 2) // => "94.00"
 */
export function formatAgeNumber(age: number, decimals: number = ageDecimals(age)): string {
  return formatWith(Math.min(MAX_AGE_DECIMALS, Math.max(0, Math.round(decimals)))).format(age);
}

/**
 * An age before present: "93.9 Ma", "66.0 Ma"; "94.00 Ma" with two decimals to match its neighbours.
 *
 * @example
 * formatMa(251.902) // => "251.902 Ma"
 */
export function formatMa(age: number, decimals?: number): string {
  return `${formatAgeNumber(age, decimals)} Ma`;
}

/**
 * A duration in millions of years: "6.6 Myr", "6.60 Myr" beside ages with two decimals.
 *
 * @example
 * formatMyr(6.6) // => "6.6 Myr"
 */
export function formatMyr(duration: number, decimals?: number): string {
  return `${formatAgeNumber(duration, decimals)} Myr`;
}

export interface AgeWriter {
  /** The decimals every age of the view is written with. */
  readonly decimals: number;
  number(age: number): string;
  ma(age: number): string;
  myr(duration: number): string;
}

/**
 * Writes a column or list of recorded ages alike: give it every age the column shows.
 *
 * @example
 * const write = agesWriter([94, 94.41]);
 * write.ma(94) // => "94.00 Ma"
 */
export function agesWriter(ages: Iterable<number | null | undefined>): AgeWriter {
  const decimals = sharedAgeDecimals(ages);
  return {
    decimals,
    number: (age) => formatAgeNumber(age, decimals),
    ma: (age) => formatMa(age, decimals),
    myr: (duration) => formatMyr(duration, decimals),
  };
}
