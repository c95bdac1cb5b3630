// Shared input checks for the outcome functions. Ages are in Ma (larger is older).

/** A stratigraphic range: first appearance (fad) and last appearance (lad), in Ma, fad >= lad. */
export interface TaxonRange {
  fad: number;
  lad: number;
}

/** Why a range cannot be used: 'missing' (an age is null, undefined or NaN) or 'invalid'. */
export interface RangeProblem {
  kind: "missing" | "invalid";
  message: string;
}

function ageProblem(value: unknown, label: string): RangeProblem | null {
  if (value === null || value === undefined) return { kind: "missing", message: `${label} is missing` };
  if (typeof value !== "number") return { kind: "invalid", message: `${label} is not a number (got ${typeof value})` };
  if (Number.isNaN(value)) return { kind: "missing", message: `${label} is NaN, not an age in Ma` };
  if (!Number.isFinite(value)) return { kind: "invalid", message: `${label} is not finite (${value})` };
  if (value < 0) return { kind: "invalid", message: `${label} is negative (${value}); ages are Ma before present` };
  return null;
}

/** The first thing wrong with a taxon's range, or null when it is usable. */
export function rangeProblem(taxon: { fad?: unknown; lad?: unknown }): RangeProblem | null {
  const fadProblem = ageProblem(taxon.fad, "first appearance (fad)");
  if (fadProblem) return fadProblem;
  const ladProblem = ageProblem(taxon.lad, "last appearance (lad)");
  if (ladProblem) return ladProblem;
  const fad = taxon.fad as number;
  const lad = taxon.lad as number;
  if (fad < lad) {
    return { kind: "invalid", message: `inverted range: fad ${fad} Ma is younger than lad ${lad} Ma (fad must be >= lad)` };
  }
  return null;
}

/** Throws an Error naming the index of the first taxon whose range is missing, NaN, negative or inverted. */
export function assertValidRanges(taxa: ReadonlyArray<{ fad: number; lad: number }>): void {
  if (!Array.isArray(taxa)) throw new Error("taxa must be an array of { fad, lad }");
  taxa.forEach((taxon, index) => {
    if (taxon === null || typeof taxon !== "object") throw new Error(`Taxon at index ${index} is not an object with fad and lad`);
    const problem = rangeProblem(taxon);
    if (problem) throw new Error(`Taxon at index ${index}: ${problem.message}`);
  });
}

/** Throws unless `value` is a finite, non-negative number. */
export function assertNonNegative(value: number, label: string): void {
  if (typeof value !== "number" || !Number.isFinite(value)) throw new Error(`${label} must be a finite number, got ${String(value)}`);
  if (value < 0) throw new Error(`${label} must not be negative, got ${value}`);
}

/** A time interval between two ages: base (older) > top (younger). */
export interface NamedInterval {
  name: string;
  base: number;
  top: number;
}

/** Throws an Error naming the index (and name) of the first interval whose limits are unusable. */
export function assertValidIntervals(intervals: ReadonlyArray<NamedInterval>): void {
  if (!Array.isArray(intervals)) throw new Error("intervals must be an array of { name, base, top }");
  intervals.forEach((interval, index) => {
    const label = `Interval at index ${index} (${String(interval?.name)})`;
    assertNonNegative(interval?.base, `${label}: base`);
    assertNonNegative(interval?.top, `${label}: top`);
    if (!(interval.base > interval.top)) {
      throw new Error(`${label}: base ${interval.base} Ma must be older (larger) than top ${interval.top} Ma`);
    }
  });
}
