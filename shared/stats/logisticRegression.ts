import { chiSquareUpperTail, normalTwoSidedP, twoSidedCriticalValue } from "./distributions";
import { choleskyDecompose, choleskyInverse } from "./linalg";
import { divergingDirection, fitMaximumLikelihood, fitNewton, isSeparatingDirection, largestRowChange, withRowPattern, type Design } from "./logisticKernels";
import { brentRoot } from "./roots";
import { separationCheck, type SeparationKind } from "./separationCheck";
import type { FlatMatrix } from "./types";
import { assertBinaryLabels, assertLevel } from "./validate";

/** A model term: one or more columns of X (0-based, intercept not counted) tested together. */
export interface LogisticTerm {
  name: string;
  columns: number[];
}

export interface LogisticRegressionOptions {
  /** Names of the columns of X; default the `names` of a design matrix from buildDesignMatrix, else "x1", "x2", ... */
  names?: string[];
  /**
   * true: always fit Firth's penalized likelihood; false: never; absent (default): only when the
   * data separate and the maximum likelihood estimate does not exist.
   */
  firth?: boolean;
  /** Iterations of the maximum likelihood fit (default 25, as R's glm). */
  maxIterations?: number;
  /** Convergence of the maximum likelihood fit on the relative deviance change (default 1e-8, as glm). */
  tolerance?: number;
  /** Confidence level of the intervals. Default 0.95. */
  level?: number;
  /** Terms to test by (penalized) likelihood ratio, e.g. all dummy columns of one categorical trait. */
  terms?: LogisticTerm[];
  /**
   * Intervals and p-values of a Firth fit: "profile" (profile penalized likelihood intervals and
   * penalized likelihood ratio tests, Heinze & Schemper 2002), "wald", or "auto" (default: profile
   * unless n * p^3 exceeds 2e6, where the many refits would be slow).
   */
  firthIntervals?: "auto" | "profile" | "wald";
  /** Iterations allowed to each refit of a profile (default 200, as the Firth fit itself). */
  profileMaxIterations?: number;
}

export interface LogisticCoefficient {
  name: string;
  estimate: number;
  se: number;
  z: number;
  pValue: number;
  ci: [number, number];
  oddsRatio: number;
  oddsRatioCi: [number, number];
  /**
   * Firth profile intervals only: false when a refit of this coefficient's profile (or of its
   * penalized likelihood ratio test) did not converge; its interval and p-value are then NaN
   * ("did not converge: interval not reported").
   */
  profileConverged?: boolean;
}

export interface LogisticTermTest {
  name: string;
  columns: number[];
  df: number;
  chiSquare: number;
  pValue: number;
}

export interface LogisticRegressionResult {
  coefficients: LogisticCoefficient[];
  /** Deviance, null deviance, log-likelihood and AIC of the unpenalized fit, as R's glm reports them. */
  deviance: number;
  nullDeviance: number;
  logLik: number;
  aic: number;
  dfResidual: number;
  dfNull: number;
  /** Iterations and convergence of the fit whose coefficients are reported (Firth's when firth is true). */
  iterations: number;
  converged: boolean;
  /** The unpenalized fit diverges: some combination of predictors separates the outcomes. */
  separation: boolean;
  /** From the linear programme: "none", "quasi-complete" or "complete" (absent when it was not run or the second line found separation). */
  separationKind?: SeparationKind;
  /** What decided `separation`: the linear programme run before fitting (Konis 2007), or, on designs over 300,000 values or behind it, the fit diverging. */
  separationMethod: "linear-programme" | "diverging-fit";
  /** Predictors that carry the separating direction (empty without separation). */
  separatedPredictors: string[];
  firth: boolean;
  firthReason?: "separation" | "requested";
  /** l(beta) + (1/2) ln det I(beta) at the Firth estimate. */
  penalizedLogLik?: number;
  /** Firth profile intervals only: every refit behind the intervals, p-values and term tests converged. */
  profileConverged?: boolean;
  ciMethod: "wald" | "profile";
  pValueMethod: "wald" | "penalized-likelihood-ratio";
  terms?: LogisticTermTest[];
  termTestMethod?: "likelihood-ratio" | "penalized-likelihood-ratio";
  /** Covariance matrix of the estimates (inverse information), in coefficient order. */
  covariance: number[][];
  n: number;
  /** Number of rows with y = 1. */
  events: number;
  level: number;
}

