import { expect } from "vitest";
import type { SelectivityOptions, SelectivityTaxon, SelectivityTraitSpec } from "@shared/selectivity";

export const DEFAULT_OPTIONS: SelectivityOptions = { correction: "bh", forceFirth: false, level: 0.95, confoundingThreshold: 0.1 };

/** A trait with states, each state labelled by its code with a capital first letter. */
export function stateTrait(key: string, label: string, codes: string[], extra: Partial<SelectivityTraitSpec> = {}): SelectivityTraitSpec {
  return {
    key,
    label,
    kind: codes.length === 2 ? "binary" : "categorical",
    states: codes.map((code) => ({ code, label: code[0].toUpperCase() + code.slice(1) })),
    transform: "none",
    standardise: false,
    ...extra,
  };
}

export function numericTrait(key: string, label: string, extra: Partial<SelectivityTraitSpec> = {}): SelectivityTraitSpec {
  return { key, label, kind: "numeric", states: [], transform: "log10", standardise: true, ...extra };
}

/** An invented taxon. */
export function taxon(name: string, clade: string, outcome: 0 | 1, values: SelectivityTaxon["values"]): SelectivityTaxon {
  return { id: name, name, clade, outcome, values };
}

/**
 * Asserts that a result is plain JSON: every number finite (no NaN or Infinity, which JSON cannot
 * carry), and a JSON round trip gives the same object.
 */
export function expectPlainJson(value: unknown): void {
  const walk = (v: unknown, path: string): void => {
    if (typeof v === "number") expect(Number.isFinite(v), `${path} is ${v}`).toBe(true);
    else if (Array.isArray(v)) v.forEach((item, i) => walk(item, `${path}[${i}]`));
    else if (v && typeof v === "object") for (const [k, item] of Object.entries(v)) walk(item, `${path}.${k}`);
    else expect(["string", "boolean"].includes(typeof v) || v === null, `${path} is ${String(v)}`).toBe(true);
  };
  walk(value, "result");
  expect(JSON.parse(JSON.stringify(value))).toEqual(value);
}
