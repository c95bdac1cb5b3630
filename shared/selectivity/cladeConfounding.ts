import { conditionalLogLik, prepareConditionalStrata } from "../stats/conditionalLogistic";
import { normalTwoSidedP } from "../stats/distributions";
import { createUniformSource } from "../stats/random";
import { fitStratifiedSlope } from "./stratifiedSlope";
import { haldaneLogOdds } from "./haldaneLogOdds";
import { answerIsClear, EARLY_STOP_BATCH, EARLY_STOP_TAXA } from "./bootstrapStopping";
import { expit, fractionalSlope } from "./fractionalSlope";
import type { ConfoundingJudgement } from "./types";

/** The taxa of one clade in one contrast: x is 0/1 (state against reference) or the scaled number. */
export interface CladeGroup {
  x: Float64Array;
  y: Uint8Array;
}

/** How the confounding judgement of one contrast came out (see judgeCladeConfounding). */
export type CladeConfoundingJudgement = ConfoundingJudgement;

export interface CladeConfoundingOptions {
  kind: "states" | "numeric";
  /** Within-clade log odds ratio already estimated on these groups (Mantel-Haenszel or conditional). */
  conditionalLogOdds: number;
  threshold: number;
  level: number;
  minInformativeClades: number;
  replicates?: number;
  seed?: number;
}

export const CLADE_CONFOUNDING_REPLICATES = 200;
export const DEFAULT_MIN_INFORMATIVE_CLADES = 3;
export const CLADE_CONFOUNDING_SEED = 18;
export const CONFOUNDING_CITATION =
  "the crude odds ratio is compared with the clade-standardised marginal odds ratio rather than with the within-clade one, because odds ratios are not collapsible (Greenland, Robins & Pearl 1999, Statistical Science 14:29)";

/**
 * Judges whether clade confounds a contrast, comparing like with like. The within-clade odds ratio
 * (Mantel-Haenszel for states, conditional logistic for numbers) is a conditional measure and sits
 * further from 1 than the crude marginal one whenever risk differs between clades, even without
 * confounding: odds ratios are not collapsible (Greenland, Robins & Pearl 1999; Miettinen & Cook
 * 1981). So the crude odds ratio is compared with the clade-standardised marginal odds ratio. For
 * numbers, each clade's baseline is set so that a logistic model with the common within-clade odds ratio
 * reproduces its number of victims, and the risks are averaged over the clade make-up of all taxa
 * at each value of the trait (standardisation, g-computation); the marginal slope is the logistic
 * fit to that averaged risk curve. Without confounding both estimate the same
 * marginal odds ratio. A contrast is flagged when the relative change exceeds the analyst's
 * threshold (the 10% change-in-estimate rule; common practice, no source) and also exceeds its own
 * uncertainty: ln(crude / standardised) over its standard error from a seeded bootstrap, two-sided
 * normal p below 1 - level. The bootstrap is stratified by clade (taxa drawn with replacement within
 * each clade; Davison & Hinkley 1997, section 3.7): confounding is a property of the clades at hand,
 * so their sizes stay fixed while trait values and outcomes vary. Every estimate is recomputed in
 * each replicate (for numbers the within-clade slope by one Newton step from the full-sample one).
 * For states the standardisation is direct: each clade's observed risk in each state, weighted by
 * the clade's share of taxa, over the clades holding both states (crude odds ratio over the same
 * clades). An estimate resting on fewer informative clades than the minimum is thin and never flags.
 *
 * @example
 * judgeCladeConfounding(groups of 30 clades, { kind: "states", conditionalLogOdds: 0.02, threshold: 0.1, level: 0.95, minInformativeClades: 3 })
 * // => { crude: 3.1, standardised: 1.02, change: 0.67, seLogDifference: 0.21, z: 5.3, flagged: true, ... }
 */
export function judgeCladeConfounding(allGroups: CladeGroup[], options: CladeConfoundingOptions): CladeConfoundingJudgement | null {
  return options.kind === "states" ? judgeStateConfounding(allGroups.map(cellCounts), options) : judge(allGroups, [], options);
}

/** A clade's counts in a state contrast: [state victims, state survivors, reference victims, reference survivors]. */
export type CladeCells = [number, number, number, number];

/**
 * judgeCladeConfounding for a state against the reference, from each clade's four counts (all the
 * states' judgement uses): the same judgement without a row per taxon.
 *
 * @example
 * judgeStateConfounding([[3, 5, 1, 9], [4, 4, 2, 8], ...], { kind: "states", conditionalLogOdds: 0.9, threshold: 0.1, level: 0.95, minInformativeClades: 3 })
 * // => { crude: 3.1, standardised: 2.4, change: 0.23, ... }
 */
