// How imported values read on the imports screen: states by label, ranges as ages or intervals.
import type { Trait } from "@shared/schemas/traits";
import { formatMa, formatMeasurement } from "../../lib/format";

const FIELD_LABELS: Record<string, string> = {
  name: "Name",
  higherTaxon: "Higher taxon",
  notes: "Notes",
  fad: "First appearance",
  lad: "Last appearance",
  taxon: "Taxon",
};

export function fieldLabel(field: string, traitId: string | null, traits: Map<string, Trait>, traitKey?: string | null): string {
  if (traitId) return traits.get(traitId)?.label ?? traitKey ?? "Trait";
  return FIELD_LABELS[field] ?? traits.get(field)?.label ?? field;
}

export function formatImportValue(value: unknown, trait: Trait | undefined): string | null {
  if (value === null || value === undefined || value === "") return null;
  if (typeof value === "object") {
    const v = value as { ma?: number; interval?: string | null; name?: string };
    if (typeof v.ma === "number") return v.interval ? `${v.interval} (${formatMa(v.ma)})` : formatMa(v.ma);
    if (typeof v.name === "string") return v.name;
    return JSON.stringify(value);
  }
  if (trait && trait.kind !== "numeric") return trait.states.find((s) => s.code === value)?.label ?? String(value);
  if (typeof value === "number") return formatMeasurement(value, trait?.unit);
  return String(value);
}
