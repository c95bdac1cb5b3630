// A taxon as the services edit it: one object per row with fields named as the audit trail names
// them (name, higherTaxon, notes, fad, lad, or a trait id), and the snapshot a taxon-level coding
// decision stores.
import { randomUUID } from "node:crypto";
import type { RangeEnd, TraitValue } from "../../shared/schemas/taxa";

/** A taxon as the services edit it: one object per row, fields as the audit trail names them. */
export interface TaxonState {
  id: string;
  name: string;
  higherTaxon: string;
  fadMa: number | null;
  fadInterval: string | null;
  ladMa: number | null;
  ladInterval: string | null;
  notes: string;
  traitValues: Record<string, TraitValue>;
  version: number;
  updatedAt: Date;
  deletedAt: Date | null;
}

/** A taxon not yet stored: a new id, version 1, nothing set but its name and higher taxon. */
export const newTaxonState = (name: string, higherTaxon = ""): TaxonState => ({
  id: randomUUID(),
  name,
  higherTaxon,
  fadMa: null,
  fadInterval: null,
  ladMa: null,
  ladInterval: null,
  notes: "",
  traitValues: {},
  version: 1,
  updatedAt: new Date(),
  deletedAt: null,
});

/** The value of a whole taxon in a coding decision (create, delete, restore). */
export interface TaxonSnapshot {
  name: string;
  higherTaxon: string;
  fad: RangeEnd;
  lad: RangeEnd;
  notes: string;
  values: Record<string, TraitValue>;
}

export const TAXON_FIELDS = ["name", "higherTaxon", "notes", "fad", "lad"] as const;
export type TaxonField = (typeof TAXON_FIELDS)[number];
export const isTaxonField = (f: string): f is TaxonField => (TAXON_FIELDS as readonly string[]).includes(f);

const rangeEnd = (ma: number | null, interval: string | null): RangeEnd => (ma === null ? null : { ma, interval });

/** The value of one field (a taxon column or a trait id) of a taxon; null when empty. */
export function fieldValue(s: TaxonState, field: string): unknown {
  switch (field) {
    case "name":
      return s.name;
    case "higherTaxon":
      return s.higherTaxon;
    case "notes":
      return s.notes;
    case "fad":
      return rangeEnd(s.fadMa, s.fadInterval);
    case "lad":
      return rangeEnd(s.ladMa, s.ladInterval);
    default:
      return s.traitValues[field] ?? null;
  }
}

/** Sets one field; null clears it (a trait value is then absent). */
export function setField(s: TaxonState, field: string, value: unknown): void {
  switch (field) {
    case "name":
      s.name = String(value);
      return;
    case "higherTaxon":
      s.higherTaxon = value === null ? "" : String(value);
      return;
    case "notes":
      s.notes = value === null ? "" : String(value);
      return;
    case "fad":
    case "lad": {
      const end = value as RangeEnd;
      if (field === "fad") [s.fadMa, s.fadInterval] = end ? [end.ma, end.interval] : [null, null];
      else [s.ladMa, s.ladInterval] = end ? [end.ma, end.interval] : [null, null];
      return;
    }
    default: {
      const values = { ...s.traitValues };
      if (value === null || value === undefined) delete values[field];
      else values[field] = value as TraitValue;
      s.traitValues = values;
    }
  }
}

/** Empty values need no reason to be filled in. */
export const isEmptyValue = (v: unknown) => v === null || v === undefined || v === "";

export function snapshotOf(s: TaxonState): TaxonSnapshot {
  return {
    name: s.name,
    higherTaxon: s.higherTaxon,
    fad: rangeEnd(s.fadMa, s.fadInterval),
    lad: rangeEnd(s.ladMa, s.ladInterval),
    notes: s.notes,
    values: { ...s.traitValues },
  };
}

/** The state a snapshot describes (for restoring a removed taxon). */
export function applySnapshot(s: TaxonState, snap: TaxonSnapshot): void {
  s.name = snap.name;
  s.higherTaxon = snap.higherTaxon;
  setField(s, "fad", snap.fad);
  setField(s, "lad", snap.lad);
  s.notes = snap.notes;
  s.traitValues = { ...snap.values };
}

/** One field's value inside a taxon-level decision's snapshot (for the history of one cell). */
export function snapshotField(snap: unknown, field: string): unknown {
  if (!snap || typeof snap !== "object") return null;
  const s = snap as Partial<TaxonSnapshot>;
  if (isTaxonField(field)) return (s as Record<string, unknown>)[field] ?? null;
  return s.values?.[field] ?? null;
}