const FN = "logisticRegression";
const STILL_MOVING = 0.01;
/** Design values (rows x coefficients) up to which separation is looked for by linear programming. */
const SEPARATION_LP_LIMIT = 3e5;
const PROFILE_WORK_LIMIT = 2e6;
const FIRTH_MAX_ITERATIONS = 200;
const FIRTH_TOLERANCE = 1e-10;

/**
 * Binary logistic regression, logit P(y = 1) = b0 + b1 x1 + ... , fitted by iteratively
 * reweighted least squares (Newton-Raphson; Nelder & Wedderburn 1972) exactly as R's glm does for
 * the binomial family. X holds the predictors without an intercept; "(Intercept)" is added first.
 * Standard errors come from the inverse information, z = estimate/se with a two-sided normal
 * p-value, intervals are Wald intervals, and oddsRatio = exp(estimate).
 *
 * Separation (Albert & Anderson 1984) is detected before fitting by linear programming (Konis
 * 2007; see separationCheck), with the fit diverging along a direction that orders every outcome
 * as a second line (and the only one on designs over 300,000 values), and the predictors involved are named. Then, or on request, Firth's
 * bias-reduced logistic regression is fitted instead (Firth 1993): it maximises the likelihood
 * penalized by Jeffreys' prior, l(beta) + (1/2) ln det I(beta), whose estimates stay finite under
 * separation; its intervals are profile penalized likelihood intervals and its p-values penalized
 * likelihood ratio tests (Heinze & Schemper 2002). Terms spanning several columns (dummy-coded
 * categorical traits) can be tested as a whole by (penalized) likelihood ratio.
 *
 * @example
 * // Challenger O-rings, any distress against launch temperature (Dalal et al. 1989)
 * logisticRegression(temperature.map((t) => [t]), distress, { names: ["temperature"] })
 * // => coefficients: (Intercept) 15.0429 (se 7.3786), temperature -0.23216 (se 0.10824);
 * //    deviance 20.3152, nullDeviance 28.2672, aic 24.3152
 */
