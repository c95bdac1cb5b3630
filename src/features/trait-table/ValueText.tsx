import type { Trait } from "@shared/schemas/traits";
import { formatStoredValue, isEmptyValue } from "./cellValues";

/** A stored value in a history or conflict view; missing values read "missing", muted. ageDecimals writes an age like the others of the view. */
export function ValueText({ field, value, traits, ageDecimals }: { field: string; value: unknown; traits: Map<string, Trait>; ageDecimals?: number }) {
  if (isEmptyValue(value)) return <span className="text-stone-500 italic">missing</span>;
  return <span className="font-medium text-stone-900">{formatStoredValue(field, value, traits, ageDecimals)}</span>;
}
