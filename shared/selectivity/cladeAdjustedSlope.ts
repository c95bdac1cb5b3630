import { buildDesignMatrix, logisticRegression, type LogisticRegressionResult } from "../stats";
import { twoSidedCriticalValue } from "../stats/distributions";
import { numericPredictorLabel, type NumericScaling } from "./scaleNumericTrait";
import { fitPrepared, prepareConditionalStrata } from "../stats/conditionalLogistic";
import { conditionalShape, type CladeGroup } from "./cladeConfounding";
import { fitStratifiedSlope } from "./stratifiedSlope";

/** Above this many recursion steps (sum over clades of size x cases) the conditional fit gives way to the stratified one. */
export const CONDITIONAL_WORK_LIMIT = 2_000_000;

/** Steps of one conditional log-likelihood evaluation: sum over strata of members x cases. */
export function conditionalWork(strata: Array<{ x: Float64Array; cases: number }>): number {
  return strata.reduce((a, s) => a + s.x.length * s.cases, 0);
}
import { plainMessage } from "./testNumericTrait";
import type { ContrastResult, SelectivityTraitSpec } from "./types";

/**
 * The odds ratio of a numeric trait adjusted for clade: a conditional logistic regression of
 * extinction on the trait with clade as strata (Breslow & Day 1980, vol. 1, ch. 7), with a Wald
 * interval from the conditional information. Conditioning on each clade's number of victims removes
 * the clade intercepts from the likelihood; an ordinary regression with one intercept per clade
 * would give a slope biased away from zero over many small clades (the incidental-parameters
 * problem). Only clades holding both outcomes and two or more values carry information; the others
 * are left out and counted, and so are taxa without a clade. When the values separate the outcomes
 * within every informative clade, the conditional estimate is infinite and the statistics engine's
 * logistic regression with clade terms takes over with Firth's bias-reduced fit (Firth 1993).
 *
 * Also returns the clade groups (scaled values and outcomes per clade) and the conditional log
 * odds ratio, which the confounding judgement reuses.
 *
 * @example
 * cladeAdjustedSlope(spec "Body size", transformed, outcomes, clade indices, clade names, scaling, 0.95)
 * // => { adjusted: { estimate: 1.04, ci: [0.81, 1.33], method: "conditional logistic regression by clade over 6 informative clades ...", informativeClades: 6, thin: false }, notes: [] }
 */
