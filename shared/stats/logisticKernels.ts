// Numerical kernels of binary logistic regression on a flat row-major design matrix whose first
// column is the intercept. Every pass over the rows accumulates into preallocated arrays, so a fit
// allocates nothing per row.

import { choleskyDecompose, choleskyLogDeterminant, choleskySolve } from "./linalg";

/** Design matrix with the intercept in column 0, row-major: element (i, j) at data[i * p + j]. */
export interface Design {
  data: Float64Array;
  n: number;
  p: number;
  /** Where each row's nonzero values sit (see withRowPattern): passes then skip the zeros, with the same sums. */
  pattern?: RowPattern;
}

/** Row i's nonzero values are in the columns column[start[i]] .. column[start[i + 1] - 1], in increasing order. */
export interface RowPattern {
  start: Int32Array;
  column: Int32Array;
}

/** Share of nonzero values at or below which a design is worth its row pattern (dummy-coded traits are mostly 0). */
const SPARSE_SHARE = 0.6;

/**
 * The design with its row pattern when most of its values are 0 (each dummy-coded trait puts at
 * most one 1 in a row), else the design itself. A pass then adds only the nonzero products, in the
 * same order: the skipped terms are exact zeros, so every sum comes out the same to the last bit
 * (the passes fall back to the full row when beta or a linear predictor is not finite, where 0 times
 * it would not be 0). The design's values must not change afterwards.
 */
export function withRowPattern(design: Design): Design {
  const { data, n, p } = design;
  let nonzero = 0;
  for (let k = 0; k < n * p; k++) if (data[k] !== 0) nonzero++;
  if (nonzero > SPARSE_SHARE * n * p) return design;
  const start = new Int32Array(n + 1);
  const column = new Int32Array(nonzero);
  let at = 0;
  for (let i = 0; i < n; i++) {
    start[i] = at;
    for (let j = 0; j < p; j++) if (data[i * p + j] !== 0) column[at++] = j;
  }
  start[n] = at;
  return { data, n, p, pattern: { start, column } };
}

function allFinite(values: ArrayLike<number>, p: number): boolean {
  for (let j = 0; j < p; j++) if (!Number.isFinite(values[j])) return false;
  return true;
}

/** The linear predictors X beta of every row, into `out` (the row pattern skips the zeros when beta is finite). */
export function linearPredictors(design: Design, beta: ArrayLike<number>, out: Float64Array): Float64Array {
  const { data, n, p, pattern } = design;
  if (pattern && allFinite(beta, p)) {
    const { start, column } = pattern;
    for (let i = 0; i < n; i++) {
      const offset = i * p;
      let eta = 0;
      for (let k = start[i], end = start[i + 1]; k < end; k++) eta += data[offset + column[k]] * beta[column[k]];
      out[i] = eta;
    }
    return out;
  }
  for (let i = 0; i < n; i++) {
    const offset = i * p;
    let eta = 0;
    for (let j = 0; j < p; j++) eta += data[offset + j] * beta[j];
    out[i] = eta;
  }
  return out;
}

/** Scratch arrays for one model size, reused across passes. */
export class Workspace {
  readonly information: Float64Array;
  readonly lower: Float64Array;
  readonly score: Float64Array;
  readonly step: Float64Array;
  readonly vector: Float64Array;
  constructor(readonly p: number) {
    this.information = new Float64Array(p * p);
    this.lower = new Float64Array(p * p);
    this.score = new Float64Array(p);
    this.step = new Float64Array(p);
    this.vector = new Float64Array(p);
  }
}

/**
 * One pass at beta: fills the upper triangle of the information X'WX and the score X'(y - mu),
 * and returns the log-likelihood and the largest |eta|. With `weights`, row i counts weights[i]
 * times (bootstrap counts; a row of weight 0 is left out): the same sums as over the rows repeated.
 */
