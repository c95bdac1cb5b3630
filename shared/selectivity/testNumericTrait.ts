import { logisticRegression, type LogisticRegressionResult } from "../stats";
import { numericPredictorLabel, type NumericScaling } from "./scaleNumericTrait";
import { whyNoOutcomeContrast, type TraitTest } from "./testStateTrait";
import type { ContrastResult, SelectivityTraitSpec } from "./types";

/** The trait's test, and its crude odds ratio (null when not estimable, with notes saying why). */
export interface NumericTraitTest {
  test: TraitTest;
  crude: ContrastResult["crude"] | null;
  notes: string[];
}

/**
 * The test of a numeric trait: a univariate logistic regression of extinction on the (transformed,
 * optionally standardised) value, tested by the likelihood ratio test (one degree of freedom). Its
 * slope gives the crude odds ratio per unit or per SD with a Wald interval. When the values
 * separate victims from survivors, the fit is Firth's bias-reduced regression (Firth 1993) with a
 * penalized likelihood ratio test and a profile interval (Heinze & Schemper 2002), and the method
 * says so.
 *
 * @example
 * testNumericTrait(spec "Body size", log10, per SD, transformed sizes, outcomes, scaling)
 * // => { test: { method: "Likelihood ratio test in a logistic regression of extinction on Body size (log10, per SD)",
 * //              pValue: 0.0012, statistic: 10.5, df: 1 }, crude: { estimate: 1.8, ci: [1.26, 2.57], ... } }
 */
export function testNumericTrait(
  spec: SelectivityTraitSpec,
  transformed: Float64Array,
  outcome: Uint8Array,
  scaling: NumericScaling,
  level: number,
): NumericTraitTest {
  if (scaling.count === 0) return { test: { method: `No test: no taxon has a usable value of ${spec.label}.`, pValue: null }, crude: null, notes: [] };
  if (scaling.constant) {
    return { test: { method: `No test: every taxon with a value of ${spec.label} has the same value; a slope needs at least two.`, pValue: null }, crude: null, notes: [] };
  }
  const x = new Float64Array(scaling.count);
  const y = new Array<number>(scaling.count);
  let victims = 0;
  for (let i = 0, k = 0; i < transformed.length; i++) {
    const v = transformed[i];
    if (Number.isNaN(v)) continue;
    x[k] = (v - scaling.center) / scaling.scale;
    y[k] = outcome[i];
    victims += outcome[i];
    k++;
  }
  const noContrast = whyNoOutcomeContrast(victims, scaling.count - victims);
  if (noContrast) return { test: { method: noContrast, pValue: null }, crude: null, notes: [] };

  const predictor = numericPredictorLabel(spec);
  let fit: LogisticRegressionResult;
  try {
    fit = logisticRegression({ data: x, rows: scaling.count, columns: 1 }, y, { names: [spec.key], level, terms: [{ name: spec.key, columns: [0] }] });
  } catch (error) {
    return { test: { method: `No test: the logistic regression on ${predictor} could not be fitted (${plainMessage(error)}).`, pValue: null }, crude: null, notes: [] };
  }
  const term = fit.terms?.[0];
  const slope = fit.coefficients[1];
  const notes: string[] = [];
  const method = fit.firth
    ? `Penalized likelihood ratio test in Firth's bias-reduced logistic regression of extinction on ${predictor}, used because the values separate victims from survivors`
    : `Likelihood ratio test in a logistic regression of extinction on ${predictor}`;
  if (fit.firth) notes.push(`The values of ${spec.label} separate victims from survivors; Firth's bias-reduced regression (Firth 1993) keeps the odds ratio finite.`);
  if (!fit.converged) notes.push(`The logistic regression on ${predictor} did not converge: interval not reported.`);
  // Firth's profile intervals and penalized likelihood ratio test rest on refits that must converge too.
  const profileFailed = fit.converged && fit.profileConverged === false;
  if (profileFailed) notes.push(`The profile penalized likelihood refits of Firth's regression on ${predictor} did not converge: interval not reported.`);
  const test: TraitTest =
    term && Number.isFinite(term.pValue)
      ? { method, pValue: term.pValue, statistic: term.chiSquare, df: term.df }
      : profileFailed
        ? { method: `No test: the penalized likelihood refit on ${predictor} did not converge.`, pValue: null }
        : { method: `No test: the likelihood ratio test on ${predictor} gave no finite value.`, pValue: null };
  const crudeOk = fit.converged && Number.isFinite(slope.oddsRatio) && slope.oddsRatio > 0 && slope.oddsRatioCi.every((v) => Number.isFinite(v));
  if (!crudeOk && fit.converged && !profileFailed) notes.push(`The odds ratio of ${predictor} is not finite, so no crude value is given.`);
  const crude = crudeOk
    ? {
        estimate: slope.oddsRatio,
        ci: [slope.oddsRatioCi[0], slope.oddsRatioCi[1]] as [number, number],
        method: fit.firth
          ? `univariate Firth logistic regression, ${fit.ciMethod === "profile" ? "profile penalized likelihood" : "Wald"} interval`
          : "univariate logistic regression, Wald interval",
      }
    : null;
  return { test, crude, notes };
}

/** An engine error without the function-name prefix, for a sentence. */
export function plainMessage(error: unknown): string {
  const text = error instanceof Error ? error.message : String(error);
  return text.replace(/^[A-Za-z]+: /, "");
}