export function logisticRegression(
  X: number[][] | (FlatMatrix & { names?: string[] }),
  y: number[],
  opts: LogisticRegressionOptions = {},
): LogisticRegressionResult {
  const { design, predictorCount } = buildDesign(X);
  const { n, p } = design;
  assertBinaryLabels(FN, "y", y, n);
  const designNames = Array.isArray(X) ? undefined : X.names;
  const names = opts.names ?? designNames ?? Array.from({ length: predictorCount }, (_, j) => `x${j + 1}`);
  if (!Array.isArray(names) || names.length !== predictorCount || names.some((name) => typeof name !== "string")) {
    throw new Error(`${FN}: names has ${Array.isArray(names) ? names.length : "no"} entries but X has ${predictorCount} columns`);
  }
  const coefficientNames = ["(Intercept)", ...names];
  const level = opts.level ?? 0.95;
  assertLevel(FN, level);
  const maxIterations = opts.maxIterations ?? 25;
  const tolerance = opts.tolerance ?? 1e-8;
  if (!Number.isInteger(maxIterations) || maxIterations < 1) throw new Error(`${FN}: maxIterations is ${maxIterations}; it must be a positive integer`);
  if (!(tolerance > 0)) throw new Error(`${FN}: tolerance is ${tolerance}; it must be positive`);
  if (opts.firth !== undefined && typeof opts.firth !== "boolean") throw new Error(`${FN}: firth must be true, false or left out`);
  const firthIntervals = opts.firthIntervals ?? "auto";
  if (!["auto", "profile", "wald"].includes(firthIntervals)) {
    throw new Error(`${FN}: firthIntervals is "${String(firthIntervals)}"; use "auto", "profile" or "wald"`);
  }
  const terms = opts.terms ? validateTerms(opts.terms, predictorCount) : undefined;

  let events = 0;
  for (let i = 0; i < n; i++) events += y[i];
  if (events === 0 || events === n) {
    throw new Error(`${FN}: y is ${events === 0 ? "0" : "1"} in every row; both outcomes are needed`);
  }
  if (n <= p) throw new Error(`${FN}: ${n} rows cannot estimate ${p} coefficients; more rows than coefficients are needed`);
  checkColumnRank(design, coefficientNames);

  // Separation is looked for before fitting, by linear programming (Konis 2007); on designs too large
  // for that, and as a second line behind it, the fit running off along a separating direction.
  const lp = n * p <= SEPARATION_LP_LIMIT ? separationCheck(design, y) : null;
  const ml = fitMaximumLikelihood(design, y, maxIterations, tolerance);
  let separation = false;
  let separationKind: SeparationKind | undefined = lp?.kind;
  let separationMethod: LogisticRegressionResult["separationMethod"] = lp ? "linear-programme" : "diverging-fit";
  let separatedPredictors: string[] = [];
  if (lp && lp.kind !== "none") {
    separation = true;
    separatedPredictors = separatingOnTheirOwn(design, y, coefficientNames);
    if (separatedPredictors.length === 0) separatedPredictors = predictorsAlong(design, lp.direction, coefficientNames);
  } else if (!ml.converged || !ml.factorOk || largestRowChange(design, ml.lastStep) > STILL_MOVING) {
    // At genuine convergence the last Newton step is tiny; a step that still moves some linear
    // predictor by more than 0.01 means the fit may be running off along a separation.
    const direction = divergingDirection(design, y, ml);
    if (isSeparatingDirection(design, y, direction)) {
      separation = true;
      separationKind = undefined;
      separationMethod = "diverging-fit";
      separatedPredictors = separatingOnTheirOwn(design, y, coefficientNames);
      if (separatedPredictors.length === 0) separatedPredictors = predictorsAlong(design, direction, coefficientNames);
    }
  }
  const meanY = events / n;
  const nullDeviance = -2 * (events * Math.log(meanY) + (n - events) * Math.log(1 - meanY));
  const z = twoSidedCriticalValue(level);
  const base = {
    deviance: ml.deviance,
    nullDeviance,
    logLik: -ml.deviance / 2,
    aic: ml.deviance + 2 * p,
    dfResidual: n - p,
    dfNull: n - 1,
    separation,
    separationKind,
    separationMethod,
    separatedPredictors,
    n,
    events,
    level,
  };

  const useFirth = opts.firth === true || (opts.firth === undefined && separation);
  if (!useFirth) {
    const covariance = ml.factorOk ? choleskyInverse(ml.lower, p) : new Float64Array(p * p).fill(NaN);
    const coefficients = coefficientNames.map((name, j) => {
      const estimate = ml.beta[j];
      const se = Math.sqrt(covariance[j * p + j]);
      return coefficient(name, estimate, se, normalTwoSidedP(estimate / se), [estimate - z * se, estimate + z * se]);
    });
    const result: LogisticRegressionResult = {
      ...base,
      coefficients,
      iterations: ml.iterations,
      converged: ml.converged,
      firth: false,
      ciMethod: "wald",
      pValueMethod: "wald",
      covariance: toRows(covariance, p),
    };
    if (terms) {
      result.termTestMethod = "likelihood-ratio";
      result.terms = terms.map((term) => {
        const fixed = new Set(term.columns.map((c) => c + 1));
        const start = Float64Array.from(ml.beta, (b, j) => (fixed.has(j) ? 0 : b));
        const reduced = fitNewton(design, y, { penalized: false, start, fixed, maxIterations: 100, tolerance: 1e-10 });
        const chiSquare = Math.max(0, -2 * reduced.logLik - ml.deviance);
        return { name: term.name, columns: term.columns, df: term.columns.length, chiSquare, pValue: chiSquareUpperTail(chiSquare, term.columns.length) };
      });
    }
    return result;
  }

  // Firth's penalized likelihood, started from the ML estimate when it exists.
  const start = separation || !ml.converged ? new Float64Array(p) : ml.beta;
  const firth = fitNewton(design, y, { penalized: true, start, maxIterations: FIRTH_MAX_ITERATIONS, tolerance: FIRTH_TOLERANCE });
  const covariance = choleskyInverse(firth.lower, p);
  const profile = firthIntervals === "profile" || (firthIntervals === "auto" && n * p * p * p <= PROFILE_WORK_LIMIT);
  const profileMaxIterations = opts.profileMaxIterations ?? FIRTH_MAX_ITERATIONS;
  if (!Number.isInteger(profileMaxIterations) || profileMaxIterations < 1) {
    throw new Error(`${FN}: profileMaxIterations is ${profileMaxIterations}; it must be a positive integer`);
  }
  // A refit that does not converge reaches at most the constrained maximum, so it only bounds the
  // statistic from above: enough to place a point inside an interval, never to place it outside
  // or to give a p-value. Where that is not enough, the interval or test is not reported.
  let profileConverged = true;
  let lastRefitConverged = true;
  const refit = (fixedValues: Map<number, number>, from: ArrayLike<number>): number => {
    const startAt = Float64Array.from(from);
    for (const [j, value] of fixedValues) startAt[j] = value;
    const fit = fitNewton(design, y, {
      penalized: true,
      start: startAt,
      fixed: new Set(fixedValues.keys()),
      maxIterations: profileMaxIterations,
      tolerance: FIRTH_TOLERANCE,
    });
    // A refit creeping along a flat ridge (the constrained maximum lies at infinity) has settled to
    // within 1e-8 of its supremum over its last ten iterations: its statistic is as good as converged.
    lastRefitConverged = fit.converged || fit.recentGain < 1e-8;
    return fit.objective;
  };
  const chiSquareCritical = z * z;
  const coefficients = coefficientNames.map((name, j) => {
    const estimate = firth.beta[j];
    const se = Math.sqrt(covariance[j * p + j]);
    if (!profile) return coefficient(name, estimate, se, normalTwoSidedP(estimate / se), [estimate - z * se, estimate + z * se]);
    // Penalized likelihood ratio statistic for beta_j = b, maximising over the other coefficients.
    const before = profileConverged;
    profileConverged = true;
    const statistic = (b: number): number => 2 * (firth.objective - refit(new Map([[j, b]]), firth.beta));
    const limit = (direction: 1 | -1): number => {
      const excess = (offset: number): number => {
        const value = statistic(estimate + direction * offset) - chiSquareCritical;
        if (!lastRefitConverged && !(value < 0)) profileConverged = false;
        return value;
      };
      let low = 0;
      let high = Math.max(se, 1e-3);
      for (let value = excess(high); value < 0; value = excess(high)) {
        low = high;
        high *= 2;
        if (high > 1e4 * Math.max(1, Math.abs(estimate), se)) return direction * Infinity;
      }
      if (!profileConverged) return NaN;
      // brentRoot gives NaN when its own search does not converge.
      return estimate + direction * brentRoot(excess, low, high, 1e-9 * Math.max(se, 1));
    };
    const ci: [number, number] = [limit(-1), limit(1)];
    const lrStatistic = Math.max(0, statistic(0));
    if (!lastRefitConverged) profileConverged = false;
    const converged = profileConverged && !Number.isNaN(ci[0]) && !Number.isNaN(ci[1]) && !Number.isNaN(lrStatistic);
    profileConverged = before && converged;
    const result = converged
      ? coefficient(name, estimate, se, chiSquareUpperTail(lrStatistic, 1), ci)
      : coefficient(name, estimate, se, NaN, [NaN, NaN]);
    result.profileConverged = converged;
    return result;
  });
  const result: LogisticRegressionResult = {
    ...base,
    coefficients,
    iterations: firth.iterations,
    converged: firth.converged,
    firth: true,
    firthReason: opts.firth === true ? "requested" : "separation",
    penalizedLogLik: firth.objective,
    ciMethod: profile ? "profile" : "wald",
    pValueMethod: profile ? "penalized-likelihood-ratio" : "wald",
    covariance: toRows(covariance, p),
  };
  if (terms) {
    result.termTestMethod = "penalized-likelihood-ratio";
    result.terms = terms.map((term) => {
      const reduced = refit(new Map(term.columns.map((c) => [c + 1, 0])), firth.beta);
      if (!lastRefitConverged) profileConverged = false;
      const chiSquare = lastRefitConverged ? Math.max(0, 2 * (firth.objective - reduced)) : NaN;
      return { name: term.name, columns: term.columns, df: term.columns.length, chiSquare, pValue: Number.isNaN(chiSquare) ? NaN : chiSquareUpperTail(chiSquare, term.columns.length) };
    });
  }
  if (profile) result.profileConverged = profileConverged;
  return result;
}

