// Probability distributions and special functions used across the statistics engine. Upper tails are
// computed directly (upper regularized gamma, complementary beta), never as 1 - cdf, so that small
// p-values keep their relative precision instead of underflowing to 0 near 1e-16.

const LOG_SQRT_2PI = 0.5 * Math.log(2 * Math.PI);
const DOUBLE_EPSILON = 2.220446049250313e-16;
const TINY = 1e-300;

// Lanczos approximation, g = 7 with 9 coefficients (Lanczos 1964; the coefficient set tabulated by
// Press et al. 2007, Numerical Recipes 3rd ed., section 6.1), relative error below 1e-15.
const LANCZOS_G = 7;
const LANCZOS_COEFFICIENTS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

/** Natural log of the gamma function for x > 0. */
export function logGamma(x: number): number {
  if (!(x > 0)) throw new Error(`logGamma: x is ${x}; it must be positive`);
  if (x < 0.5) {
    // Reflection keeps the Lanczos sum in its accurate range.
    return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x);
  }
  const z = x - 1;
  let sum = LANCZOS_COEFFICIENTS[0];
  for (let i = 1; i < LANCZOS_COEFFICIENTS.length; i++) sum += LANCZOS_COEFFICIENTS[i] / (z + i);
  const t = z + LANCZOS_G + 0.5;
  return LOG_SQRT_2PI + (z + 0.5) * Math.log(t) - t + Math.log(sum);
}

/**
 * ln(0!), ln(1!), ..., ln(n!) as one array, summed with Kahan compensation so the absolute error
 * stays near one rounding of the largest value even for n in the millions.
 */
export function logFactorialTable(n: number): Float64Array {
  const table = new Float64Array(n + 1);
  let sum = 0;
  let compensation = 0;
  for (let i = 2; i <= n; i++) {
    const term = Math.log(i) - compensation;
    const next = sum + term;
    compensation = next - sum - term;
    sum = next;
    table[i] = sum;
  }
  return table;
}

/** ln(sum of exp(values[i])) over from <= i < to, without overflow or underflow. */
export function logSumExp(values: ArrayLike<number>, from = 0, to = values.length): number {
  let max = -Infinity;
  for (let i = from; i < to; i++) if (values[i] > max) max = values[i];
  if (max === -Infinity) return -Infinity;
  let sum = 0;
  for (let i = from; i < to; i++) sum += Math.exp(values[i] - max);
  return max + Math.log(sum);
}

/**
 * Accumulates a sum of positive terms given by their logarithms, keeping a running maximum so that
 * neither very large nor very small terms are lost.
 */
export class LogSumAccumulator {
  private max = -Infinity;
  private scaled = 0;

  add(logTerm: number): void {
    if (logTerm === -Infinity) return;
    if (logTerm <= this.max) {
      this.scaled += Math.exp(logTerm - this.max);
    } else {
      this.scaled = this.scaled * Math.exp(this.max - logTerm) + 1;
      this.max = logTerm;
    }
  }

  /** ln of the total; -Infinity when nothing was added. */
  value(): number {
    return this.max === -Infinity ? -Infinity : this.max + Math.log(this.scaled);
  }
}

/** Terms of a series or continued fraction before it is declared not converged (its value is then NaN). */
const MAX_TERMS = 100000;

// ln of the common factor x^a e^-x / Gamma(a) of both incomplete gamma expansions.
function logGammaPrefactor(a: number, x: number): number {
  return a * Math.log(x) - x - logGamma(a);
}

// Series for the lower regularized gamma P(a, x); converges quickly for x < a + 1.
function lowerGammaSeries(a: number, x: number): number {
  let term = 1 / a;
  let sum = term;
  let converged = false;
  for (let n = 1; n < MAX_TERMS; n++) {
    term *= x / (a + n);
    sum += term;
    if (Math.abs(term) < Math.abs(sum) * DOUBLE_EPSILON) {
      converged = true;
      break;
    }
  }
  // Not converged: NaN rather than a truncated sum, so callers say no value could be computed.
  return converged ? sum * Math.exp(logGammaPrefactor(a, x)) : NaN;
}

// Continued fraction for the upper regularized gamma Q(a, x), modified Lentz method
// (Lentz 1976; Thompson & Barnett 1986); converges quickly for x >= a + 1.
function upperGammaContinuedFraction(a: number, x: number): number {
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  let converged = false;
  for (let i = 1; i < MAX_TERMS; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < DOUBLE_EPSILON) {
      converged = true;
      break;
    }
  }
  return converged ? h * Math.exp(logGammaPrefactor(a, x)) : NaN;
}

/** Lower regularized incomplete gamma P(a, x) = gamma(a, x) / Gamma(a). */
export function regularizedGammaP(a: number, x: number): number {
  if (x <= 0) return 0;
  if (x === Infinity) return 1;
  return x < a + 1 ? lowerGammaSeries(a, x) : 1 - upperGammaContinuedFraction(a, x);
}

/** Upper regularized incomplete gamma Q(a, x) = Gamma(a, x) / Gamma(a), computed directly. */
export function regularizedGammaQ(a: number, x: number): number {
  if (x <= 0) return 1;
  if (x === Infinity) return 0;
  return x < a + 1 ? 1 - lowerGammaSeries(a, x) : upperGammaContinuedFraction(a, x);
}

/** Complementary error function erfc(x) = 1 - erf(x), via erfc(x) = Q(1/2, x^2) for x >= 0. */
export function erfc(x: number): number {
  if (Number.isNaN(x)) return NaN;
  return x >= 0 ? regularizedGammaQ(0.5, x * x) : 1 + regularizedGammaP(0.5, x * x);
}

