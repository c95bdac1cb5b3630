import type { StateCounts } from "./stateTable";
import type { SelectivityTraitSpec } from "./types";

/**
 * The reference state of a trait's odds ratios: the one the study chose when it has taxa, otherwise
 * the most common state (ties go to the state listed first in the codebook). Returns -1 when no
 * state has taxa, and a note when the chosen reference could not be used.
 *
 * @example
 * chooseReference(spec with states a, b, c and no reference, { victims: [1, 4, 4], survivors: [0, 2, 2] })
 * // => { index: 1, note: null } (b and c both hold 6 taxa; b comes first in the codebook)
 */
export function chooseReference(spec: SelectivityTraitSpec, counts: StateCounts): { index: number; note: string | null } {
  let largest = -1;
  let largestCount = 0;
  for (let s = 0; s < spec.states.length; s++) {
    const count = counts.victims[s] + counts.survivors[s];
    if (count > largestCount) {
      largest = s;
      largestCount = count;
    }
  }
  if (spec.reference === undefined || spec.reference === null || spec.reference === "") return { index: largest, note: null };
  const chosen = spec.states.findIndex((state) => state.code === spec.reference);
  if (chosen < 0) {
    const fallback = largest >= 0 ? `; the most common state, ${spec.states[largest].label}, is used instead` : "";
    return { index: largest, note: `The chosen reference "${spec.reference}" is not a state of ${spec.label}${fallback}.` };
  }
  if (counts.victims[chosen] + counts.survivors[chosen] === 0) {
    const fallback = largest >= 0 ? `; the most common state, ${spec.states[largest].label}, is used instead` : "";
    return { index: largest, note: `The chosen reference ${spec.states[chosen].label} has no taxa${fallback}.` };
  }
  return { index: chosen, note: null };
}