function coefficient(name: string, estimate: number, se: number, pValue: number, ci: [number, number]): LogisticCoefficient {
  return { name, estimate, se, z: estimate / se, pValue, ci, oddsRatio: Math.exp(estimate), oddsRatioCi: [Math.exp(ci[0]), Math.exp(ci[1])] };
}

/** Copies X into a flat row-major design with the intercept column first, checking every value (with its row pattern when mostly 0). */
function buildDesign(X: number[][] | FlatMatrix): { design: Design; predictorCount: number } {
  if (Array.isArray(X)) {
    const n = X.length;
    if (n === 0) throw new Error(`${FN}: X has no rows`);
    if (!Array.isArray(X[0])) throw new Error(`${FN}: X must be an array of rows (number[][])`);
    const m = X[0].length;
    const p = m + 1;
    const data = new Float64Array(n * p);
    for (let i = 0; i < n; i++) {
      const row = X[i];
      if (!Array.isArray(row) || row.length !== m) {
        throw new Error(`${FN}: row ${i} of X has ${Array.isArray(row) ? row.length : "no"} values but row 0 has ${m}`);
      }
      data[i * p] = 1;
      for (let j = 0; j < m; j++) {
        const v = row[j];
        if (typeof v !== "number" || !Number.isFinite(v)) throw new Error(`${FN}: X[${i}][${j}] is ${String(v)}; predictors must be finite numbers`);
        data[i * p + j + 1] = v;
      }
    }
    return { design: withRowPattern({ data, n, p }), predictorCount: m };
  }
  const { data: source, rows: n, columns: m } = X;
  if (!(source instanceof Float64Array) || source.length !== n * m || n === 0) {
    throw new Error(`${FN}: the flat matrix must hold rows * columns values in a Float64Array`);
  }
  const p = m + 1;
  const data = new Float64Array(n * p);
  for (let i = 0; i < n; i++) {
    data[i * p] = 1;
    for (let j = 0; j < m; j++) {
      const v = source[i * m + j];
      if (!Number.isFinite(v)) throw new Error(`${FN}: X[${i}][${j}] is ${v}; predictors must be finite numbers`);
      data[i * p + j + 1] = v;
    }
  }
  return { design: withRowPattern({ data, n, p }), predictorCount: m };
}