export function judgeStateConfounding(allCells: CladeCells[], options: CladeConfoundingOptions): CladeConfoundingJudgement | null {
  // Direct standardisation needs both states in a clade, so the comparison (crude and
  // standardised alike) runs over the clades holding both.
  return judge([], allCells.filter((c) => c[0] + c[1] > 0 && c[2] + c[3] > 0), { ...options, kind: "states" });
}

function judge(groups: CladeGroup[], cells: CladeCells[], options: CladeConfoundingOptions): CladeConfoundingJudgement | null {
  const states = options.kind === "states";
  if ((states ? cells.length : groups.length) === 0) return null;
  const taxaCount = states ? cells.reduce((a, c) => a + c[0] + c[1] + c[2] + c[3], 0) : groups.reduce((a, g) => a + g.x.length, 0);
  // Large studies: fewer replicates (each one touches every taxon); their differences are either
  // far beyond or well within the noise, so 50 replicates judge them as well.
  const largeStudy = taxaCount > EARLY_STOP_TAXA;
  const planned = options.replicates ?? (largeStudy ? 50 : CLADE_CONFOUNDING_REPLICATES);
  let replicates = planned;
  const seed = options.seed ?? CLADE_CONFOUNDING_SEED;
  const withinClade = groups.map(conditionalShape);
  const informative = states ? cells.filter((c) => c[0] + c[2] > 0 && c[1] + c[3] > 0).length : withinClade.filter((w) => w !== null).length;
  const ones = new Float64Array(groups.length).fill(1);
  // Numbers: the taxa pooled by distinct value once; every replicate refills the counts (see below).
  const pooled = states ? null : poolByValue(groups, ones);
  const crude = pooled ? crudeSlope(pooled.counts) : statesCrude(cells);
  const standardised = pooled ? standardisedSlope(groups, ones, options.conditionalLogOdds, pooled.counts) : statesStandardised(cells);
  if (!Number.isFinite(crude) || !Number.isFinite(standardised)) return null;
  const difference = crude - standardised;
  const change = Math.abs(Math.exp(standardised - crude) - 1);
  const thin = informative < options.minInformativeClades;

  const large = options.kind === "numeric" && withinClade.reduce((a, w) => a + (w ? w.taxa * w.cases : 0), 0) > 2_000_000;
  // Stratified bootstrap: taxa drawn with replacement within each clade (clade sizes and make-up
  // fixed, as the judgement is about these clades), every estimate recomputed; numbers take one
  // Newton step from the full-sample slope for the replicate's within-clade slope.
  const random = createUniformSource(seed);
  const draws: number[] = [];
  // Numbers: every replicate's taxa reuse the same arrays, and are pooled by distinct value for the
  // two marginal slopes (taxa sharing a value share their terms: the same likelihood, far fewer terms).
  const sample = options.kind === "numeric" ? groups.map((g) => ({ x: new Float64Array(g.x.length), y: new Uint8Array(g.x.length), value: new Int32Array(g.x.length) })) : [];
  const rows = large ? pooledRows(pooled!.counts.values.length, taxaCount, groups.length) : null;
  for (let b = 0; b < planned; b++) {
    // Large studies stop at a look once the flag's answer is clear (see answerIsClear).
    if (largeStudy && options.replicates === undefined && b > 0 && b % EARLY_STOP_BATCH === 0 && answerIsClear(draws, difference, change, options)) {
      replicates = b;
      break;
    }
    if (options.kind === "states") {
      // States: resample each clade's four cells (state/reference x victim/survivor) by count.
      const d = statesDifference(cells.map((c) => resampleCells(c, random)));
      if (Number.isFinite(d)) draws.push(d);
      continue;
    }
    const counts = pooled!.counts;
    counts.taxa.fill(0);
    counts.victims.fill(0);
    for (let k = 0; k < groups.length; k++) {
      const g = groups[k];
      const valueOf = pooled!.valueOf[k];
      const { x, y } = sample[k];
      const n = g.x.length;
      const value = sample[k].value;
      for (let i = 0; i < n; i++) {
        const j = Math.floor(random() * n);
        // Large clades work from the values' indices (pooled rows); the values themselves only for the conditional step.
        if (large) value[i] = valueOf[j];
        else x[i] = g.x[j];
        y[i] = g.y[j];
        counts.taxa[valueOf[j]]++;
        counts.victims[valueOf[j]] += g.y[j];
      }
    }
    const c = crudeSlope(counts);
    let conditional: number;
    if (large) {
      // Large clades: the within-clade slope of the replicate by the stratified fit (see cladeAdjustedSlope).
      conditional = stratifiedSlopeOf(sample, counts.values, rows!);
    } else {
      const strata = sample.map((g) => prepareConditionalStrata(g.x, g.y, new Int32Array(g.x.length), 1)[0]).filter((p) => p !== undefined);
      const at = conditionalLogLik(strata, options.conditionalLogOdds);
      conditional = strata.length > 0 && at.information > 0 ? options.conditionalLogOdds + at.score / at.information : NaN;
    }
    if (!Number.isFinite(c) || !Number.isFinite(conditional)) continue;
    // Large clades: the clade intercepts from the same taxa pooled by value as the stratified fit's.
    const s = standardisedSlope(sample, ones, conditional, counts, large ? rows! : undefined);
    if (Number.isFinite(s)) draws.push(c - s);
  }
  let se: number | null = null;
  if (draws.length >= 0.9 * replicates && draws.length > 1) {
    const mean = draws.reduce((a, v) => a + v, 0) / draws.length;
    se = Math.sqrt(draws.reduce((a, v) => a + (v - mean) * (v - mean), 0) / (draws.length - 1));
  }
  const z = se !== null && se > 0 ? difference / se : null;
  const pValue = z !== null ? normalTwoSidedP(z) : null;
  const flagged = !thin && change > options.threshold && pValue !== null && pValue < 1 - options.level;
  const percent = String(Number((options.threshold * 100).toFixed(1)));
  const method =
    `Flag when the clade-standardised marginal odds ratio differs from the crude one (${options.kind === "states" ? "both over the clades holding both states, standardised directly" : "the standardised one from the conditional slope"}) by more than ${percent}% (change-in-estimate threshold; common practice, no source) ` +
    `and by more than its own uncertainty: ln(crude / standardised) over its standard error from a bootstrap stratified by clade (${replicates} replicates${replicates < planned ? ` of up to ${planned}, stopped once the answer was clear` : ""}, seed ${seed}), two-sided p below ${formatLevel(1 - options.level)}` +
    `${se === null ? " (too many replicates could not be estimated, so no flag)" : ""}; ` +
    `${CONFOUNDING_CITATION}. Estimates from fewer than ${options.minInformativeClades} informative clades are thin and never flag.`;
  return {
    crude: Math.exp(crude),
    standardised: Math.exp(standardised),
    change,
    seLogDifference: se,
    z,
    pValue,
    informativeClades: informative,
    thin,
    flagged,
    replicates,
    seed,
    method,
  };
}

