import type { SelectivityTaxon, SelectivityTraitSpec } from "./types";

/** A value that was present but cannot be used, counted by reason with a few taxon names as examples. */
export interface DropReason {
  reason: string;
  count: number;
  examples: string[];
}

/** State codes of a binary, categorical or ordinal trait: index into spec.states, or a negative mark. */
export interface EncodedStates {
  kind: "states";
  /** Per taxon: the state's index in spec.states, MISSING or INVALID. */
  codes: Int32Array;
  used: number;
  missing: number;
  invalid: number;
  dropReasons: DropReason[];
}

/** Values of a numeric trait, before and after its transform. */
export interface EncodedNumbers {
  kind: "numeric";
  /** Per taxon: the raw value, NaN when missing or unusable. */
  raw: Float64Array;
  /** Per taxon: the transformed value (log10 or unchanged), NaN when missing or unusable. */
  transformed: Float64Array;
  used: number;
  missing: number;
  invalid: number;
  dropReasons: DropReason[];
}

export type EncodedTrait = EncodedStates | EncodedNumbers;

export const MISSING = -1;
export const INVALID = -2;
const EXAMPLES = 3;

/**
 * Reads one trait of every taxon into a flat array: state indices for traits with states, raw and
 * transformed numbers for numeric traits. Missing values (null, absent, blank) are counted apart
 * from present values that cannot be used (a code outside the codebook, text that is not a number, a
 * value of zero or below under log10), which are counted by reason with up to three taxon names.
 *
 * @example
 * encodeTrait({ key: "size", kind: "numeric", transform: "log10", ... }, taxa with sizes 10, null, -1)
 * // => { transformed: [1, NaN, NaN], used: 1, missing: 1, invalid: 1,
 * //      dropReasons: [{ reason: "zero or below, where log10 is undefined", count: 1, ... }] }
 */
export function encodeTrait(spec: SelectivityTraitSpec, taxa: SelectivityTaxon[]): EncodedTrait {
  const n = taxa.length;
  const reasons = new Map<string, DropReason>();
  const drop = (reason: string, name: string): void => {
    let entry = reasons.get(reason);
    if (!entry) {
      entry = { reason, count: 0, examples: [] };
      reasons.set(reason, entry);
    }
    entry.count++;
    if (entry.examples.length < EXAMPLES) entry.examples.push(name);
  };
  let used = 0;
  let missing = 0;
  let invalid = 0;
  const key = spec.key;

  if (spec.kind === "numeric") {
    const raw = new Float64Array(n).fill(NaN);
    const transformed = new Float64Array(n).fill(NaN);
    const log = spec.transform === "log10";
    for (let i = 0; i < n; i++) {
      const value = taxa[i].values[key];
      if (isMissing(value)) {
        missing++;
        continue;
      }
      const number = typeof value === "number" ? value : Number(String(value).trim());
      if (!Number.isFinite(number)) {
        invalid++;
        drop("not a number", taxa[i].name);
        continue;
      }
      if (log && number <= 0) {
        invalid++;
        drop("zero or below, where log10 is undefined", taxa[i].name);
        continue;
      }
      raw[i] = number;
      transformed[i] = log ? Math.log10(number) : number;
      used++;
    }
    return { kind: "numeric", raw, transformed, used, missing, invalid, dropReasons: [...reasons.values()] };
  }

  const index = new Map<string, number>();
  spec.states.forEach((state, s) => index.set(state.code, s));
  const codes = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    const value = taxa[i].values[key];
    if (isMissing(value)) {
      codes[i] = MISSING;
      missing++;
      continue;
    }
    const s = index.get(typeof value === "string" ? value.trim() : String(value));
    if (s === undefined) {
      codes[i] = INVALID;
      invalid++;
      drop(`a code that is not a state of ${spec.label}`, taxa[i].name);
      continue;
    }
    codes[i] = s;
    used++;
  }
  return { kind: "states", codes, used, missing, invalid, dropReasons: [...reasons.values()] };
}

function isMissing(value: unknown): boolean {
  return value === null || value === undefined || (typeof value === "string" && value.trim() === "");
}
