import type { DesignMatrix } from "../stats";
import { normalTwoSidedP } from "../stats/distributions";
import { choleskyDecompose, choleskySolve } from "../stats/linalg";
import { fitMaximumLikelihood, informationPass, linearPredictors, withRowPattern, Workspace, type Design } from "../stats/logisticKernels";
import { createUniformSource } from "../stats/random";
import { CLADE_CONFOUNDING_REPLICATES, CLADE_CONFOUNDING_SEED } from "./cladeConfounding";
import { answerIsClear, EARLY_STOP_BATCH, EARLY_STOP_TAXA } from "./bootstrapStopping";
import { expit, fractionalSlope } from "./fractionalSlope";
import { haldaneLogOdds } from "./haldaneLogOdds";
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
  options: {
    threshold: number;
    level: number;
    replicates?: number;
    seed?: number;
    /** The maximum likelihood estimates of this design and y (intercept first) when already fitted; else fitted here. */
    fitted?: ArrayLike<number>;
  },
): Map<string, Map<string, ConfoundingJudgement>> {
  // Large studies: fewer replicates (each one passes over every taxon).
  const largeStudy = design.rows > EARLY_STOP_TAXA;
  const planned = options.replicates ?? (largeStudy ? 20 : CLADE_CONFOUNDING_REPLICATES);
  let replicates = planned;
  const seed = options.seed ?? CLADE_CONFOUNDING_SEED;
  const n = design.rows;
  const p = design.columns + 1;
  const full = withIntercept(design);
  const out = new Map<string, Map<string, ConfoundingJudgement>>();
  // Dummy-coded traits leave most of the design 0: its row pattern lets every pass skip the zeros.
  const d: Design = withRowPattern({ data: full, n, p });
  const ys = Float64Array.from({ length: n }, (_, i) => y[i]);
  // Built once and reused by every replicate: each taxon's state in every dummy-coded trait (the
  // state contrasts of a trait share one pass over the taxa), and the distinct values of each
  // numeric contrast (taxa sharing a value share their terms).
  const stateTraits = prepareStateTraits(d, contrasts);
  const prepared = contrasts.map((c) => (c.kind === "numeric" ? prepareNumeric(d, c) : null));
  const work = new Workspace(p);
  const eta = new Float64Array(n);
  const weights = new Float64Array(n).fill(1);
  let fitted: Float64Array;
  if (options.fitted) fitted = Float64Array.from(options.fitted);
  else {
    try {
      const fit = fitMaximumLikelihood(d, ys, 25, 1e-8);
      if (!fit.converged) return out;
      fitted = Float64Array.from(fit.beta);
    } catch {
      return out;
    }
  }
  const crudeLogs = new Float64Array(contrasts.length);
  const standardisedLogs = new Float64Array(contrasts.length);
  const risks = new Float64Array(n);
  /** ln(crude) - ln(standardised) of every contrast for taxa weighted by `weights` (bootstrap counts), the model at beta. */
  const differences = (beta: Float64Array): number[] => {
    linearPredictors(d, beta, eta);
    if (stateTraits.length > 0) for (let i = 0; i < n; i++) risks[i] = weights[i] === 0 ? 0 : expit(eta[i]);
    for (const trait of stateTraits) stateTraitPass(trait, d, ys, eta, risks, beta, weights, crudeLogs, standardisedLogs);
    prepared.forEach((c, k) => {
      if (!c) return;
      crudeLogs[k] = crudeLog(c, d, ys, weights);
      standardisedLogs[k] = standardisedLog(c, d, eta, beta, weights);
    });
    return contrasts.map((_, k) => crudeLogs[k] - standardisedLogs[k]);
  };
  const observed = differences(fitted);
  const crudeObserved = Array.from(crudeLogs);
  const random = createUniformSource(seed);
  const draws: number[][] = contrasts.map(() => []);
  const step = new Float64Array(p);
  const changes = observed.map((d) => Math.abs(Math.exp(-d) - 1));
  for (let b = 0; b < planned; b++) {
    // Large studies stop at a look once every contrast's answer is clear (see answerIsClear).
    if (largeStudy && options.replicates === undefined && b > 0 && b % EARLY_STOP_BATCH === 0 && draws.every((sample, k) => !Number.isFinite(observed[k]) || answerIsClear(sample, observed[k], changes[k], options))) {
      replicates = b;
      break;
    }
    // A replicate: n taxa drawn with replacement, held as counts instead of copied rows.
    weights.fill(0);
    for (let i = 0; i < n; i++) weights[Math.floor(random() * n)]++;
    // The model re-estimated by one Newton step from the full-sample fit (a one-step bootstrap,
    // first-order equivalent to refitting and far cheaper on large studies).
    informationPass(d, ys, fitted, work, weights);
    if (choleskyDecompose(work.information, p, work.lower) >= 0) continue;
    choleskySolve(work.lower, p, work.score, step);
    const beta = Float64Array.from(fitted, (v, j) => v + step[j]);
    differences(beta).forEach((v, k) => {
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
        `(${replicates} replicates${replicates < planned ? ` of up to ${planned}, stopped once every answer was clear` : ""}, seed ${seed}), two-sided p below ${String(Number((1 - options.level).toFixed(4)))}${se === null ? " (too many replicates could not be fitted, so no flag)" : ""}; ` +
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

/** A numeric contrast with what every replicate reuses: each taxon's index among the distinct values. */
type PreparedContrast = { kind: "numeric"; column: number; group: Int32Array; values: Float64Array; base: Float64Array };

function prepareNumeric(d: Design, c: ModelContrast): PreparedContrast {
  const { n, p, data } = d;
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = data[i * p + c.column + 1];
  const values = Float64Array.from(new Set(x)).sort();
  const index = new Map<number, number>();
  values.forEach((v, g) => index.set(v, g));
  const group = Int32Array.from(x, (v) => index.get(v)!);
  // base: scratch for the other terms' linear predictor of every taxon (see riskAverager).
  return { kind: "numeric", column: c.column, group, values, base: new Float64Array(n) };
}

/**
 * The state contrasts of one dummy-coded trait: its design columns (with the intercept counted),
 * the contrast judged for each column (-1 for none), and each taxon's state as the index of its
 * column (-1: the reference, every dummy 0).
 */
interface StateTrait {
  columns: number[];
  contrastOf: number[];
  state: Int32Array;
}

function prepareStateTraits(d: Design, contrasts: ModelContrast[]): StateTrait[] {
  const { n, p, data } = d;
  const byTrait = new Map<string, StateTrait>();
  contrasts.forEach((c, k) => {
    if (c.kind !== "state") return;
    const columns = [c.column, ...c.traitColumns].sort((a, b) => a - b).map((j) => j + 1);
    const key = `${c.key}\u0000${columns.join(",")}`;
    let trait = byTrait.get(key);
    if (!trait) {
      const state = new Int32Array(n).fill(-1);
      for (let i = 0; i < n; i++) {
        for (let m = 0; m < columns.length; m++) {
          if (data[i * p + columns[m]] !== 0) {
            state[i] = m;
            break;
          }
        }
      }
      trait = { columns, contrastOf: columns.map(() => -1), state };
      byTrait.set(key, trait);
    }
    trait.contrastOf[trait.columns.indexOf(c.column + 1)] = k;
  });
  return [...byTrait.values()];
}

/**
 * One pass over the taxa for every state contrast of a trait: the crude log odds ratio of each
 * state against the reference (Haldane's 0.5 when a cell is empty) and the standardised one
 * (g-computation: each taxon's risk with the trait set to the state and to the reference, averaged
 * over the taxa of the two). A taxon of the state has its own risk (risks[i]) and the risk without
 * the state's term; a reference taxon has its own risk and the risk with each state's term added.
 */
function stateTraitPass(
  trait: StateTrait,
  d: Design,
  y: Float64Array,
  eta: Float64Array,
  risks: Float64Array,
  beta: Float64Array,
  weights: Float64Array,
  crudeLogs: Float64Array,
  standardisedLogs: Float64Array,
): void {
  const { n, p, data } = d;
  const { columns, contrastOf, state } = trait;
  const m = columns.length;
  const victims1 = new Float64Array(m);
  const survivors1 = new Float64Array(m);
  const risk1 = new Float64Array(m);
  const risk0 = new Float64Array(m);
  const count = new Float64Array(m);
  let victims0 = 0;
  let survivors0 = 0;
  for (let i = 0; i < n; i++) {
    const w = weights[i];
    if (w === 0) continue;
    const s = state[i];
    if (s >= 0) {
      if (contrastOf[s] < 0) continue;
      if (y[i] === 1) victims1[s] += w;
      else survivors1[s] += w;
      const j = columns[s];
      risk1[s] += w * risks[i];
      risk0[s] += w * expit(eta[i] - data[i * p + j] * beta[j]);
      count[s] += w;
      continue;
    }
    if (y[i] === 1) victims0 += w;
    else survivors0 += w;
    for (let t = 0; t < m; t++) {
      if (contrastOf[t] < 0) continue;
      risk1[t] += w * expit(eta[i] + beta[columns[t]]);
      risk0[t] += w * risks[i];
      count[t] += w;
    }
  }
  for (let t = 0; t < m; t++) {
    const k = contrastOf[t];
    if (k < 0) continue;
    crudeLogs[k] = haldaneLogOdds(victims1[t], survivors1[t], victims0, survivors0);
    const r1 = risk1[t] / count[t];
    const r0 = risk0[t] / count[t];
    standardisedLogs[k] = r1 > 0 && r1 < 1 && r0 > 0 && r0 < 1 ? Math.log(r1 / (1 - r1)) - Math.log(r0 / (1 - r0)) : NaN;
  }
}

function crudeLog(c: PreparedContrast, d: Design, y: Float64Array, weights: Float64Array): number {
  // Taxa sharing a value enter the logistic fit as one weighted row with their share of victims (the same likelihood).
  const groupWeight = new Float64Array(c.values.length);
  const groupEvents = new Float64Array(c.values.length);
  for (let i = 0; i < d.n; i++) {
    groupWeight[c.group[i]] += weights[i];
    groupEvents[c.group[i]] += weights[i] * y[i];
  }
  return fractionalSlope(c.values, groupWeight, Float64Array.from(groupEvents, (e, g) => (groupWeight[g] > 0 ? e / groupWeight[g] : 0)));
}

function standardisedLog(c: PreparedContrast, d: Design, eta: Float64Array, beta: Float64Array, weights: Float64Array): number {
  const { n, p, data } = d;
  const j = c.column + 1;
  // Numbers: the averaged risk curve on a grid of the trait's quantiles, read at every value.
  const groups = c.values.length;
  const groupWeight = new Float64Array(groups);
  let total = 0;
  for (let i = 0; i < n; i++) {
    groupWeight[c.group[i]] += weights[i];
    total += weights[i];
  }
  const grid = new Float64Array(GRID);
  for (let g = 0, k = 0, below = 0; g < GRID; g++) {
    // The value at (weighted) rank round(g / (GRID - 1) * (total - 1)), as the sorted sample would give.
    const rank = Math.round((g / (GRID - 1)) * (total - 1));
    while (k < groups - 1 && below + groupWeight[k] <= rank) below += groupWeight[k++];
    grid[g] = c.values[k];
  }
  const risk = riskAverager(eta, data, p, j, beta[j], weights, n, c.base);
  const curve = Array.from(grid, (value) => risk(value));
  const targets = Float64Array.from(c.values, (v) => readCurve(grid, curve, v));
  return fractionalSlope(c.values, groupWeight, targets);
}

/** Bins of the other terms' linear predictor above which the risk curve is averaged over bins instead of taxa. */
const RISK_BINS = 2048;

/**
 * Mean over the weighted taxa of expit(base_i + slope * value), base_i the linear predictor without
 * the trait's own term. Over many taxa the bases are first pooled into RISK_BINS bins, each at its
 * weighted mean (the error is of second order in the bin width, below 1e-6 in risk).
 */
function riskAverager(eta: Float64Array, data: Float64Array, p: number, j: number, slope: number, weights: Float64Array, n: number, base: Float64Array): (value: number) => number {
  let low = Infinity;
  let high = -Infinity;
  let total = 0;
  for (let i = 0; i < n; i++) {
    base[i] = eta[i] - data[i * p + j] * slope;
    if (weights[i] === 0) continue;
    total += weights[i];
    if (base[i] < low) low = base[i];
    if (base[i] > high) high = base[i];
  }
  if (n <= 4 * RISK_BINS || !(high > low)) {
    return (value) => {
      let sum = 0;
      for (let i = 0; i < n; i++) if (weights[i] !== 0) sum += weights[i] * expit(base[i] + slope * value);
      return sum / total;
    };
  }
  const binWeight = new Float64Array(RISK_BINS);
  const binSum = new Float64Array(RISK_BINS);
  const scale = (RISK_BINS - 1e-9) / (high - low);
  for (let i = 0; i < n; i++) {
    const w = weights[i];
    if (w === 0) continue;
    const at = Math.floor((base[i] - low) * scale);
    binWeight[at] += w;
    binSum[at] += w * base[i];
  }
  const centres: number[] = [];
  const masses: number[] = [];
  for (let b = 0; b < RISK_BINS; b++) {
    if (binWeight[b] === 0) continue;
    centres.push(binSum[b] / binWeight[b]);
    masses.push(binWeight[b]);
  }
  return (value) => {
    let sum = 0;
    for (let b = 0; b < centres.length; b++) sum += masses[b] * expit(centres[b] + slope * value);
    return sum / total;
  };
}

function readCurve(grid: Float64Array, curve: number[], value: number): number {
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
