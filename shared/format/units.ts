// How a unit reads beside a number, as a scientist writes it: "1 region", "3 regions", "3–4 regions",
// "per 1 region", "12.5 mm". Codebooks give units in the plural ("regions"); symbols ("mm", "km2",
// "Ma") stay as they are. Shared by the client and by the statistics that name their steps.

/** Plurals that do not end in a plain "s", and words that are the same in both numbers. */
const IRREGULAR_SINGULAR: Record<string, string> = {
  taxa: "taxon",
  genera: "genus",
  species: "species",
  series: "series",
  individuals: "individual",
  data: "datum",
  strata: "stratum",
  localities: "locality",
  specimens: "specimen",
  occurrences: "occurrence",
  collections: "collection",
};

/** Units that only say "this is a count": a step of one is then simply one more, "per 1 unit". */
const COUNT_WORDS = new Set(["count", "counts", "number", "numbers", "n", "no", "no.", "#", "unit", "units"]);

/**
 * The singular of a unit written in the plural: "regions" -> "region", "localities" -> "locality",
 * "taxa" -> "taxon"; symbols and singular words stay ("mm", "km2", "species", "mass").
 *
 * @example
 * unitSingular("regions") // => "region"
 */
export function unitSingular(unit: string): string {
  const trimmed = unit.trim();
  const lower = trimmed.toLowerCase();
  if (IRREGULAR_SINGULAR[lower] !== undefined) return IRREGULAR_SINGULAR[lower];
  // A word of three letters or more ending in -ies: "colonies" -> "colony".
  if (/^[a-z]{2,}ies$/i.test(trimmed)) return `${trimmed.slice(0, -3)}y`;
  // A plain plural: a word of at least four letters ending in one "s" after a letter that is not s, i, u or e.
  if (/^[a-z]{2,}[^siue\W\d]s$/i.test(trimmed)) return trimmed.slice(0, -1);
  return trimmed;
}

/** Whether a unit only says that the value is a count ("count", "number", "n"). */
export function isCountUnit(unit: string | null | undefined): boolean {
  return unit !== null && unit !== undefined && COUNT_WORDS.has(unit.trim().toLowerCase());
}

/**
 * The unit as it reads after a number: singular after exactly 1, as given otherwise; nothing for a
 * unit that only says "count".
 *
 * @example
 * unitAfter(1, "regions") // => "region"
 */
export function unitAfter(value: number, unit: string | null | undefined): string {
  if (!unit || isCountUnit(unit)) return "";
  return Math.abs(value) === 1 ? unitSingular(unit) : unit.trim();
}

/**
 * A number with its unit: "1 region", "3 regions", "12.5 mm", "4" (a count).
 *
 * @example
 * formatQuantity(1, "regions") // => "1 region"
 */
export function formatQuantity(value: number, unit: string | null | undefined, format: (v: number) => string = String): string {
  const word = unitAfter(value, unit);
  return word ? `${format(value)} ${word}` : format(value);
}

/**
 * A span of values with its unit, the unit in the plural unless the span is the single value 1:
 * "1 region", "3–4 regions", "0.15–14.8 mm".
 *
 * @example
 * formatQuantityRange(3, 4, "regions", String) // => "3–4 regions"
 */
export function formatQuantityRange(low: number, high: number, unit: string | null | undefined, format: (v: number) => string = String): string {
  if (low === high) return formatQuantity(low, unit, format);
  const word = unit && !isCountUnit(unit) ? unit.trim() : "";
  return `${format(low)}–${format(high)}${word ? ` ${word}` : ""}`;
}

/**
 * What one step of a numeric odds ratio is, for a unit: "per 1 region", "per 1 mm"; "per 1 unit"
 * when there is no unit or the unit only says "count".
 *
 * @example
 * perStep("regions") // => "per 1 region"
 */
export function perStep(unit: string | null | undefined): string {
  if (!unit || isCountUnit(unit)) return "per 1 unit";
  return `per 1 ${unitSingular(unit)}`;
}