export function cladeAdjustedSlope(
  spec: SelectivityTraitSpec,
  transformed: Float64Array,
  outcome: Uint8Array,
  clade: Int32Array,
  cladeNames: string[],
  scaling: NumericScaling,
  level: number,
  minInformativeClades = 3,
): { adjusted: ContrastResult["cladeAdjusted"]; notes: string[]; groups: CladeGroup[]; conditionalLogOdds: number | null } {
  const cladeCount = cladeNames.length;
  // Each clade's taxa with a value, in taxon order: counted, then filled (no array per clade grown one by one).
  const sizes = new Int32Array(cladeCount);
  for (let i = 0; i < transformed.length; i++) if (!Number.isNaN(transformed[i]) && clade[i] >= 0) sizes[clade[i]]++;
  const byClade = Array.from(sizes, (size) => ({ x: new Float64Array(size), y: new Uint8Array(size), filled: 0 }));
  for (let i = 0; i < transformed.length; i++) {
    if (Number.isNaN(transformed[i]) || clade[i] < 0) continue;
    const group = byClade[clade[i]];
    group.x[group.filled] = (transformed[i] - scaling.center) / scaling.scale;
    group.y[group.filled++] = outcome[i];
  }
  const groups: CladeGroup[] = [];
  const groupClade: number[] = [];
  byClade.forEach((group, c) => {
    if (group.filled === 0) return;
    groups.push({ x: group.x, y: group.y });
    groupClade.push(c);
  });
  // Which clades carry information within clade (and the conditional fit's work), without building
  // the conditional strata, which only the conditional fit needs.
  const shapes = groups.map(conditionalShape);
  const kept = shapes.map((shape, k) => (shape ? k : -1)).filter((k) => k >= 0);
  const withTaxa = groups.length;
  const none = (note: string) => ({ adjusted: null, notes: [note], groups, conditionalLogOdds: null });
  if (withTaxa === 0) return none(`No taxon with a value of ${spec.label} has a clade, so the odds ratio within clades cannot be estimated.`);
  const anyBothOutcomes = groups.some((g) => {
    let v = 0;
    for (const y of g.y) v += y;
    return v > 0 && v < g.y.length;
  });
  if (!anyBothOutcomes) return none(`No clade holds both victims and survivors with a value of ${spec.label}, so the odds ratio within clades cannot be estimated.`);
  if (kept.length === 0) return none(`${spec.label} does not vary within any clade that holds both victims and survivors, so its effect cannot be told apart from clade.`);

  const predictor = numericPredictorLabel(spec);
  const left = withTaxa - kept.length;
  const thin = kept.length < minInformativeClades;
  const over =
    kept.length === 1
      ? `conditional logistic regression within the only informative clade (${cladeNames[groupClade[kept[0]]]})`
      : `conditional logistic regression by clade (conditional likelihood; Breslow & Day 1980, vol. 1, ch. 7) over ${kept.length} informative clades`;
  const skipped =
    left === 0
      ? ""
      : left === 1
        ? "; 1 clade whose taxa all died, all survived or share one value carries no information within clade and is left out"
        : `; ${left} clades whose taxa all died, all survived or share one value carry no information within clade and are left out`;
  const notes: string[] = [];
  if (thin) {
    notes.push(
      `Thin: the clade-adjusted odds ratio rests on ${kept.length} informative clade${kept.length === 1 ? "" : "s"}, fewer than the ${minInformativeClades} the run asks for; it is shown but never flags confounding on its own.`,
    );
  }

  const work = shapes.reduce((a, shape) => a + (shape ? shape.taxa * shape.cases : 0), 0);
  if (work > CONDITIONAL_WORK_LIMIT) {
    // Clades this large make the conditional recursion slow, and make it unnecessary: with many
    // taxa per clade the incidental-parameter bias of one intercept per clade vanishes (Breslow &
    // Day 1980, vol. 1, ch. 7), so the ordinary stratified fit is used and said.
    const rows = kept.reduce((a, k) => a + groups[k].x.length, 0);
    const xs = new Float64Array(rows);
    const ys = new Uint8Array(rows);
    const st = new Int32Array(rows);
    let i = 0;
    kept.forEach((k, s) => {
      for (let j = 0; j < groups[k].x.length; j++, i++) {
        xs[i] = groups[k].x[j];
        ys[i] = groups[k].y[j];
        st[i] = s;
      }
    });
    const quick = fitStratifiedSlope(xs, ys, st, kept.length);
    if (quick) {
      const z = twoSidedCriticalValue(level);
      const method = `logistic regression with one intercept per clade (clades large enough that the conditional fit is not needed) over ${kept.length} informative clades${skipped}, Wald interval`;
      return {
        adjusted: { estimate: Math.exp(quick.estimate), ci: [Math.exp(quick.estimate - z * quick.se), Math.exp(quick.estimate + z * quick.se)], method, informativeClades: kept.length, thin },
        notes,
        groups,
        conditionalLogOdds: quick.estimate,
      };
    }
  }
  const informativeStrata = kept.map((k) => prepareConditionalStrata(groups[k].x, groups[k].y, new Int32Array(groups[k].x.length), 1)[0]);
  const conditional = fitPrepared(informativeStrata, 0);
  if (conditional.converged && Number.isFinite(conditional.se)) {
    const z = twoSidedCriticalValue(level);
    const ci: [number, number] = [Math.exp(conditional.estimate - z * conditional.se), Math.exp(conditional.estimate + z * conditional.se)];
    const estimate = Math.exp(conditional.estimate);
    if (Number.isFinite(estimate) && estimate > 0 && ci.every((v) => Number.isFinite(v))) {
      return {
        adjusted: { estimate, ci, method: `${over}${skipped}, Wald interval`, informativeClades: kept.length, thin },
        notes,
        groups,
        conditionalLogOdds: conditional.estimate,
      };
    }
  }
  if (!conditional.separated) {
    return { adjusted: null, notes: [...notes, `The conditional regression on ${predictor} within clades did not converge: interval not reported.`], groups, conditionalLogOdds: null };
  }

  // The values separate the outcomes within every informative clade: the engine's regression with
  // clade terms, which detects the separation and fits Firth's penalized likelihood.
  const rows: number[] = [];
  const stratum: number[] = [];
  const ys: number[] = [];
  kept.forEach((k, s) => {
    groups[k].x.forEach((v, i) => {
      rows.push(v);
      stratum.push(s);
      ys.push(groups[k].y[i]);
    });
  });
  let fit: LogisticRegressionResult;
  try {
    const design =
      kept.length === 1
        ? buildDesignMatrix([{ name: spec.key, kind: "numeric", values: rows }])
        : buildDesignMatrix([
            { name: spec.key, kind: "numeric", values: rows },
            { name: "clade", kind: "categorical", values: stratum },
          ]);
    fit = logisticRegression(design, ys, { names: design.names, level });
  } catch (error) {
    return { adjusted: null, notes: [...notes, `The regression of extinction on ${predictor} and clade could not be fitted (${plainMessage(error)}).`], groups, conditionalLogOdds: null };
  }
  const slope = fit.coefficients[1];
  if (!fit.converged) {
    return { adjusted: null, notes: [...notes, `The clade-adjusted regression on ${predictor} did not converge: interval not reported.`], groups, conditionalLogOdds: null };
  }
  if (fit.profileConverged === false) {
    return { adjusted: null, notes: [...notes, `The profile penalized likelihood refits of the clade-adjusted regression on ${predictor} did not converge: interval not reported.`], groups, conditionalLogOdds: null };
  }
  if (!(slope.oddsRatio > 0 && Number.isFinite(slope.oddsRatio) && slope.oddsRatioCi.every((v) => Number.isFinite(v)))) {
    return { adjusted: null, notes: [...notes, `The odds ratio of ${predictor} within clades is not finite, so no clade-adjusted value is given.`], groups, conditionalLogOdds: null };
  }
  const interval = fit.firth
    ? `Firth's bias-reduced fit with one intercept per clade because the values separate the outcomes within clades (the conditional estimate is infinite), ${fit.ciMethod === "profile" ? "profile penalized likelihood" : "Wald"} interval`
    : "Wald interval";
  const overFirth = kept.length === 1 ? `logistic regression within the only informative clade (${cladeNames[groupClade[kept[0]]]})` : `logistic regression over ${kept.length} informative clades`;
  return {
    adjusted: { estimate: slope.oddsRatio, ci: [slope.oddsRatioCi[0], slope.oddsRatioCi[1]], method: `${overFirth}${skipped}, ${interval}`, informativeClades: kept.length, thin },
    notes,
    groups,
    // A Firth estimate is not a conditional one: no confounding judgement rests on it.
    conditionalLogOdds: null,
  };
}
