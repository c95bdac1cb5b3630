import { wilsonInterval } from "../stats";
import type { SelectivityTraitSpec, StateRow } from "./types";

/** Victims and survivors per state of one trait. */
export interface StateCounts {
  victims: Int32Array;
  survivors: Int32Array;
}

/**
 * Counts victims and survivors per state from state indices (negative: missing or unusable, skipped)
 * and 0/1 outcomes: the contingency table of states by outcome.
 *
 * @example
 * countStates(Int32Array.of(0, 0, 1, -1), Uint8Array.of(1, 0, 1, 1), 2)
 * // => { victims: [1, 1], survivors: [1, 0] }
 */
export function countStates(codes: Int32Array, outcome: Uint8Array, stateCount: number): StateCounts {
  const victims = new Int32Array(stateCount);
  const survivors = new Int32Array(stateCount);
  for (let i = 0; i < codes.length; i++) {
    const s = codes[i];
    if (s < 0) continue;
    if (outcome[i] === 1) victims[s]++;
    else survivors[s]++;
  }
  return { victims, survivors };
}

/**
 * One table row per codebook state, in codebook order, with the extinction proportion and its
 * Wilson score interval (Wilson 1927). States with no taxa keep their row with zero counts and no
 * proportion.
 *
 * @example
 * stateRows(spec with states marine, nonmarine, { victims: [3, 1], survivors: [1, 3] }, 0.95)
 * // => [{ state: "marine", victims: 3, survivors: 1, proportion: 0.75, ci: [0.3006, 0.9544] }, ...]
 */
export function stateRows(spec: SelectivityTraitSpec, counts: StateCounts, level: number): StateRow[] {
  return spec.states.map((state, s) => proportionRow(state.code, state.label, counts.victims[s], counts.survivors[s], level));
}

/** A row of the table: counts, extinction proportion and Wilson interval (null when empty). */
export function proportionRow(state: string, label: string, victims: number, survivors: number, level: number): StateRow {
  const n = victims + survivors;
  return {
    state,
    label,
    victims,
    survivors,
    proportion: n > 0 ? victims / n : null,
    ci: n > 0 ? wilsonInterval(victims, n, { level }) : null,
  };
}