/**
 * What the conditional likelihood would make of one clade (as prepareConditionalStrata, without
 * building its stratum): null when it carries no information within the clade (one outcome or one
 * value), else its taxa and cases (the smaller outcome group).
 */
export function conditionalShape(g: CladeGroup): { taxa: number; cases: number } | null {
  let events = 0;
  let low = Infinity;
  let high = -Infinity;
  let taxa = 0;
  for (let i = 0; i < g.x.length; i++) {
    if (!Number.isFinite(g.x[i])) continue;
    taxa++;
    events += g.y[i];
    low = Math.min(low, g.x[i]);
    high = Math.max(high, g.x[i]);
  }
  if (events === 0 || events === taxa || !(high > low)) return null;
  return { taxa, cases: events > taxa / 2 ? taxa - events : events };
}

/** A clade's counts: [state victims, state survivors, reference victims, reference survivors]. */
function cellCounts(g: CladeGroup): CladeCells {
  const c: CladeCells = [0, 0, 0, 0];
  for (let i = 0; i < g.x.length; i++) c[(g.x[i] === 1 ? 0 : 2) + (g.y[i] === 1 ? 0 : 1)]++;
  return c;
}

/** n draws with replacement from a clade's n taxa, as cell counts. */
function resampleCells(c: [number, number, number, number], random: () => number): [number, number, number, number] {
  const n = c[0] + c[1] + c[2] + c[3];
  const edge1 = c[0];
  const edge2 = edge1 + c[1];
  const edge3 = edge2 + c[2];
  const out: [number, number, number, number] = [0, 0, 0, 0];
  for (let i = 0; i < n; i++) {
    const j = random() * n;
    out[j < edge1 ? 0 : j < edge2 ? 1 : j < edge3 ? 2 : 3]++;
  }
  return out;
}

