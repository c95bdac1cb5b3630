import { fisherExact } from "../stats";
import { formatNumber } from "./formatNumber";
import type { StateCounts } from "./stateTable";
import type { SelectivityTraitSpec } from "./types";

/** A trait's own test of association with extinction; pValue null when no test was possible. */
export interface TraitTest {
  method: string;
  pValue: number | null;
  statistic?: number;
  df?: number;
}

/**
 * Fisher's exact test of states by outcome (Fisher 1935): the hypergeometric test for two states
 * with taxa, the Freeman-Halton extension for more (Freeman & Halton 1951), exact while that is
 * tractable and otherwise a seeded Monte Carlo estimate; the method says which. States without taxa
 * do not enter. No test is possible, and the method says why, when fewer than two states have taxa
 * or when every taxon with a value had the same outcome.
 *
 * @example
 * testStateTrait(spec with states a, b, { victims: [3, 1], survivors: [1, 3] })
 * // => { method: "Fisher exact test, 2 states x 2 outcomes, two-sided", pValue: 0.4857 (= 34/70) }
 */
export function testStateTrait(spec: SelectivityTraitSpec, counts: StateCounts): TraitTest {
  const present: number[] = [];
  let victims = 0;
  let survivors = 0;
  for (let s = 0; s < spec.states.length; s++) {
    if (counts.victims[s] + counts.survivors[s] > 0) present.push(s);
    victims += counts.victims[s];
    survivors += counts.survivors[s];
  }
  const untestable = whyNoTest(spec, present, victims, survivors);
  if (untestable) return { method: untestable, pValue: null };
  const table = present.map((s) => [counts.victims[s], counts.survivors[s]]);
  const result = fisherExact(table);
  const shape = `${present.length} states x 2 outcomes`;
  if (result.method === "exact-2x2") return { method: `Fisher exact test, ${shape}, two-sided`, pValue: result.pValue };
  if (result.method === "exact-rxc") return { method: `Fisher-Freeman-Halton exact test, ${shape}, two-sided`, pValue: result.pValue };
  const mc = result.monteCarlo;
  const replicates = mc ? mc.replicates : 0;
  const tables = `${replicates.toLocaleString("en-US")} random tables with the observed margins (seed ${mc?.seed ?? ""})`;
  // (1 + hits) / (1 + B) = 1 / (1 + B) means no random table was as extreme: p is only bounded.
  const floor = mc !== undefined && Math.abs(result.pValue * (1 + replicates) - 1) < 1e-9;
  const detail = floor
    ? `none of ${tables} was as extreme as the observed one, so p is at most ${formatNumber(result.pValue)}, reported as that bound`
    : `p estimated from ${tables}, standard error ${formatNumber(mc?.standardError ?? NaN)}`;
  return { method: `Fisher-Freeman-Halton test, ${shape}, two-sided, by Monte Carlo because exact enumeration would take too long: ${detail}`, pValue: result.pValue };
}

/** Why no test is possible, or null when it is. */
export function whyNoTest(spec: SelectivityTraitSpec, present: number[], victims: number, survivors: number): string | null {
  if (present.length === 0) return `No test: no taxon has a usable value of ${spec.label}.`;
  if (present.length === 1) {
    return `No test: every taxon with a value of ${spec.label} is ${spec.states[present[0]].label}; a comparison needs taxa in at least two states.`;
  }
  return whyNoOutcomeContrast(victims, survivors);
}

/** Why outcomes cannot be compared (all victims or all survivors), or null. */
export function whyNoOutcomeContrast(victims: number, survivors: number): string | null {
  if (victims === 0) return `No test: all ${survivors} taxa with a value survived; a comparison needs both victims and survivors.`;
  if (survivors === 0) return `No test: all ${victims} taxa with a value died out; a comparison needs both victims and survivors.`;
  return null;
}