export function informationPass(
  design: Design,
  y: ArrayLike<number>,
  beta: ArrayLike<number>,
  work: Workspace,
  weights?: ArrayLike<number>,
): { logLik: number; maxAbsEta: number } {
  const { data, n, p, pattern } = design;
  const info = work.information;
  const score = work.score;
  info.fill(0);
  score.fill(0);
  const sparse = pattern !== undefined && allFinite(beta, p);
  const start = pattern?.start;
  const column = pattern?.column;
  let logLik = 0;
  let maxAbsEta = 0;
  for (let i = 0; i < n; i++) {
    let count = 1;
    if (weights !== undefined) {
      count = weights[i];
      if (count === 0) continue;
    }
    const offset = i * p;
    let eta = 0;
    if (sparse) for (let k = start![i], end = start![i + 1]; k < end; k++) eta += data[offset + column![k]] * beta[column![k]];
    else for (let j = 0; j < p; j++) eta += data[offset + j] * beta[j];
    const e = Math.exp(-Math.abs(eta));
    const mu = eta >= 0 ? 1 / (1 + e) : e / (1 + e);
    const w = (count * e) / ((1 + e) * (1 + e));
    const yi = y[i];
    // y - mu without cancellation: 1 - mu is computed from e directly.
    const residual = count * (yi === 1 ? (eta >= 0 ? e / (1 + e) : 1 / (1 + e)) : -mu);
    // y eta - ln(1 + e^eta), from the same e = exp(-|eta|): only the sign of eta picks the form.
    logLik -= count * (Math.log1p(e) + (yi === 1 ? (eta < 0 ? -eta : 0) : eta > 0 ? eta : 0));
    const absEta = Math.abs(eta);
    if (absEta > maxAbsEta) maxAbsEta = absEta;
    if (sparse && eta === eta) {
      // Only the nonzero products: the others add exact zeros.
      const end = start![i + 1];
      for (let ka = start![i]; ka < end; ka++) {
        const a = column![ka];
        const xa = data[offset + a];
        score[a] += xa * residual;
        const wxa = w * xa;
        const row = a * p;
        for (let kb = ka; kb < end; kb++) info[row + column![kb]] += wxa * data[offset + column![kb]];
      }
      continue;
    }
    for (let a = 0; a < p; a++) {
      const xa = data[offset + a];
      score[a] += xa * residual;
      const wxa = w * xa;
      const row = a * p;
      for (let b = a; b < p; b++) info[row + b] += wxa * data[offset + b];
    }
  }
  return { logLik, maxAbsEta };
}

/**
 * Firth's modified score U*_r = sum_i (y_i - mu_i + h_i (1/2 - mu_i)) x_ir at beta (Firth 1993;
 * Heinze & Schemper 2002), where h_i = w_i x_i' (X'WX)^-1 x_i comes from the Cholesky factor in
 * work.lower (of the information at the same beta). Written to work.score.
 */
export function modifiedScorePass(design: Design, y: ArrayLike<number>, beta: ArrayLike<number>, work: Workspace): void {
  const { data, n, p } = design;
  const score = work.score;
  const lower = work.lower;
  const v = work.vector;
  score.fill(0);
  for (let i = 0; i < n; i++) {
    const offset = i * p;
    let eta = 0;
    for (let j = 0; j < p; j++) eta += data[offset + j] * beta[j];
    const e = Math.exp(-Math.abs(eta));
    const mu = eta >= 0 ? 1 / (1 + e) : e / (1 + e);
    const sqrtW = Math.sqrt(e) / (1 + e);
    // h_i = |L^-1 sqrt(w_i) x_i|^2 by forward substitution.
    let h = 0;
    for (let a = 0; a < p; a++) {
      let sum = sqrtW * data[offset + a];
      const row = a * p;
      for (let k = 0; k < a; k++) sum -= lower[row + k] * v[k];
      const value = sum / lower[row + a];
      v[a] = value;
      h += value * value;
    }
    const residual = y[i] === 1 ? (eta >= 0 ? e / (1 + e) : 1 / (1 + e)) : -mu;
    const modified = residual + h * (0.5 - mu);
    for (let a = 0; a < p; a++) score[a] += modified * data[offset + a];
  }
}