/** P(Z > z) for a standard normal Z, accurate far into the upper tail. */
export function normalUpperTail(z: number): number {
  if (Number.isNaN(z)) return NaN;
  const half = 0.5 * z * z;
  return z >= 0 ? 0.5 * regularizedGammaQ(0.5, half) : 0.5 * (1 + regularizedGammaP(0.5, half));
}

/** P(Z <= z) for a standard normal Z. */
export function normalCdf(z: number): number {
  return normalUpperTail(-z);
}

/** Two-sided p-value P(|Z| >= |z|) for a standard normal Z. */
export function normalTwoSidedP(z: number): number {
  return regularizedGammaQ(0.5, 0.5 * z * z);
}

// Rational approximation of the normal quantile (Acklam 2003, relative error about 1.15e-9),
// used as the starting point for a Halley refinement against normalCdf.
const ACKLAM_A = [-3.969683028665376e1, 2.209460984245205e2, -2.759285104469687e2, 1.38357751867269e2, -3.066479806614716e1, 2.506628277459239];
const ACKLAM_B = [-5.447609879822406e1, 1.615858368580409e2, -1.556989798598866e2, 6.680131188771972e1, -1.328068155288572e1];
const ACKLAM_C = [-7.784894002430293e-3, -3.223964580411365e-1, -2.400758277161838, -2.549732539343734, 4.374664141464968, 2.938163982698783];
const ACKLAM_D = [7.784695709041462e-3, 3.224671290700398e-1, 2.445134137142996, 3.754408661907416];

/** Quantile of the standard normal distribution: the z with P(Z <= z) = p, for 0 < p < 1. */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) {
    if (p === 0) return -Infinity;
    if (p === 1) return Infinity;
    throw new Error(`normalQuantile: p is ${p}; it must lie between 0 and 1`);
  }
  // Work in the lower half, where p itself carries full precision.
  if (p > 0.5) return -normalQuantile(1 - p);
  let x: number;
  if (p < 0.02425) {
    const q = Math.sqrt(-2 * Math.log(p));
    x = (((((ACKLAM_C[0] * q + ACKLAM_C[1]) * q + ACKLAM_C[2]) * q + ACKLAM_C[3]) * q + ACKLAM_C[4]) * q + ACKLAM_C[5]) /
      ((((ACKLAM_D[0] * q + ACKLAM_D[1]) * q + ACKLAM_D[2]) * q + ACKLAM_D[3]) * q + 1);
  } else {
    const q = p - 0.5;
    const r = q * q;
    x = ((((((ACKLAM_A[0] * r + ACKLAM_A[1]) * r + ACKLAM_A[2]) * r + ACKLAM_A[3]) * r + ACKLAM_A[4]) * r + ACKLAM_A[5]) * q) /
      (((((ACKLAM_B[0] * r + ACKLAM_B[1]) * r + ACKLAM_B[2]) * r + ACKLAM_B[3]) * r + ACKLAM_B[4]) * r + 1);
  }
  // Halley steps on F(x) - p; the relative residual in the lower tail keeps full precision.
  for (let i = 0; i < 3; i++) {
    const error = normalCdf(x) - p;
    const u = error * Math.sqrt(2 * Math.PI) * Math.exp(0.5 * x * x);
    const next = x - u / (1 + 0.5 * x * u);
    if (next === x) break;
    x = next;
  }
  return x;
}

/** z with P(|Z| <= z) = level, e.g. 1.959964 for level 0.95. */
export function twoSidedCriticalValue(level: number): number {
  return -normalQuantile((1 - level) / 2);
}

/** P(X > x) for a chi-square variable X with df degrees of freedom, computed directly. */
export function chiSquareUpperTail(x: number, df: number): number {
  if (!(df > 0)) throw new Error(`chiSquareUpperTail: df is ${df}; it must be positive`);
  if (Number.isNaN(x)) return NaN;
  return regularizedGammaQ(df / 2, x / 2);
}

// Continued fraction for the incomplete beta function, modified Lentz method.
function betaContinuedFraction(x: number, a: number, b: number): number {
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  let converged = false;
  for (let m = 1; m < MAX_TERMS; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < DOUBLE_EPSILON) {
      converged = true;
      break;
    }
  }
  return converged ? h : NaN;
}

/**
 * Regularized incomplete beta I_x(a, b). `complement` may pass 1 - x computed without cancellation
 * by the caller, which keeps the far tails accurate.
 */
export function regularizedBeta(x: number, a: number, b: number, complement = 1 - x): number {
  if (x <= 0) return 0;
  if (complement <= 0) return 1;
  const logFront = logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(complement);
  if (x < (a + 1) / (a + b + 2)) return (Math.exp(logFront) * betaContinuedFraction(x, a, b)) / a;
  return 1 - (Math.exp(logFront) * betaContinuedFraction(complement, b, a)) / b;
}

/** Two-sided p-value P(|T| >= |t|) for Student's t with df degrees of freedom. */
export function studentTTwoSidedP(t: number, df: number): number {
  if (!(df > 0)) throw new Error(`studentTTwoSidedP: df is ${df}; it must be positive`);
  if (!Number.isFinite(t)) return Number.isNaN(t) ? NaN : 0;
  const t2 = t * t;
  return regularizedBeta(df / (df + t2), df / 2, 0.5, t2 / (df + t2));
}
