import type { DesignMatrix } from "../stats";
import { normalTwoSidedP } from "../stats/distributions";
import { choleskyDecompose, choleskySolve } from "../stats/linalg";
import { fitMaximumLikelihood, informationPass, Workspace, type Design } from "../stats/logisticKernels";
import { createUniformSource } from "../stats/random";
import { CLADE_CONFOUNDING_REPLICATES, CLADE_CONFOUNDING_SEED } from "./cladeConfounding";
import { expit, fractionalSlope } from "./fractionalSlope";
import type { ConfoundingJudgement } from "./types";

/** One contrast to judge: a state's dummy column (others of the same trait listed) or a numeric column (0-based, without intercept). */
export type ModelContrast =
  | { key: string; state: string; kind: "state"; column: number; traitColumns: number[] }
  | { key: string; state: ""; kind: "numeric"; column: number };

const GRID = 64;

/**
 * The confounding judgement for the adjustment for the other traits, comparing like with like: the
 * crude odds ratio of a contrast against its marginal odds ratio standardised over the other
 * traits in the multiple logistic regression (g-computation; Robins 1986): every taxon's risk is
 * predicted with the trait set to the state and to the reference (or, for numbers, along the
 * trait's values) while its other traits stay as they are, the risks are averaged, and the odds
 * ratio of the averages (or the logistic slope of the averaged risk curve) is taken. Without
 * confounding by the other traits it estimates the same marginal odds ratio as the crude one, so
 * the non-collapsibility of odds ratios does not move it (Greenland, Robins & Pearl 1999). The
 * standard error of ln(crude / standardised) comes from a seeded bootstrap over taxa in which the
 * model is re-estimated by one Newton step from the full-sample fit (a one-step bootstrap); the flag needs both a change above the threshold and a two-sided normal p
 * below 1 - level. A fit that separates (Firth's) is not judged.
 *
 * @example
 * judgeModelConfounding(design, y, [{ key: "life_habit", state: "infaunal", kind: "state", column: 2, traitColumns: [2] }], { threshold: 0.1, level: 0.95 })
 * // => Map { "life_habit" => Map { "infaunal" => { crude: 2.1, standardised: 2.05, change: 0.02, flagged: false, ... } } }
 */
export function judgeModelConfounding(
  design: DesignMatrix,
  y: ArrayLike<number>,
  contrasts: ModelContrast[],
  options: { threshold: number; level: number; replicates?: number; seed?: number },
): Map<string, Map<string, ConfoundingJudgement>> {
  // Large studies: fewer replicates (each one passes over every taxon).
  const replicates = options.replicates ?? (design.rows > 20_000 ? 20 : CLADE_CONFOUNDING_REPLICATES);
  const seed = options.seed ?? CLADE_CONFOUNDING_SEED;
  const n = design.rows;
  const p = design.columns + 1;
  const full = withIntercept(design);
  const out = new Map<string, Map<string, ConfoundingJudgement>>();
  const all = Int32Array.from({ length: n }, (_, i) => i);
  let fitted: Float64Array | null = null;
  const work = new Workspace(p);
  const estimate = (rows: Int32Array): number[] | null => {
    const data = new Float64Array(rows.length * p);
    const ys = new Float64Array(rows.length);
    rows.forEach((r, i) => {
      data.set(full.subarray(r * p, r * p + p), i * p);
      ys[i] = y[r];
    });
    const sub: Design = { data, n: rows.length, p };
    let beta: Float64Array;
    if (!fitted) {
      let fit;
      try {
        fit = fitMaximumLikelihood(sub, ys, 25, 1e-8);
      } catch {
        return null;
      }
      if (!fit.converged) return null;
      beta = fit.beta;
      fitted = Float64Array.from(fit.beta);
    } else {
      // A replicate: one Newton step from the full-sample fit (a one-step bootstrap, first-order
      // equivalent to refitting and far cheaper on large studies).
      informationPass(sub, ys, fitted, work);
      if (choleskyDecompose(work.information, p, work.lower) >= 0) return null;
      choleskySolve(work.lower, p, work.score, work.step);
      beta = Float64Array.from(fitted, (b, j) => b + work.step[j]);
    }
    return contrasts.map((c) => crudeLog(sub, ys, c) - standardisedLog(sub, beta, c));
  };
  const observed = estimate(all);
  if (!observed) return out;
  const crudeObserved = contrasts.map((c) => crudeLog({ data: full, n, p }, Float64Array.from(y), c));
  const random = createUniformSource(seed);
  const draws: number[][] = contrasts.map(() => []);
  const rows = new Int32Array(n);
  for (let b = 0; b < replicates; b++) {
    for (let i = 0; i < n; i++) rows[i] = Math.floor(random() * n);
    const d = estimate(rows);
    if (!d) continue;
    d.forEach((v, k) => {
      if (Number.isFinite(v)) draws[k].push(v);
    });
  }
  contrasts.forEach((c, k) => {
    const difference = observed[k];
    const crude = crudeObserved[k];
    if (!Number.isFinite(difference) || !Number.isFinite(crude)) return;
    const standardised = crude - difference;
    const sample = draws[k];
    let se: number | null = null;
    if (sample.length >= 0.9 * replicates && sample.length > 1) {
      const mean = sample.reduce((a, v) => a + v, 0) / sample.length;
      se = Math.sqrt(sample.reduce((a, v) => a + (v - mean) ** 2, 0) / (sample.length - 1));
    }
    const z = se !== null && se > 0 ? difference / se : null;
    const pValue = z !== null ? normalTwoSidedP(z) : null;
    const change = Math.abs(Math.exp(-difference) - 1);
    const flagged = change > options.threshold && pValue !== null && pValue < 1 - options.level;
    const percent = String(Number((options.threshold * 100).toFixed(1)));
    const judgement: ConfoundingJudgement = {
      crude: Math.exp(crude),
      standardised: Math.exp(standardised),
      change,
      seLogDifference: se,
      z,
      pValue,
      informativeClades: null,
      thin: false,
      flagged,
      replicates,
      seed,
      method:
        `Flag when the marginal odds ratio standardised over the other traits of the multiple regression (g-computation) differs from the crude one over the same taxa by more than ${percent}% ` +
        `(change-in-estimate threshold; common practice, no source) and by more than its own uncertainty: ln(crude / standardised) over its standard error from a bootstrap over taxa with the model re-estimated (one Newton step) ` +
        `(${replicates} replicates, seed ${seed}), two-sided p below ${String(Number((1 - options.level).toFixed(4)))}${se === null ? " (too many replicates could not be fitted, so no flag)" : ""}; ` +
        `odds ratios are not collapsible, so the crude one is compared with a standardised marginal one (Greenland, Robins & Pearl 1999, Statistical Science 14:29).`,
    };
    if (!out.has(c.key)) out.set(c.key, new Map());
    out.get(c.key)!.set(c.state, judgement);
  });
  return out;
}