/** Result of a maximum likelihood fit by iteratively reweighted least squares. */
export interface MaximumLikelihoodFit {
  beta: Float64Array;
  deviance: number;
  iterations: number;
  converged: boolean;
  /** Information X'WX at beta (upper triangle) and its Cholesky factor; factorOk false if singular. */
  information: Float64Array;
  lower: Float64Array;
  factorOk: boolean;
  /** beta minus the previous iterate: under separation it points along the diverging direction. */
  lastStep: Float64Array;
}

/**
 * Maximum likelihood by iteratively reweighted least squares, following R's glm.fit for the
 * binomial family: start from mu = (y + 1/2)/2, stop when |dev - dev_old| / (|dev| + 0.1) <
 * tolerance, halve the step when the deviance rises or is not finite.
 */
export function fitMaximumLikelihood(design: Design, y: ArrayLike<number>, maxIterations: number, tolerance: number): MaximumLikelihoodFit {
  const { data, n, p } = design;
  const work = new Workspace(p);
  const info = work.information;
  const rhs = work.score;

  // First solve: weighted least squares from the starting means mu = (y + 1/2)/2, as glm.fit does.
  // mu is 3/4 or 1/4, so every row has weight 3/16 and working response +-ln 3.
  const startWeight = 3 / 16;
  const startWz = startWeight * Math.log(3) + 0.25;
  info.fill(0);
  rhs.fill(0);
  let events = 0;
  const pattern = design.pattern;
  for (let i = 0; i < n; i++) {
    const offset = i * p;
    const wz = y[i] === 1 ? startWz : -startWz;
    events += y[i];
    if (pattern) {
      // Only the nonzero products (the others add exact zeros).
      const end = pattern.start[i + 1];
      for (let ka = pattern.start[i]; ka < end; ka++) {
        const a = pattern.column[ka];
        const xa = data[offset + a];
        rhs[a] += xa * wz;
        const wxa = startWeight * xa;
        const row = a * p;
        for (let kb = ka; kb < end; kb++) info[row + pattern.column[kb]] += wxa * data[offset + pattern.column[kb]];
      }
      continue;
    }
    for (let a = 0; a < p; a++) {
      const xa = data[offset + a];
      rhs[a] += xa * wz;
      const wxa = startWeight * xa;
      const row = a * p;
      for (let b = a; b < p; b++) info[row + b] += wxa * data[offset + b];
    }
  }
  let devianceOld = -2 * (events * Math.log(0.75) + (n - events) * Math.log(0.25));
  let beta = new Float64Array(p);
  let previous = new Float64Array(p);
  let factorOk = choleskyDecompose(info, p, work.lower) < 0;
  if (!factorOk) throw new Error("logisticRegression: the information matrix is singular at the start; check the predictors for collinearity");
  choleskySolve(work.lower, p, rhs, beta);
  let iterations = 1;
  let converged = false;
  let deviance = NaN;

  for (;;) {
    let pass = informationPass(design, y, beta, work);
    deviance = -2 * pass.logLik;
    // Step halving: glm.fit halves on a non-finite deviance; a rising one is halved here too, except
    // after the first solve, whose reference deviance belongs to the starting means, not a model.
    const rising = (): boolean => iterations > 1 && deviance > devianceOld * (1 + 1e-12) + 1e-12;
    for (let halvings = 0; (!Number.isFinite(deviance) || rising()) && halvings < 30; halvings++) {
      for (let j = 0; j < p; j++) beta[j] = (beta[j] + previous[j]) / 2;
      pass = informationPass(design, y, beta, work);
      deviance = -2 * pass.logLik;
    }
    factorOk = choleskyDecompose(info, p, work.lower) < 0;
    if (Math.abs(deviance - devianceOld) / (Math.abs(deviance) + 0.1) < tolerance) {
      converged = true;
      break;
    }
    if (!factorOk || iterations >= maxIterations) break;
    choleskySolve(work.lower, p, work.score, work.step);
    const swap = previous;
    previous = beta;
    beta = swap;
    for (let j = 0; j < p; j++) beta[j] = previous[j] + work.step[j];
    devianceOld = deviance;
    iterations++;
  }
  const lastStep = new Float64Array(p);
  for (let j = 0; j < p; j++) lastStep[j] = beta[j] - previous[j];
  return { beta, deviance, iterations, converged, information: info, lower: work.lower, factorOk, lastStep };
}

