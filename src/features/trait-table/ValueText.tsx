import type { Trait } from "@shared/schemas/traits";
import { formatStoredValue, isEmptyValue } from "./cellValues";

/** A stored value in a history or conflict view; missing values read "missing", muted. */
export function ValueText({ field, value, traits }: { field: string; value: unknown; traits: Map<string, Trait> }) {
  if (isEmptyValue(value)) return <span className="text-stone-500 italic">missing</span>;
  return <span className="font-medium text-stone-900">{formatStoredValue(field, value, traits)}</span>;
}
