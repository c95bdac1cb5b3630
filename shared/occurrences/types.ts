// Shared shapes of the occurrence functions (deriveRanges.ts, threeTimerRates.ts).

/** One dated find of a taxon: ages in Ma (larger is older), maxMa >= minMa. */
export interface Occurrence {
  taxon: string;
  higherTaxon?: string | null;
  maxMa: number;
  minMa: number;
  collection?: string | null;
}

/** A time bin for the three-timer counts, ages in Ma. */
export interface TimeBin {
  name: string;
  baseMa: number;
  topMa: number;
}

/** Throws unless every occurrence has finite ages with maxMa >= minMa; the message names the index. */
export function assertValidOccurrences(occurrences: ReadonlyArray<Occurrence>): void {
  for (let index = 0; index < occurrences.length; index++) {
    const occurrence = occurrences[index];
    if (!occurrence || typeof occurrence !== "object") throw new Error(`occurrence ${index} is missing`);
    const { maxMa, minMa } = occurrence;
    if (typeof maxMa !== "number" || !Number.isFinite(maxMa)) throw new Error(`occurrence ${index}: maxMa ${String(maxMa)} is not a finite number`);
    if (typeof minMa !== "number" || !Number.isFinite(minMa)) throw new Error(`occurrence ${index}: minMa ${String(minMa)} is not a finite number`);
    if (maxMa < minMa) throw new Error(`occurrence ${index}: maxMa ${maxMa} Ma is younger than minMa ${minMa} Ma (maxMa must be >= minMa)`);
  }
}

/** Trimmed text, or "" for null, undefined and non-strings. */
export function trimmed(value: string | null | undefined): string {
  return typeof value === "string" ? value.trim() : "";
}

/** Code-unit order, the order of `<` on strings (not locale order). */
export function compareCodeUnits(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}