function withIntercept(design: DesignMatrix): Float64Array {
  const p = design.columns + 1;
  const data = new Float64Array(design.rows * p);
  for (let i = 0; i < design.rows; i++) {
    data[i * p] = 1;
    for (let j = 0; j < design.columns; j++) data[i * p + j + 1] = design.data[i * design.columns + j];
  }
  return data;
}

/** Rows of a state contrast: the state's own taxa and the reference taxa (all dummies of the trait 0). */
function inContrast(d: Design, i: number, c: Extract<ModelContrast, { kind: "state" }>): 0 | 1 | -1 {
  if (d.data[i * d.p + c.column + 1] === 1) return 1;
  for (const other of c.traitColumns) if (d.data[i * d.p + other + 1] !== 0) return -1;
  return 0;
}

function crudeLog(d: Design, y: ArrayLike<number>, c: ModelContrast): number {
  if (c.kind === "state") {
    let a = 0;
    let b = 0;
    let cc = 0;
    let dd = 0;
    for (let i = 0; i < d.n; i++) {
      const side = inContrast(d, i, c);
      if (side < 0) continue;
      if (side === 1) {
        if (y[i] === 1) a++;
        else b++;
      } else if (y[i] === 1) cc++;
      else dd++;
    }
    if (a === 0 || b === 0 || cc === 0 || dd === 0) {
      a += 0.5;
      b += 0.5;
      cc += 0.5;
      dd += 0.5;
    }
    return Math.log((a * dd) / (b * cc));
  }
  const x = new Float64Array(d.n);
  for (let i = 0; i < d.n; i++) x[i] = d.data[i * d.p + c.column + 1];
  return fractionalSlope(x, new Float64Array(d.n).fill(1), Float64Array.from(y));
}

function standardisedLog(d: Design, beta: Float64Array, c: ModelContrast): number {
  const { n, p, data } = d;
  const j = c.column + 1;
  if (c.kind === "state") {
    let r1 = 0;
    let r0 = 0;
    let count = 0;
    for (let i = 0; i < n; i++) {
      if (inContrast(d, i, c) < 0) continue;
      let eta = 0;
      for (let k = 0; k < p; k++) eta += data[i * p + k] * beta[k];
      const base = eta - data[i * p + j] * beta[j];
      r1 += expit(base + beta[j]);
      r0 += expit(base);
      count++;
    }
    r1 /= count;
    r0 /= count;
    return r1 > 0 && r1 < 1 && r0 > 0 && r0 < 1 ? Math.log(r1 / (1 - r1)) - Math.log(r0 / (1 - r0)) : NaN;
  }
  // Numbers: the averaged risk curve on a grid of the trait's quantiles, read at every taxon's value.
  const base = new Float64Array(n);
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let eta = 0;
    for (let k = 0; k < p; k++) eta += data[i * p + k] * beta[k];
    x[i] = data[i * p + j];
    base[i] = eta - x[i] * beta[j];
  }
  const sorted = Float64Array.from(x).sort();
  const grid = Array.from({ length: GRID }, (_, g) => sorted[Math.round((g / (GRID - 1)) * (n - 1))]);
  const curve = grid.map((value) => {
    let sum = 0;
    for (let i = 0; i < n; i++) sum += expit(base[i] + beta[j] * value);
    return sum / n;
  });
  const targets = new Float64Array(n);
  for (let i = 0; i < n; i++) targets[i] = readCurve(grid, curve, x[i]);
  return fractionalSlope(x, new Float64Array(n).fill(1), targets);
}

function readCurve(grid: number[], curve: number[], value: number): number {
  let low = 0;
  let high = grid.length - 1;
  if (value <= grid[0]) return curve[0];
  if (value >= grid[high]) return curve[high];
  while (high - low > 1) {
    const mid = (low + high) >> 1;
    if (grid[mid] <= value) low = mid;
    else high = mid;
  }
  const span = grid[high] - grid[low];
  return span > 0 ? curve[low] + ((curve[high] - curve[low]) * (value - grid[low])) / span : curve[low];
}
