/** The slope of a conditional logistic regression, one covariate, conditioned on every stratum. */
export interface ConditionalLogisticFit {
  /** Log odds ratio per unit of x within strata, and its standard error from the conditional information. */
  estimate: number;
  se: number;
  /** Conditional log-likelihood at the estimate. */
  logLik: number;
  iterations: number;
  converged: boolean;
  /** The estimate runs off to infinity: within every informative stratum x orders the outcomes. */
  separated: boolean;
  /** Strata holding both outcomes and two or more distinct values of x (the only ones that carry information). */
  informativeStrata: number;
}

/** One stratum prepared for the conditional likelihood: the smaller outcome group is the "cases". */
export interface ConditionalStratum {
  /** x centred on the stratum's mean, negated when the survivors are the smaller group. */
  x: Float64Array;
  /** Sum of the prepared x over the cases. */
  caseSum: number;
  /** Number of cases (at most half the stratum). */
  cases: number;
}

const MAX_ITERATIONS = 60;
const TOLERANCE = 1e-10;
/** Beyond this reach of |beta| * (range of x) the fit is taken to run off (separation). */
const RUN_OFF = 40;

/**
 * Prepares the strata of a conditional logistic regression: strata with a single outcome or a
 * single value of x carry no information on the slope and are dropped. Because the conditional
 * likelihood is unchanged by a shift of x within a stratum and by swapping the roles of the two
 * outcomes (with x negated), each stratum is centred and its smaller outcome group taken as cases,
 * which keeps the recursion short (Gail, Lubin & Rubinstein 1981).
 */
export function prepareConditionalStrata(x: ArrayLike<number>, y: ArrayLike<number>, stratum: ArrayLike<number>, strata: number): ConditionalStratum[] {
  const members: number[][] = Array.from({ length: strata }, () => []);
  for (let i = 0; i < x.length; i++) {
    const s = stratum[i];
    if (s >= 0 && s < strata && Number.isFinite(x[i])) members[s].push(i);
  }
  const prepared: ConditionalStratum[] = [];
  for (const rows of members) {
    let events = 0;
    let mean = 0;
    let low = Infinity;
    let high = -Infinity;
    for (const i of rows) {
      events += y[i];
      mean += x[i];
      low = Math.min(low, x[i]);
      high = Math.max(high, x[i]);
    }
    if (events === 0 || events === rows.length || !(high > low)) continue;
    mean /= rows.length;
    const flip = events > rows.length / 2;
    const values = new Float64Array(rows.length);
    let caseSum = 0;
    rows.forEach((i, k) => {
      const v = flip ? mean - x[i] : x[i] - mean;
      values[k] = v;
      if ((y[i] === 1) !== flip) caseSum += v;
    });
    prepared.push({ x: values, caseSum, cases: flip ? rows.length - events : events });
  }
  return prepared;
}

/**
 * Conditional log-likelihood of slope beta over prepared strata (each counted `weights[k]` times,
 * 1 when absent), with its first and second derivatives. Each stratum contributes
 * beta * sum_cases x - ln e_m(exp(beta x)), where e_m is the elementary symmetric polynomial of
 * degree m (the number of cases) over the stratum's members, computed by the recursion of Gail,
 * Lubin & Rubinstein (1981) together with its derivatives.
 */
export function conditionalLogLik(strata: ConditionalStratum[], beta: number, weights?: ArrayLike<number>): { logLik: number; score: number; information: number } {
  let logLik = 0;
  let score = 0;
  let information = 0;
  let e = new Float64Array(8);
  let d = new Float64Array(8);
  let s = new Float64Array(8);
  for (let k = 0; k < strata.length; k++) {
    const weight = weights ? weights[k] : 1;
    if (weight === 0) continue;
    const { x, caseSum, cases: m } = strata[k];
    if (e.length < m + 1) {
      e = new Float64Array(m + 1);
      d = new Float64Array(m + 1);
      s = new Float64Array(m + 1);
    }
    e.fill(0, 0, m + 1);
    d.fill(0, 0, m + 1);
    s.fill(0, 0, m + 1);
    e[0] = 1;
    let logScale = 0;
    for (let j = 0; j < x.length; j++) {
      const xj = x[j];
      const w = Math.exp(beta * xj);
      for (let r = Math.min(j + 1, m); r >= 1; r--) {
        s[r] += w * (xj * xj * e[r - 1] + 2 * xj * d[r - 1] + s[r - 1]);
        d[r] += w * (xj * e[r - 1] + d[r - 1]);
        e[r] += w * e[r - 1];
      }
      // Keep the polynomials in range; their ratios are unchanged by a common factor.
      let largest = 0;
      for (let r = 0; r <= m; r++) largest = Math.max(largest, e[r]);
      if (largest > 1e150) {
        for (let r = 0; r <= m; r++) {
          e[r] /= largest;
          d[r] /= largest;
          s[r] /= largest;
        }
        logScale += Math.log(largest);
      }
    }
    const mean = d[m] / e[m];
    logLik += weight * (beta * caseSum - Math.log(e[m]) - logScale);
    score += weight * (caseSum - mean);
    information += weight * (s[m] / e[m] - mean * mean);
  }
  return { logLik, score, information };
}

