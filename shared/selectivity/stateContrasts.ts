import { mantelHaenszel, oddsRatio, type Table2x2 } from "../stats";
import type { StateCounts } from "./stateTable";
import type { ContrastResult, SelectivityTraitSpec } from "./types";

/** Victims and survivors per clade and state: cell (clade c, state s) at 2 * (c * states + s), victims first. */
export interface CladeStateCounts {
  cells: Int32Array;
  cladeCount: number;
  stateCount: number;
}

/**
 * Counts victims and survivors per clade and state (negative state indices are skipped, and so are
 * taxa without a clade, clade index -1: they are left out of clade-adjusted estimates).
 *
 * @example
 * countCladeStates(Int32Array.of(0, 1, 0), Int32Array.of(0, 0, 1), Uint8Array.of(1, 0, 0), 2, 2).cells
 * // => [1, 0, 0, 1, 0, 1, 0, 0]
 */
export function countCladeStates(codes: Int32Array, clade: Int32Array, outcome: Uint8Array, cladeCount: number, stateCount: number): CladeStateCounts {
  const cells = new Int32Array(cladeCount * stateCount * 2);
  for (let i = 0; i < codes.length; i++) {
    const s = codes[i];
    if (s < 0 || clade[i] < 0) continue;
    cells[2 * (clade[i] * stateCount + s) + (outcome[i] === 1 ? 0 : 1)]++;
  }
  return { cells, cladeCount, stateCount };
}

/**
 * Odds ratio of each state with taxa against the reference state, crude and adjusted for clade.
 *
 * - Crude: the sample odds ratio of the 2x2 table (state, reference) x (victim, survivor) with
 *   Woolf's interval (Woolf 1955); 0.5 is added to every cell when one is zero (Haldane 1956).
 * - Adjusted for clade: the Mantel-Haenszel common odds ratio over clades (Mantel & Haenszel 1959)
 *   with the Robins-Breslow-Greenland interval and the Breslow-Day test of equal odds ratios across
 *   clades (Tarone's correction). Only clades holding both states and both outcomes carry
 *   information; the others are left out and counted in the method.
 *
 * States without taxa get no contrast. The model-adjusted odds ratio and the confounding check are
 * filled in later, once the multiple regression is fitted.
 *
 * @example
 * stateContrasts(spec with states marine, nonmarine, counts { victims: [3, 1], survivors: [1, 3] }, reference 1, ...)
 * // => [{ contrast: "Marine vs Nonmarine", crude: { estimate: 9, ci: [0.3666, 220.9], method: "sample odds ratio, Woolf interval" }, ... }]
 */
export function stateContrasts(
  spec: SelectivityTraitSpec,
  counts: StateCounts,
  reference: number,
  byClade: CladeStateCounts,
  cladeNames: string[],
  level: number,
  minInformativeClades = 3,
): ContrastResult[] {
  const contrasts: ContrastResult[] = [];
  const refState = spec.states[reference];
  const { cells, cladeCount, stateCount } = byClade;
  for (let s = 0; s < spec.states.length; s++) {
    if (s === reference || counts.victims[s] + counts.survivors[s] === 0) continue;
    const state = spec.states[s];
    const notes: string[] = [];
    const crudeTable: Table2x2 = [
      [counts.victims[s], counts.survivors[s]],
      [counts.victims[reference], counts.survivors[reference]],
    ];
    const crude = oddsRatio(crudeTable, { level });
    const crudeMethod = crude.corrected
      ? "sample odds ratio with 0.5 added to every cell because one is zero (Haldane-Anscombe), Woolf interval"
      : "sample odds ratio, Woolf interval";

    const strata: Table2x2[] = [];
    const strataClades: number[] = [];
    let withTaxa = 0;
    for (let c = 0; c < cladeCount; c++) {
      const a = cells[2 * (c * stateCount + s)];
      const b = cells[2 * (c * stateCount + s) + 1];
      const cc = cells[2 * (c * stateCount + reference)];
      const d = cells[2 * (c * stateCount + reference) + 1];
      if (a + b + cc + d > 0) withTaxa++;
      if (a + b > 0 && cc + d > 0 && a + cc > 0 && b + d > 0) {
        strata.push([[a, b], [cc, d]]);
        strataClades.push(c);
      }
    }
    let cladeAdjusted: ContrastResult["cladeAdjusted"] = null;
    if (strata.length === 0) {
      notes.push(
        `No clade holds both ${state.label} and ${refState.label} taxa with both victims and survivors among them, so the odds ratio within clades cannot be estimated.`,
      );
    } else {
      const mh = mantelHaenszel(strata, { level });
      if (mh.oddsRatio > 0 && Number.isFinite(mh.oddsRatio) && Number.isFinite(mh.ci[0]) && Number.isFinite(mh.ci[1])) {
        const left = withTaxa - strata.length;
        const single = strata.length === 1 ? ` (only ${cladeNames[strataClades[0]]})` : "";
        const thin = strata.length < minInformativeClades;
        if (thin) {
          notes.push(
            `Thin: the clade-adjusted odds ratio rests on ${strata.length} informative clade${strata.length === 1 ? "" : "s"}${single}, fewer than the ${minInformativeClades} the run asks for; it is shown but never flags confounding on its own.`,
          );
        }
        cladeAdjusted = {
          estimate: mh.oddsRatio,
          ci: [mh.ci[0], mh.ci[1]],
          informativeClades: strata.length,
          thin,
          method:
            `Mantel-Haenszel over ${strata.length} clade${strata.length === 1 ? "" : "s"}${single} holding both states and both outcomes` +
            (left === 1 ? "; 1 other clade with these states carries no information and is left out" : "") +
            (left > 1 ? `; ${left} other clades with these states carry no information and are left out` : "") +
            ", Robins-Breslow-Greenland interval",
        };
        const bd = mh.breslowDay;
        if (Number.isFinite(bd.chiSquare) && Number.isFinite(bd.pValue) && bd.df >= 1) {
          cladeAdjusted.breslowDay = { chiSquare: bd.chiSquare, df: bd.df, pValue: bd.pValue };
        } else {
          notes.push("The Breslow-Day test of equal odds ratios across clades needs at least two clades with every margin filled; there are fewer.");
        }
      } else {
        const which = mh.oddsRatio === 0 ? "zero" : "infinite";
        notes.push(
          `Within clades the odds ratio of ${state.label} against ${refState.label} is ${which}: every clade holding both has an empty cell on the same side, so no clade-adjusted value is given.`,
        );
      }
    }
    contrasts.push({
      contrast: `${state.label} vs ${refState.label}`,
      state: state.code,
      reference: refState.code,
      crude: { estimate: crude.estimate, ci: [crude.ci[0], crude.ci[1]], method: crudeMethod },
      cladeAdjusted,
      modelAdjusted: null,
      changeOnCladeAdjustment: null,
      changeOnModelAdjustment: null,
      cladeCheck: null,
      modelCheck: null,
      flagged: false,
      notes,
    });
  }
  return contrasts;
}