/** ln(crude) - ln(directly standardised) from clade cell counts. */
function statesDifference(cells: CladeCells[]): number {
  return statesCrude(cells) - statesStandardised(cells);
}

/** The crude log odds ratio over the clades' cells (Haldane's 0.5 in every cell when one is empty), as crudeLogOdds for states. */
function statesCrude(cells: CladeCells[]): number {
  let a = 0;
  let b = 0;
  let c = 0;
  let d = 0;
  for (const [v1, s1, v0, s0] of cells) {
    a += v1;
    b += s1;
    c += v0;
    d += s0;
  }
  return haldaneLogOdds(a, b, c, d);
}

/** The directly standardised log odds ratio over the clades' cells (each clade weighted by its taxa), as standardisedLogOdds for states. */
function statesStandardised(cells: CladeCells[]): number {
  let exposed = 0;
  let unexposed = 0;
  let total = 0;
  for (const [v1, s1, v0, s0] of cells) {
    const n1 = v1 + s1;
    const n0 = v0 + s0;
    if (n1 === 0 || n0 === 0) continue;
    const w = n1 + n0;
    exposed += (w * v1) / n1;
    unexposed += (w * v0) / n0;
    total += w;
  }
  const r1 = exposed / total;
  const r0 = unexposed / total;
  return r1 > 0 && r1 < 1 && r0 > 0 && r0 < 1 ? Math.log(r1 / (1 - r1)) - Math.log(r0 / (1 - r0)) : NaN;
}

function formatLevel(alpha: number): string {
  return String(Number(alpha.toFixed(4)));
}

/** Scratch arrays for the taxa of a replicate pooled by clade and value (see stratifiedSlopeOf). */
interface PooledRows {
  x: Float64Array;
  trials: Float64Array;
  victims: Float64Array;
  stratum: Int32Array;
  /** Row of each value in the clade being pooled, -1 when none yet. */
  slot: Int32Array;
  /** Rows of clade k: segment[2k] to segment[2k + 1] (exclusive); -1 for a clade without both outcomes. */
  segment: Int32Array;
}

function pooledRows(values: number, taxa: number, clades: number): PooledRows {
  return {
    x: new Float64Array(taxa),
    trials: new Float64Array(taxa),
    victims: new Float64Array(taxa),
    stratum: new Int32Array(taxa),
    slot: new Int32Array(values).fill(-1),
    segment: new Int32Array(2 * clades),
  };
}

/**
 * The slope of a logistic regression with one intercept per clade holding both outcomes (NaN when
 * it runs off), with the taxa of each clade pooled by value (one row per clade and value, with its
 * taxa and victims: the same likelihood over fewer rows).
 */
function stratifiedSlopeOf(groups: Array<CladeGroup & { value: Int32Array }>, values: Float64Array, rows: PooledRows): number {
  let used = 0;
  let strata = 0;
  rows.segment.fill(-1);
  for (let k = 0; k < groups.length; k++) {
    const g = groups[k];
    let victims = 0;
    for (const y of g.y) victims += y;
    if (!(victims > 0 && victims < g.y.length)) continue;
    rows.segment[2 * k] = used;
    for (let i = 0; i < g.y.length; i++) {
      const v = g.value[i];
      let row = rows.slot[v];
      if (row < 0) {
        row = used++;
        rows.slot[v] = row;
        rows.x[row] = values[v];
        rows.trials[row] = 0;
        rows.victims[row] = 0;
        rows.stratum[row] = strata;
      }
      rows.trials[row]++;
      rows.victims[row] += g.y[i];
    }
    for (let i = 0; i < g.y.length; i++) rows.slot[g.value[i]] = -1;
    rows.segment[2 * k + 1] = used;
    strata++;
  }
  const fit =
    strata > 0
      ? fitStratifiedSlope(rows.x.subarray(0, used), rows.victims.subarray(0, used), rows.stratum.subarray(0, used), strata, { standardError: false, trials: rows.trials.subarray(0, used) })
      : null;
  return fit ? fit.estimate : NaN;
}

