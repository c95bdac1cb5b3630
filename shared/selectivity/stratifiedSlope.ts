/** The common slope of a logistic regression with one intercept per stratum. */
export interface StratifiedSlopeFit {
  /** Slope b on the log-odds scale, and its standard error from the inverse information (NaN when not asked for). */
  estimate: number;
  se: number;
  iterations: number;
  /** Log-likelihood at the estimate. */
  logLik: number;
}

const MAX_ITERATIONS = 50;
const TOLERANCE = 1e-10;
/** A fitted log-odds beyond this means the fit runs off to infinity (separation). */
const DIVERGENCE_ETA = 30;

/**
 * Maximum likelihood fit of logit P(y_i = 1) = a_{s(i)} + b x_i, one intercept per stratum s and a
 * common slope b: the same model as a logistic regression on x plus a dummy term per stratum, whose
 * slope and standard error it returns, but solved by Newton-Raphson with the information matrix's
 * arrowhead structure (a diagonal block for the intercepts bordered by the slope's row), so each
 * iteration costs one pass over the rows, whatever the number of strata. The slope's step comes
 * from the Schur complement s = sum w x^2 - sum_k (sum_k w x)^2 / sum_k w, and its variance at the
 * optimum is 1 / s. Steps are halved while the log-likelihood falls.
 *
 * Every stratum must hold both outcomes. Returns null when the fit does not settle (the values of
 * x separate the outcomes within strata, so the estimate is infinite); callers then fall back to
 * the statistics engine's Firth regression.
 *
 * @example
 * fitStratifiedSlope(Float64Array.of(0, 1, 2, 0, 1, 2, 3), Uint8Array.of(0, 1, 0, 0, 0, 1, 1), Int32Array.of(0, 0, 0, 1, 1, 1, 1), 2)
 * // => { estimate: 1.5681, se: 1.1866, ... } (as the x coefficient of a logistic regression on x and a stratum dummy)
 */
