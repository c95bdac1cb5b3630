import { buildDesignMatrix, logisticRegression, type LogisticRegressionResult } from "../stats";
import { twoSidedCriticalValue } from "../stats/distributions";
import { numericPredictorLabel, type NumericScaling } from "./scaleNumericTrait";
import { fitStratifiedSlope } from "./stratifiedSlope";
import { plainMessage } from "./testNumericTrait";
import type { ContrastResult, SelectivityTraitSpec } from "./types";

/**
 * The odds ratio of a numeric trait adjusted for clade: a logistic regression of extinction on the
 * trait plus a term per clade, so the slope compares taxa within the same clade. It is fitted with
 * one intercept per clade by fitStratifiedSlope (the same estimate as dummy terms, in one pass over
 * the taxa per iteration however many clades there are), with a Wald interval. Clades whose taxa
 * all died or all survived carry no information on the slope within clade (their own terms would
 * run off to infinity), so they are left out and counted, just as the Mantel-Haenszel odds ratio
 * skips such strata. When the values separate the outcomes within clades the statistics engine's
 * logistic regression with clade dummies takes over, which switches to Firth's bias-reduced fit
 * (Firth 1993).
 *
 * @example
 * cladeAdjustedSlope(spec "Body size", transformed, outcomes, clade indices, clade names, scaling, 0.95)
 * // => { adjusted: { estimate: 1.04, ci: [0.81, 1.33], method: "logistic regression with one intercept per clade, over 6 clades ..." }, notes: [] }
 */
export function cladeAdjustedSlope(
  spec: SelectivityTraitSpec,
  transformed: Float64Array,
  outcome: Uint8Array,
  clade: Int32Array,
  cladeNames: string[],
  scaling: NumericScaling,
  level: number,
): { adjusted: ContrastResult["cladeAdjusted"]; notes: string[] } {
  const cladeCount = cladeNames.length;
  const victims = new Int32Array(cladeCount);
  const totals = new Int32Array(cladeCount);
  const lows = new Float64Array(cladeCount).fill(Infinity);
  const highs = new Float64Array(cladeCount).fill(-Infinity);
  for (let i = 0; i < transformed.length; i++) {
    const v = transformed[i];
    if (Number.isNaN(v)) continue;
    const c = clade[i];
    totals[c]++;
    victims[c] += outcome[i];
    if (v < lows[c]) lows[c] = v;
    if (v > highs[c]) highs[c] = v;
  }
  const informative = new Int32Array(cladeCount).fill(-1);
  const kept: number[] = [];
  let withTaxa = 0;
  let varying = false;
  let rows = 0;
  for (let c = 0; c < cladeCount; c++) {
    if (totals[c] > 0) withTaxa++;
    if (victims[c] > 0 && victims[c] < totals[c]) {
      informative[c] = kept.length;
      kept.push(c);
      rows += totals[c];
      if (highs[c] > lows[c]) varying = true;
    }
  }
  if (kept.length === 0) {
    return { adjusted: null, notes: [`No clade holds both victims and survivors with a value of ${spec.label}, so the odds ratio within clades cannot be estimated.`] };
  }
  if (!varying) {
    return {
      adjusted: null,
      notes: [`${spec.label} does not vary within any clade that holds both victims and survivors, so its effect cannot be told apart from clade.`],
    };
  }

  const x = new Float64Array(rows);
  const stratum = new Int32Array(rows);
  const y = new Uint8Array(rows);
  for (let i = 0, k = 0; i < transformed.length; i++) {
    const v = transformed[i];
    if (Number.isNaN(v) || informative[clade[i]] < 0) continue;
    x[k] = (v - scaling.center) / scaling.scale;
    stratum[k] = informative[clade[i]];
    y[k] = outcome[i];
    k++;
  }
  const predictor = numericPredictorLabel(spec);
  const left = withTaxa - kept.length;
  const over =
    kept.length === 1
      ? `logistic regression within the only clade holding both outcomes (${cladeNames[kept[0]]})`
      : `logistic regression with one intercept per clade, over ${kept.length} clades holding both outcomes`;
  const skipped =
    left === 0
      ? ""
      : left === 1
        ? "; 1 clade whose taxa all died or all survived carries no information within clade and is left out"
        : `; ${left} clades whose taxa all died or all survived carry no information within clade and are left out`;

  const quick = fitStratifiedSlope(x, y, stratum, kept.length);
  if (quick) {
    const z = twoSidedCriticalValue(level);
    const ci: [number, number] = [Math.exp(quick.estimate - z * quick.se), Math.exp(quick.estimate + z * quick.se)];
    const estimate = Math.exp(quick.estimate);
    if (Number.isFinite(estimate) && estimate > 0 && ci.every((v) => Number.isFinite(v))) {
      return { adjusted: { estimate, ci, method: `${over}${skipped}, Wald interval` }, notes: [] };
    }
  }

  // The values separate the outcomes within clades: the engine's regression with clade terms, which
  // detects the separation and fits Firth's penalized likelihood.
  let fit: LogisticRegressionResult;
  try {
    const xs = Array.from(x);
    const design =
      kept.length === 1
        ? buildDesignMatrix([{ name: spec.key, kind: "numeric", values: xs }])
        : buildDesignMatrix([
            { name: spec.key, kind: "numeric", values: xs },
            { name: "clade", kind: "categorical", values: Array.from(stratum) },
          ]);
    fit = logisticRegression(design, Array.from(y), { names: design.names, level });
  } catch (error) {
    return { adjusted: null, notes: [`The regression of extinction on ${predictor} and clade could not be fitted (${plainMessage(error)}).`] };
  }
  const slope = fit.coefficients[1];
  if (!(slope.oddsRatio > 0 && Number.isFinite(slope.oddsRatio) && slope.oddsRatioCi.every((v) => Number.isFinite(v)))) {
    return { adjusted: null, notes: [`The odds ratio of ${predictor} within clades is not finite, so no clade-adjusted value is given.`] };
  }
  const interval = fit.firth
    ? `Firth's bias-reduced fit because the values separate the outcomes within clades, ${fit.ciMethod === "profile" ? "profile penalized likelihood" : "Wald"} interval`
    : "Wald interval";
  const notes = fit.converged ? [] : [`The clade-adjusted regression on ${predictor} did not converge; treat its estimate with caution.`];
  return {
    adjusted: { estimate: slope.oddsRatio, ci: [slope.oddsRatioCi[0], slope.oddsRatioCi[1]], method: `${over}${skipped}, ${interval}` },
    notes,
  };
}