/** Crude log odds ratio over the weighted clades: 2x2 (Haldane's 0.5 when a cell is empty) or a univariate logistic slope. */
export function crudeLogOdds(groups: CladeGroup[], weights: ArrayLike<number>, kind: "states" | "numeric"): number {
  if (kind === "states") {
    let a = 0;
    let b = 0;
    let c = 0;
    let d = 0;
    groups.forEach((g, k) => {
      const w = weights[k];
      if (w === 0) return;
      for (let i = 0; i < g.x.length; i++) {
        if (g.x[i] === 1) {
          if (g.y[i] === 1) a += w;
          else b += w;
        } else if (g.y[i] === 1) c += w;
        else d += w;
      }
    });
    return haldaneLogOdds(a, b, c, d);
  }
  return crudeSlope(poolByValue(groups, weights).counts);
}

/** The crude logistic slope from taxa pooled by value: a fractional logistic fit of each value's share of victims, weighted by its taxa. */
function crudeSlope(counts: ValueCounts): number {
  const { xs, ws, at } = occupiedValues(counts);
  const shares = Float64Array.from(at, (v) => counts.victims[v] / counts.taxa[v]);
  return fractionalSlope(xs, ws, shares);
}

/** The pooled values that hold taxa (xs, ascending), their taxa as weights (ws), and where each sits in `counts` (at). */
function occupiedValues(counts: ValueCounts): { xs: Float64Array; ws: Float64Array; at: Int32Array } {
  const { values, taxa } = counts;
  let used = 0;
  for (let v = 0; v < values.length; v++) if (taxa[v] > 0) used++;
  const xs = new Float64Array(used);
  const ws = new Float64Array(used);
  const at = new Int32Array(used);
  for (let v = 0, k = 0; v < values.length; v++) {
    if (!(taxa[v] > 0)) continue;
    xs[k] = values[v];
    ws[k] = taxa[v];
    at[k] = v;
    k++;
  }
  return { xs, ws, at };
}

/** The clade intercept a with sum_i expit(a + beta x_i) = victims (the fitted model reproduces the clade's count); with `taxa`, x holds the clade's values pooled, each standing for taxa[i] taxa. */
export function cladeIntercept(x: Float64Array, victims: number, beta: number, taxa?: ArrayLike<number>): number {
  // taxa: the clade pooled by value, x[i] standing for taxa[i] taxa (the same sums over fewer terms).
  let n = x.length;
  if (taxa) {
    n = 0;
    for (let i = 0; i < x.length; i++) n += taxa[i];
  }
  if (victims <= 0) return -Infinity;
  if (victims >= n) return Infinity;
  let mean = 0;
  for (let i = 0; i < x.length; i++) mean += (taxa ? taxa[i] : 1) * x[i];
  mean /= n;
  let a = Math.log(victims / (n - victims)) - beta * mean;
  let low = -Infinity;
  let high = Infinity;
  for (let iteration = 0; iteration < 100; iteration++) {
    let f = -victims;
    let slope = 0;
    for (let i = 0; i < x.length; i++) {
      const t = taxa ? taxa[i] : 1;
      const p = expit(a + beta * x[i]);
      f += t * p;
      slope += t * p * (1 - p);
    }
    if (Math.abs(f) < 1e-10 * n) break;
    if (f > 0) high = Math.min(high, a);
    else low = Math.max(low, a);
    let next = slope > 0 ? a - f / slope : NaN;
    if (!(next > low && next < high)) next = Number.isFinite(low) && Number.isFinite(high) ? (low + high) / 2 : a - Math.sign(f) * 5;
    if (Math.abs(next - a) < 1e-12) break;
    a = next;
  }
  return a;
}

/** Clade-standardised marginal log odds ratio given the within-clade log odds ratio beta. */
export function standardisedLogOdds(groups: CladeGroup[], weights: ArrayLike<number>, beta: number, kind: "states" | "numeric"): number {
  if (kind === "states") {
    // Direct standardisation: each clade's observed risk in each state, weighted by the clade's
    // share of the taxa (unbiased for the clade risks, so no model noise enters).
    let exposed = 0;
    let unexposed = 0;
    let total = 0;
    groups.forEach((g, k) => {
      if (weights[k] === 0) return;
      let n1 = 0;
      let v1 = 0;
      let v0 = 0;
      for (let i = 0; i < g.x.length; i++) {
        if (g.x[i] === 1) {
          n1++;
          v1 += g.y[i];
        } else v0 += g.y[i];
      }
      const n0 = g.x.length - n1;
      if (n1 === 0 || n0 === 0) return;
      const w = weights[k] * g.x.length;
      exposed += (w * v1) / n1;
      unexposed += (w * v0) / n0;
      total += w;
    });
    const r1 = exposed / total;
    const r0 = unexposed / total;
    return r1 > 0 && r1 < 1 && r0 > 0 && r0 < 1 ? Math.log(r1 / (1 - r1)) - Math.log(r0 / (1 - r0)) : NaN;
  }
  return standardisedSlope(groups, weights, beta, poolByValue(groups, weights).counts);
}