/**
 * Rejects a predictor that is constant or a linear combination of the intercept and earlier
 * predictors, found as a vanishing pivot in the Cholesky factor of the centred cross-products.
 */
function checkColumnRank(design: Design, names: string[]): void {
  const { data, n, p } = design;
  const m = p - 1;
  if (m === 0) return;
  const means = new Float64Array(m);
  for (let i = 0; i < n; i++) for (let j = 0; j < m; j++) means[j] += data[i * p + j + 1];
  for (let j = 0; j < m; j++) means[j] /= n;
  const cross = new Float64Array(m * m);
  const centred = new Float64Array(m);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < m; j++) centred[j] = data[i * p + j + 1] - means[j];
    for (let a = 0; a < m; a++) for (let b = a; b < m; b++) cross[a * m + b] += centred[a] * centred[b];
  }
  for (let j = 0; j < m; j++) {
    if (!(cross[j * m + j] > 0)) throw new Error(`${FN}: predictor "${names[j + 1]}" is constant; it cannot be estimated beside the intercept`);
  }
  const failed = choleskyDecompose(cross, m, new Float64Array(m * m), 1e-10);
  if (failed >= 0) {
    throw new Error(`${FN}: predictor "${names[failed + 1]}" is a linear combination of the intercept and earlier predictors (collinear); remove it`);
  }
}