/** Result of a (possibly penalized, possibly constrained) Newton fit. */
export interface NewtonFit {
  beta: Float64Array;
  logLik: number;
  /** logLik + (1/2) ln det(X'WX) when penalized, else logLik. */
  objective: number;
  iterations: number;
  converged: boolean;
  /** Rise of the objective over the last ten iterations (Infinity before ten): tells a creep along a flat ridge from a fit still climbing. */
  recentGain: number;
  information: Float64Array;
  lower: Float64Array;
}

export interface NewtonOptions {
  /** Firth's penalty (1/2) ln det(X'WX) on the log-likelihood. */
  penalized: boolean;
  start: ArrayLike<number>;
  /** Coefficients held at their values in `start` (profiles, reduced models). */
  fixed?: ReadonlySet<number>;
  maxIterations: number;
  /** Convergence when every free coefficient's Newton step is below this. */
  tolerance: number;
}

const MAX_STEP = 5;

/**
 * Maximises the log-likelihood, or Firth's penalized log-likelihood l(beta) + (1/2) ln det I(beta),
 * over the free coefficients. Steps solve I_FF delta = U*_F with the expected information I (the
 * scheme of Heinze & Schemper 2002), are capped at 5 per coefficient, and are halved until the
 * objective does not fall. The penalty always uses the full model's information.
 */
export function fitNewton(design: Design, y: ArrayLike<number>, options: NewtonOptions): NewtonFit {
  const { p } = design;
  const work = new Workspace(p);
  const free: number[] = [];
  for (let j = 0; j < p; j++) if (!options.fixed?.has(j)) free.push(j);
  const q = free.length;
  const subInformation = new Float64Array(q * q);
  const subLower = new Float64Array(q * q);
  const subScore = new Float64Array(q);
  const subStep = new Float64Array(q);
  let beta = Float64Array.from(options.start);
  let candidate = new Float64Array(p);

  const evaluate = (at: Float64Array): { logLik: number; objective: number; ok: boolean } => {
    const { logLik } = informationPass(design, y, at, work);
    const ok = choleskyDecompose(work.information, p, work.lower) < 0;
    if (!options.penalized) return { logLik, objective: logLik, ok };
    return { logLik, objective: ok ? logLik + 0.5 * choleskyLogDeterminant(work.lower, p) : -Infinity, ok };
  };

  let current = evaluate(beta);
  if (!current.ok && options.penalized) throw new Error("logisticRegression: the information matrix is singular; check the predictors for collinearity");
  let iterations = 0;
  let converged = false;
  let previousObjective = current.objective;
  let flatSteps = 0;
  const history: number[] = [];
  while (iterations < options.maxIterations) {
    history.push(current.objective);
    // Score at beta (the information and its factor are current from the last evaluation).
    if (options.penalized) modifiedScorePass(design, y, beta, work);
    for (let a = 0; a < q; a++) {
      subScore[a] = work.score[free[a]];
      for (let b = a; b < q; b++) {
        const i = Math.min(free[a], free[b]);
        const j = Math.max(free[a], free[b]);
        subInformation[a * q + b] = work.information[i * p + j];
      }
    }
    if (q === 0) {
      converged = true;
      break;
    }
    if (choleskyDecompose(subInformation, q, subLower) >= 0) break;
    choleskySolve(subLower, q, subScore, subStep);
    let maxStep = 0;
    for (let a = 0; a < q; a++) maxStep = Math.max(maxStep, Math.abs(subStep[a]));
    if (maxStep < options.tolerance) {
      converged = true;
      break;
    }
    const scale = maxStep > MAX_STEP ? MAX_STEP / maxStep : 1;
    let factor = scale;
    let accepted = false;
    for (let halvings = 0; halvings < 40; halvings++) {
      candidate.set(beta);
      for (let a = 0; a < q; a++) candidate[free[a]] += factor * subStep[a];
      const next = evaluate(candidate);
      if (next.ok && next.objective >= current.objective - 1e-12 * Math.abs(current.objective)) {
        const swap = beta;
        beta = candidate;
        candidate = swap;
        current = next;
        accepted = true;
        break;
      }
      factor /= 2;
    }
    iterations++;
    // A flat (penalized) likelihood: steps that no longer raise it are not progress, however large
    // the Newton step looks; three such steps in a row end the fit as converged (the line search has
    // found no ascent), so it cannot bounce between two points.
    if (accepted) {
      const gain = current.objective - previousObjective;
      flatSteps = gain <= 1e-15 * (1 + Math.abs(current.objective)) ? flatSteps + 1 : 0;
      previousObjective = current.objective;
      if (flatSteps >= 3) {
        converged = true;
        break;
      }
    }
    if (!accepted) {
      // No ascent along the step: we sit at the optimum to rounding. Restore beta's information.
      current = evaluate(beta);
      converged = maxStep * factor < 1e-6;
      break;
    }
    if (maxStep * factor < options.tolerance) {
      converged = true;
      break;
    }
  }
  // The information and factor in the workspace belong to the last evaluated point, which is beta.
  const recentGain = history.length >= 10 ? current.objective - history[history.length - 10] : Infinity;
  return { beta, logLik: current.logLik, objective: current.objective, iterations, converged, recentGain, information: work.information, lower: work.lower };
}