/** standardisedLogOdds for numbers, with the weighted clades' taxa already pooled by value. */
function standardisedSlope(groups: CladeGroup[], weights: ArrayLike<number>, beta: number, counts: ValueCounts, pooled?: PooledRows): number {
  const intercepts = groups.map((g, k) => {
    if (weights[k] === 0) return NaN;
    let victims = 0;
    for (let i = 0; i < g.y.length; i++) victims += g.y[i];
    const from = pooled ? pooled.segment[2 * k] : -1;
    if (from < 0) return cladeIntercept(g.x, victims, beta);
    const to = pooled!.segment[2 * k + 1];
    return cladeIntercept(pooled!.x.subarray(from, to), victims, beta, pooled!.trials.subarray(from, to));
  });
  // Numbers: the averaged risk curve R(x) = sum_c n_c expit(a_c + beta x) / N at every taxon's
  // value, then the logistic slope that best fits it over the same values (each value weighted by
  // its taxa).
  const activeIntercepts: number[] = [];
  const activeMass: number[] = [];
  let total = 0;
  let taxaCount = 0;
  for (let k = 0; k < groups.length; k++) {
    if (weights[k] === 0) continue;
    activeIntercepts.push(intercepts[k]);
    activeMass.push(weights[k] * groups[k].x.length);
    total += weights[k] * groups[k].x.length;
    taxaCount += groups[k].x.length;
  }
  const curve = (value: number): number => {
    const bx = beta * value;
    let sum = 0;
    for (let j = 0; j < activeIntercepts.length; j++) sum += activeMass[j] * expit(activeIntercepts[j] + bx);
    return sum / total;
  };
  const { xs, ws } = occupiedValues(counts);
  const used = xs.length;
  const targets = new Float64Array(used);
  if (taxaCount * activeIntercepts.length <= 200_000) {
    for (let k = 0; k < used; k++) targets[k] = curve(xs[k]);
  } else {
    // Many taxa and clades: the smooth curve on 256 points across the values, read off linearly.
    const low = xs[0];
    const high = xs[used - 1];
    const points = 256;
    const step = (high - low) / (points - 1) || 1;
    const grid = Float64Array.from({ length: points }, (_, g) => curve(low + g * step));
    for (let k = 0; k < used; k++) {
      const position = (xs[k] - low) / step;
      const g = Math.min(points - 2, Math.max(0, Math.floor(position)));
      const t = position - g;
      targets[k] = grid[g] * (1 - t) + grid[g + 1] * t;
    }
  }
  return fractionalSlope(xs, ws, targets);
}

/** The taxa of weighted clades pooled by distinct value: values in increasing order, with the (weighted) taxa and victims at each. */
interface ValueCounts {
  values: Float64Array;
  taxa: Float64Array;
  victims: Float64Array;
}

/**
 * The distinct values of x over the clades (in increasing order), the index of every taxon's value
 * (valueOf[k][i] for taxon i of clade k), and the weighted taxa and victims at each value.
 */
function poolByValue(groups: CladeGroup[], weights: ArrayLike<number>): { counts: ValueCounts; valueOf: Int32Array[] } {
  let n = 0;
  for (const g of groups) n += g.x.length;
  const all = new Float64Array(n);
  let at = 0;
  for (const g of groups) {
    all.set(g.x, at);
    at += g.x.length;
  }
  all.sort();
  let distinct = 0;
  for (let i = 0; i < n; i++) if (i === 0 || all[i] !== all[i - 1]) all[distinct++] = all[i];
  const values = all.slice(0, distinct);
  const taxa = new Float64Array(distinct);
  const victims = new Float64Array(distinct);
  const valueOf = groups.map((g, k) => {
    const of = new Int32Array(g.x.length);
    for (let i = 0; i < g.x.length; i++) {
      // The value's place among the sorted distinct values (binary search).
      const x = g.x[i];
      let low = 0;
      let high = distinct - 1;
      while (low < high) {
        const middle = (low + high) >> 1;
        if (values[middle] < x) low = middle + 1;
        else high = middle;
      }
      const v = low;
      of[i] = v;
      if (weights[k] === 0) continue;
      taxa[v] += weights[k];
      victims[v] += weights[k] * g.y[i];
    }
    return of;
  });
  return { counts: { values, taxa, victims }, valueOf };
}
