// The logistic pieces both confounding judgements (over clades and over the other traits) use to
// turn a standardised risk curve back into one marginal log odds ratio.

/** The logistic function 1 / (1 + e^-eta), written to stay finite for large |eta|. */
export const expit = (eta: number): number => (eta >= 0 ? 1 / (1 + Math.exp(-eta)) : Math.exp(eta) / (1 + Math.exp(eta)));

/** Slope of a weighted (fractional) logistic regression of targets in [0, 1] on x, by Newton-Raphson. */
export function fractionalSlope(xs: Float64Array, ws: Float64Array, targets: Float64Array): number {
  let total = 0;
  let events = 0;
  for (let i = 0; i < xs.length; i++) {
    total += ws[i];
    events += ws[i] * targets[i];
  }
  if (!(events > 0 && events < total)) return NaN;
  let a = Math.log(events / (total - events));
  let b = 0;
  for (let iteration = 0; iteration < 50; iteration++) {
    let ua = 0;
    let ub = 0;
    let iaa = 0;
    let iab = 0;
    let ibb = 0;
    for (let i = 0; i < xs.length; i++) {
      const x = xs[i];
      const w = ws[i];
      const p = expit(a + b * x);
      const r = targets[i] - p;
      const v = w * p * (1 - p);
      ua += w * r;
      ub += w * r * x;
      iaa += v;
      iab += v * x;
      ibb += v * x * x;
    }
    const det = iaa * ibb - iab * iab;
    if (!(det > 0)) return NaN;
    const da = (ibb * ua - iab * ub) / det;
    const db = (iaa * ub - iab * ua) / det;
    a += da;
    b += db;
    if (Math.abs(b) > 50) return NaN;
    if (Math.abs(da) + Math.abs(db) < 1e-10) return b;
  }
  return NaN;
}
