import type { SelectivityTraitSpec } from "./types";
import { perStep } from "../format/units";

/** How a numeric trait enters the regressions: x = (transformed value - center) / scale. */
export interface NumericScaling {
  center: number;
  scale: number;
  /** Taxa with a usable value. */
  count: number;
  /** Fewer than two distinct values: no slope can be estimated. */
  constant: boolean;
}

/**
 * The centre and scale of a numeric trait, from every taxon with a usable value (NaN skipped): its
 * mean and sample standard deviation (n - 1) when the trait is standardised, so odds ratios are per
 * standard deviation; otherwise 0 and 1, so they are per unit of the transformed value. The same
 * scaling serves the trait's own test, the clade-adjusted fit and the multiple regression, which
 * keeps their odds ratios comparable.
 *
 * @example
 * scaleNumericTrait({ standardise: true, ... }, Float64Array.of(1, 2, 3, NaN))
 * // => { center: 2, scale: 1, count: 3, constant: false }
 */
export function scaleNumericTrait(spec: SelectivityTraitSpec, transformed: Float64Array): NumericScaling {
  let count = 0;
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < transformed.length; i++) {
    const v = transformed[i];
    if (Number.isNaN(v)) continue;
    count++;
    sum += v;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  const constant = !(max > min);
  if (!spec.standardise || constant) return { center: 0, scale: 1, count, constant };
  const mean = sum / count;
  let squares = 0;
  for (let i = 0; i < transformed.length; i++) {
    const v = transformed[i];
    if (!Number.isNaN(v)) squares += (v - mean) * (v - mean);
  }
  return { center: mean, scale: Math.sqrt(squares / (count - 1)), count, constant };
}

/** "per SD", "per 1 log10 unit", "per 1 mm", "per 1 region" or "per 1 unit": what one step of a numeric odds ratio is. */
export function numericStep(spec: SelectivityTraitSpec): string {
  if (spec.standardise) return "per SD";
  if (spec.transform === "log10") return "per 1 log10 unit";
  // Units are written in the plural in codebooks ("regions"); one step reads in the singular, and a
  // unit that only says "count" is one unit ("per 1 unit", not "per 1 count").
  return perStep(spec.unit);
}

/** "Body size (log10, per SD)": a numeric predictor named for tables. */
export function numericPredictorLabel(spec: SelectivityTraitSpec): string {
  return spec.transform === "log10" ? `${spec.label} (log10, ${numericStep(spec)})` : `${spec.label} (${numericStep(spec)})`;
}