/**
 * Conditional logistic regression of a binary outcome on one covariate x with strata (Breslow &
 * Day 1980, vol. 1, ch. 7): the likelihood conditions on the number of events in each stratum, so
 * the stratum intercepts drop out. Unlike an ordinary logistic regression with one intercept per
 * stratum, whose slope is biased away from zero when strata are many and small (the incidental-
 * parameters problem; Neyman & Scott 1948), the conditional estimate stays consistent. Fitted by
 * Newton-Raphson on the concave conditional log-likelihood with step halving; the standard error
 * comes from the conditional information. When x orders the outcomes within every informative
 * stratum the estimate is infinite: `separated` is true and `converged` false.
 *
 * @example
 * // 1:1 matched pairs with a 0/1 exposure: 20 pairs with only the case exposed, 5 with only the
 * // control exposed. The conditional MLE is ln(20/5) (Breslow & Day 1980, ch. 7).
 * conditionalLogisticSlope(x, y, pair, 25).estimate // => 1.3863
 */
export function conditionalLogisticSlope(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  stratum: ArrayLike<number>,
  strata: number,
  opts: { start?: number; weights?: ArrayLike<number>; prepared?: ConditionalStratum[] } = {},
): ConditionalLogisticFit {
  const prepared = opts.prepared ?? prepareConditionalStrata(x, y, stratum, strata);
  return fitPrepared(prepared, opts.start ?? 0, opts.weights);
}

/** Newton-Raphson with step halving over prepared strata (weights: how often each one counts). */
export function fitPrepared(prepared: ConditionalStratum[], start: number, weights?: ArrayLike<number>): ConditionalLogisticFit {
  let reach = 0;
  let informative = 0;
  for (let k = 0; k < prepared.length; k++) {
    if (weights && weights[k] === 0) continue;
    informative++;
    let low = Infinity;
    let high = -Infinity;
    for (const v of prepared[k].x) {
      low = Math.min(low, v);
      high = Math.max(high, v);
    }
    reach = Math.max(reach, high - low);
  }
  if (informative === 0) return { estimate: NaN, se: NaN, logLik: 0, iterations: 0, converged: false, separated: false, informativeStrata: 0 };
  let beta = start;
  let current = conditionalLogLik(prepared, beta, weights);
  for (let iteration = 1; iteration <= MAX_ITERATIONS; iteration++) {
    if (!(current.information > 0)) break;
    let step = current.score / current.information;
    const cap = RUN_OFF / reach / 4;
    if (Math.abs(step) > cap) step = Math.sign(step) * cap;
    let next = conditionalLogLik(prepared, beta + step, weights);
    for (let halvings = 0; halvings < 40 && !(next.logLik >= current.logLik - 1e-12 * Math.abs(current.logLik)); halvings++) {
      step /= 2;
      next = conditionalLogLik(prepared, beta + step, weights);
    }
    beta += step;
    current = next;
    if (Math.abs(beta) * reach > RUN_OFF) {
      return { estimate: beta, se: NaN, logLik: current.logLik, iterations: iteration, converged: false, separated: true, informativeStrata: informative };
    }
    if (Math.abs(step) < TOLERANCE * (1 + Math.abs(beta))) {
      return { estimate: beta, se: 1 / Math.sqrt(current.information), logLik: current.logLik, iterations: iteration, converged: true, separated: false, informativeStrata: informative };
    }
  }
  return { estimate: beta, se: NaN, logLik: current.logLik, iterations: MAX_ITERATIONS, converged: false, separated: false, informativeStrata: informative };
}