/** Largest |x_i' step| over the rows: how far the last iteration moved any linear predictor. */
export function largestRowChange(design: Design, step: ArrayLike<number>): number {
  const { data, n, p } = design;
  let largest = 0;
  for (let i = 0; i < n; i++) {
    let dot = 0;
    for (let j = 0; j < p; j++) dot += data[i * p + j] * step[j];
    largest = Math.max(largest, Math.abs(dot));
  }
  return largest;
}

/**
 * Continues unpenalized Newton steps from a fit that still moves (the deviance criterion can stop
 * a diverging fit early when the deviance is large) until the linear predictors reach |eta| = 30
 * or the information becomes singular. Along a separation the step settles on the diverging
 * direction while every other coefficient converges, so the last step is a clean candidate for
 * isSeparatingDirection.
 */
export function divergingDirection(design: Design, y: ArrayLike<number>, fit: MaximumLikelihoodFit): Float64Array {
  const { p } = design;
  const work = new Workspace(p);
  const beta = Float64Array.from(fit.beta);
  const direction = Float64Array.from(fit.lastStep);
  for (let iteration = 0; iteration < 40; iteration++) {
    const { maxAbsEta } = informationPass(design, y, beta, work);
    if (maxAbsEta > 30 || choleskyDecompose(work.information, p, work.lower) >= 0) break;
    choleskySolve(work.lower, p, work.score, work.step);
    direction.set(work.step);
    // A negligible step means the fit has converged after all: nothing diverges.
    if (largestRowChange(design, work.step) < 1e-6) break;
    for (let j = 0; j < p; j++) beta[j] += work.step[j];
  }
  return direction;
}

/**
 * Checks a candidate direction d for (quasi-)complete separation (Albert & Anderson 1984): every
 * row must satisfy (2y - 1) x_i'd >= 0, up to rounding, and some row strictly. Along such a d
 * the likelihood keeps rising, so the maximum likelihood estimate does not exist.
 */
export function isSeparatingDirection(design: Design, y: ArrayLike<number>, direction: ArrayLike<number>): boolean {
  const { data, n, p } = design;
  let largest = 0;
  const products = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let dot = 0;
    for (let j = 0; j < p; j++) dot += data[i * p + j] * direction[j];
    products[i] = y[i] === 1 ? dot : -dot;
    largest = Math.max(largest, Math.abs(dot));
  }
  // Newton keeps moving the separated rows' linear predictor by about one unit per step.
  if (largest < 0.1) return false;
  const slack = 1e-6 * largest;
  for (let i = 0; i < n; i++) if (products[i] < -slack) return false;
  return true;
}