export function fitStratifiedSlope(
  x: Float64Array,
  y: ArrayLike<number>,
  stratum: Int32Array,
  strata: number,
  opts: {
    standardError?: boolean;
    /**
     * Taxa pooled by stratum and value: row i stands for trials[i] taxa with the value x[i], y[i] of
     * them victims (the same likelihood as the taxa one by one). Absent: one taxon per row, y 0 or 1.
     */
    trials?: ArrayLike<number>;
  } = {},
): StratifiedSlopeFit | null {
  const n = x.length;
  const trials = opts.trials;
  const intercepts = new Float64Array(strata);
  const events = new Float64Array(strata);
  const sizes = new Float64Array(strata);
  for (let i = 0; i < n; i++) {
    sizes[stratum[i]] += trials ? trials[i] : 1;
    events[stratum[i]] += y[i];
  }
  for (let k = 0; k < strata; k++) {
    if (!(events[k] > 0 && events[k] < sizes[k])) throw new Error(`fitStratifiedSlope: stratum ${k} does not hold both outcomes`);
    intercepts[k] = Math.log(events[k] / (sizes[k] - events[k]));
  }
  let slope = 0;
  let maxAbsX = 0;
  for (let i = 0; i < n; i++) maxAbsX = Math.max(maxAbsX, Math.abs(x[i]));
  const stepA = new Float64Array(strata);
  const trialA = new Float64Array(strata);

  // One pass at (a, b) gives the log-likelihood and the pieces of the score and information (per
  // stratum: score, weight and cross term; for the slope: score and weight), so a step accepted by
  // the halving test needs no second pass for the next iteration.
  const pieces = () => ({ scoreA: new Float64Array(strata), weightA: new Float64Array(strata), crossA: new Float64Array(strata), scoreB: 0, weightB: 0 });
  const evaluate = (a: Float64Array, b: number, into: ReturnType<typeof pieces>): number => {
    into.scoreA.fill(0);
    into.weightA.fill(0);
    into.crossA.fill(0);
    let scoreB = 0;
    let weightB = 0;
    let sum = 0;
    for (let i = 0; i < n; i++) {
      const k = stratum[i];
      const xi = x[i];
      const t = trials ? trials[i] : 1;
      const eta = a[k] + b * xi;
      // y eta - ln(1 + e^eta), without overflow
      const softplus = eta > 0 ? eta + Math.log1p(Math.exp(-eta)) : Math.log1p(Math.exp(eta));
      sum += y[i] * eta - t * softplus;
      const mu = 1 / (1 + Math.exp(-eta));
      const w = t * mu * (1 - mu);
      const r = y[i] - t * mu;
      into.scoreA[k] += r;
      into.weightA[k] += w;
      into.crossA[k] += w * xi;
      scoreB += r * xi;
      weightB += w * xi * xi;
    }
    into.scoreB = scoreB;
    into.weightB = weightB;
    return sum;
  };

  let current = pieces();
  let trial = pieces();
  let logLik = evaluate(intercepts, slope, current);
  for (let iteration = 1; iteration <= MAX_ITERATIONS; iteration++) {
    const { scoreA, weightA, crossA, scoreB, weightB } = current;
    let schur = weightB;
    let reducedScore = scoreB;
    for (let k = 0; k < strata; k++) {
      schur -= (crossA[k] * crossA[k]) / weightA[k];
      reducedScore -= (crossA[k] * scoreA[k]) / weightA[k];
    }
    if (!(schur > 0) || !Number.isFinite(schur)) return null;
    let stepB = reducedScore / schur;
    for (let k = 0; k < strata; k++) stepA[k] = (scoreA[k] - crossA[k] * stepB) / weightA[k];

    let trialB = slope + stepB;
    let trialLogLik = -Infinity;
    for (let halvings = 0; halvings < 30; halvings++) {
      for (let k = 0; k < strata; k++) trialA[k] = intercepts[k] + stepA[k];
      trialB = slope + stepB;
      trialLogLik = evaluate(trialA, trialB, trial);
      if (trialLogLik >= logLik - 1e-12 * Math.abs(logLik)) break;
      stepB /= 2;
      for (let k = 0; k < strata; k++) stepA[k] /= 2;
    }
    const change = Math.abs(trialLogLik - logLik) / (Math.abs(trialLogLik) + 0.1);
    intercepts.set(trialA);
    slope = trialB;
    logLik = trialLogLik;
    [current, trial] = [trial, current];
    if (runsOff(intercepts, slope, maxAbsX)) return null;
    if (change < TOLERANCE) {
      // The standard error costs one more pass; a caller wanting the estimate alone (a bootstrap) skips it.
      const se = opts.standardError === false ? NaN : Math.sqrt(1 / informationSchur(x, trials, stratum, intercepts, slope, strata));
      return { estimate: slope, se, iterations: iteration, logLik };
    }
  }
  return null;
}

function runsOff(intercepts: Float64Array, slope: number, maxAbsX: number): boolean {
  const slopeReach = Math.abs(slope) * maxAbsX;
  for (let k = 0; k < intercepts.length; k++) if (Math.abs(intercepts[k]) + slopeReach > 2 * DIVERGENCE_ETA) return true;
  return slopeReach > DIVERGENCE_ETA;
}

/** The Schur complement of the information at the final estimate: 1 / Var(slope). */
function informationSchur(x: Float64Array, trials: ArrayLike<number> | undefined, stratum: Int32Array, intercepts: Float64Array, slope: number, strata: number): number {
  const weightA = new Float64Array(strata);
  const crossA = new Float64Array(strata);
  let weightB = 0;
  for (let i = 0; i < x.length; i++) {
    const k = stratum[i];
    const mu = 1 / (1 + Math.exp(-(intercepts[k] + slope * x[i])));
    const w = (trials ? trials[i] : 1) * mu * (1 - mu);
    weightA[k] += w;
    crossA[k] += w * x[i];
    weightB += w * x[i] * x[i];
  }
  let schur = weightB;
  for (let k = 0; k < strata; k++) schur -= (crossA[k] * crossA[k]) / weightA[k];
  return schur;
}
