// Root finding for monotone one-dimensional problems (confidence limits, estimating equations).

/**
 * Brent's method (Brent 1973, Algorithms for Minimization without Derivatives, ch. 4): a root of f
 * in [a, b] where f(a) and f(b) differ in sign, to an absolute tolerance `tolerance` in x.
 * Returns NaN when it has not converged after maxIterations (callers report "did not converge").
 */
export function brentRoot(f: (x: number) => number, a: number, b: number, tolerance = 1e-12, maxIterations = 200): number {
  let fa = f(a);
  let fb = f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  if (Math.sign(fa) === Math.sign(fb)) throw new Error(`brentRoot: f(${a}) and f(${b}) have the same sign; no bracketed root`);
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iteration = 0; iteration < maxIterations; iteration++) {
    if (Math.sign(fb) === Math.sign(fc)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * Number.EPSILON * Math.abs(b) + 0.5 * tolerance;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol || fb === 0) return b;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      // Try inverse quadratic interpolation (secant when only two points are distinct).
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * m * s;
        q = 1 - s;
      } else {
        const qa = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qa * (qa - r) - (b - a) * (r - 1));
        q = (qa - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = m;
        e = m;
      }
    } else {
      d = m;
      e = m;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = f(b);
  }
  // Not converged within maxIterations: NaN, never the last iterate presented as a root.
  return NaN;
}

/**
 * Finds x with f(x) = 0 for f increasing in x, expanding a bracket outward from [low, high] by
 * doubling its width until the sign changes (at most up to |x| <= limit). Returns -Infinity or
 * Infinity when f keeps one sign up to the limit.
 */
export function increasingRoot(f: (x: number) => number, low: number, high: number, tolerance = 1e-12, limit = 1e4): number {
  let fLow = f(low);
  let fHigh = f(high);
  let width = high - low;
  while (fLow > 0) {
    if (low <= -limit) return -Infinity;
    high = low;
    fHigh = fLow;
    width *= 2;
    low = Math.max(low - width, -limit);
    fLow = f(low);
  }
  while (fHigh < 0) {
    if (high >= limit) return Infinity;
    low = high;
    fLow = fHigh;
    width *= 2;
    high = Math.min(high + width, limit);
    fHigh = f(high);
  }
  if (fLow === 0) return low;
  if (fHigh === 0) return high;
  return brentRoot(f, low, high, tolerance);
}