/**
 * Predictors that separate the outcomes by themselves: every row with y = 0 lies on one side of a
 * threshold and every row with y = 1 on the other (ties at the threshold allowed: quasi-complete).
 */
function separatingOnTheirOwn(design: Design, y: ArrayLike<number>, names: string[]): string[] {
  const { data, n, p } = design;
  const found: string[] = [];
  for (let j = 1; j < p; j++) {
    let minEvent = Infinity;
    let maxEvent = -Infinity;
    let minNonEvent = Infinity;
    let maxNonEvent = -Infinity;
    for (let i = 0; i < n; i++) {
      const v = data[i * p + j];
      if (y[i] === 1) {
        if (v < minEvent) minEvent = v;
        if (v > maxEvent) maxEvent = v;
      } else {
        if (v < minNonEvent) minNonEvent = v;
        if (v > maxNonEvent) maxNonEvent = v;
      }
    }
    if (maxNonEvent <= minEvent || maxEvent <= minNonEvent) found.push(names[j]);
  }
  return found;
}

/**
 * Names of the predictors with a material share of a separating direction, on the scale of each
 * column: used when only a combination of predictors separates.
 */
function predictorsAlong(design: Design, direction: ArrayLike<number>, names: string[]): string[] {
  const { data, n, p } = design;
  const contribution = new Float64Array(p);
  for (let j = 1; j < p; j++) {
    let min = Infinity;
    let max = -Infinity;
    for (let i = 0; i < n; i++) {
      const v = data[i * p + j];
      if (v < min) min = v;
      if (v > max) max = v;
    }
    contribution[j] = Math.abs(direction[j]) * (max - min);
  }
  const largest = Math.max(...contribution);
  const found: string[] = [];
  for (let j = 1; j < p; j++) if (contribution[j] > 1e-3 * largest) found.push(names[j]);
  return found;
}

function validateTerms(terms: LogisticTerm[], predictorCount: number): LogisticTerm[] {
  if (!Array.isArray(terms)) throw new Error(`${FN}: terms must be an array of { name, columns }`);
  return terms.map((term, t) => {
    if (!term || typeof term.name !== "string" || term.name === "") throw new Error(`${FN}: terms[${t}] needs a name`);
    if (!Array.isArray(term.columns) || term.columns.length === 0) throw new Error(`${FN}: term "${term.name}" has no columns`);
    const seen = new Set<number>();
    for (const c of term.columns) {
      if (!Number.isInteger(c) || c < 0 || c >= predictorCount) {
        throw new Error(`${FN}: term "${term.name}" names column ${String(c)}, but X has columns 0 to ${predictorCount - 1}`);
      }
      if (seen.has(c)) throw new Error(`${FN}: term "${term.name}" lists column ${c} twice`);
      seen.add(c);
    }
    return { name: term.name, columns: [...term.columns] };
  });
}

function toRows(flat: Float64Array, p: number): number[][] {
  return Array.from({ length: p }, (_, i) => Array.from(flat.subarray(i * p, (i + 1) * p)));
}
