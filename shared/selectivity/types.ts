// The shapes of a selectivity analysis: what goes in (plain arrays built by the server from the
// trait table and the outcomes across a boundary) and what comes out (stored in a run).
import type { TraitKind } from "../codebook";

export type MultipleTestingMethod = "bh" | "holm" | "bonferroni";

export interface SelectivityTaxon {
  id: string;
  name: string;
  /** The stratum for the clade-adjusted (Mantel-Haenszel) odds ratios, e.g. the higher taxon. */
  clade: string;
  /** 1 = victim (died in the crisis), 0 = survivor. Taxa not at risk never enter. */
  outcome: 0 | 1;
  /** Values by trait key: a state code, a number, or null when missing. */
  values: Record<string, string | number | null>;
}

export interface SelectivityTraitSpec {
  key: string;
  label: string;
  kind: TraitKind;
  /** For binary, categorical and ordinal traits, in codebook order. */
  states: Array<{ code: string; label: string }>;
  /** Reference state for odds ratios; defaults to the most common state. */
  reference?: string;
  transform: "none" | "log10";
  /** Numeric traits: centre and scale to one standard deviation before fitting. */
  standardise: boolean;
  /** Numeric traits: unit of the raw values, shown in the labels of the quartile bins (e.g. "mm"). */
  unit?: string | null;
}

export interface SelectivityOptions {
  correction: MultipleTestingMethod;
  /** Fit Firth's bias-reduced regression even without separation. */
  forceFirth: boolean;
  level: number;
  /** Relative change of an odds ratio on adjustment that flags possible confounding (0.1 = 10%). */
  confoundingThreshold: number;
  /** Clade-adjusted estimates from fewer informative clades than this are "thin" and never flag (default 3). */
  minInformativeClades?: number;
}

export interface SelectivityInput {
  taxa: SelectivityTaxon[];
  traits: SelectivityTraitSpec[];
  options: SelectivityOptions;
}

export interface Interval {
  estimate: number;
  ci: [number, number];
}

export interface StateRow {
  state: string;
  label: string;
  victims: number;
  survivors: number;
  /** Extinction proportion victims / (victims + survivors) with its Wilson interval. */
  proportion: number | null;
  ci: [number, number] | null;
}

export interface ContrastResult {
  /** "marine vs nonmarine", or "per 1 log10 unit" / "per SD" for numeric traits. */
  contrast: string;
  state: string | null;
  reference: string | null;
  /** Crude odds ratio (2x2 sample OR with Woolf interval; univariate logistic for numbers). */
  crude: Interval & { method: string };
  /**
   * Adjusted for clade: Mantel-Haenszel over clades (states) or conditional logistic regression by
   * clade (numbers). informativeClades counts the clades that carry information; thin is true when
   * they are fewer than the minimum (options.minInformativeClades).
   */
  cladeAdjusted:
    | (Interval & { method: string; informativeClades?: number; thin?: boolean; breslowDay?: { chiSquare: number; df: number; pValue: number } })
    | null;
  /** Adjusted for the other traits in the multiple logistic regression. */
  modelAdjusted: Interval | null;
  /**
   * Relative changes on the odds-ratio scale that the confounding judgement weighs: for clade,
   * |standardised marginal / crude - 1| (see cladeCheck); for the other traits, the same with the
   * marginal odds ratio standardised over the multiple regression (see modelCheck).
   */
  changeOnCladeAdjustment: number | null;
  changeOnModelAdjustment: number | null;
  /** How the clade confounding judgement came out, with the method that decided it; null when not possible. */
  cladeCheck?: ConfoundingJudgement | null;
  /** The same judgement for the adjustment for the other traits; null when not possible. */
  modelCheck?: ConfoundingJudgement | null;
  /** Possible confounding: a change larger than the threshold and than its own uncertainty (see confoundingMethod). */
  flagged: boolean;
  /** Why an adjusted odds ratio is missing, or what limits it: short sentences. */
  notes: string[];
}

/** One confounding judgement: the crude odds ratio against a marginal odds ratio standardised over the adjustment. */
export interface ConfoundingJudgement {
  /** Crude odds ratio over the same taxa as the standardised one. */
  crude: number;
  /** Marginal odds ratio standardised over clades (or over the other traits): comparable with the crude one. */
  standardised: number;
  /** |standardised / crude - 1|. */
  change: number;
  /** Bootstrap standard error of ln(crude / standardised); null when the bootstrap failed. */
  seLogDifference: number | null;
  z: number | null;
  /** Two-sided p-value of z on a t distribution (clades - 1 degrees of freedom); null without a standard error. */
  pValue: number | null;
  /** Clades that carry information on the within-clade odds ratio (null for the adjustment for the other traits). */
  informativeClades: number | null;
  thin: boolean;
  flagged: boolean;
  replicates: number;
  seed: number;
  /** The rule that decided, with its citation. */
  method: string;
}

export interface TraitResult {
  key: string;
  label: string;
  kind: TraitKind;
  used: number;
  droppedMissing: number;
  table: StateRow[];
  /** pValue and adjustedPValue are null when no test was possible (the method says why). */
  test: { method: string; pValue: number | null; adjustedPValue: number | null; statistic?: number; df?: number };
  contrasts: ContrastResult[];
  /** Plain-language note when a contrast is flagged by the confounding check. */
  confoundingNote: string | null;
  /** Reference state of the odds ratios (null for numeric traits, or when no state has taxa). */
  reference: string | null;
  /** Taxa left out for a value that cannot be used (a code outside the codebook, not a number, <= 0 under log10). */
  droppedInvalid: number;
  /** What was left out and why, the reference chosen, how numbers were scaled: short sentences. */
  notes: string[];
}

/** What scoring new taxa with the fitted model needs (the modern comparison uses it). */
export interface ModelEncoding {
  /** One per trait in the model: its reference state and the states it knows, or its numeric scaling. */
  traits: Array<
    | { key: string; label: string; kind: "states"; reference: string; states: string[] }
    | { key: string; label: string; kind: "numeric"; transform: "none" | "log10"; center: number; scale: number }
  >;
  columns: Array<
    | { name: string; trait: string; kind: "state"; state: string }
    | { name: string; trait: string; kind: "numeric"; transform: "none" | "log10"; center: number; scale: number }
  >;
}

export interface ModelResult {
  n: number;
  /** Victims among the n taxa used. */
  victims: number;
  /** Taxa left out because a chosen trait had no usable value (complete cases only). */
  droppedIncomplete: number;
  /** How the model was fitted and tested, in words. */
  method: string;
  coefficients: Array<{
    name: string;
    estimate: number;
    se: number;
    z: number;
    pValue: number;
    ci: [number, number];
    oddsRatio: number;
    /** exp(ci): the interval of the odds ratio. */
    oddsRatioCi: [number, number];
    /** "(Intercept)", "Life habit: infaunal (vs epifaunal)", "Body size (log10, per SD)". */
    label: string;
  }>;
  /** Likelihood ratio test per trait (all its columns at once); name is the trait key. */
  terms: Array<{ name: string; df: number; chiSquare: number; pValue: number; label: string }>;
  deviance: number;
  nullDeviance: number;
  aic: number;
  converged: boolean;
  firth: boolean;
  firthReason: "separation" | "requested" | null;
  separatedPredictors: string[];
  encoding: ModelEncoding;
  /** Covariance of the coefficients (row-major, intercept first), for prediction intervals. */
  covariance: number[][];
  /** Visible notes: Firth used and why, traits left out of the model, convergence. */
  notes: string[];
}

export interface SelectivityResult {
  design: {
    victims: number;
    survivors: number;
    /** Taxa left out of each trait's own test for a missing or unusable value. */
    droppedByTrait: Record<string, number>;
    /** Taxa with every chosen trait present: the multiple regression's sample. */
    completeCases: number;
    /** Taxa without a clade (higher taxon): left out of every clade-adjusted estimate. */
    withoutClade?: number;
  };
  /** How the confounding flag is decided, with citations: said once per result, not per contrast. */
  confoundingMethod?: string;
  traits: TraitResult[];
  model: ModelResult | null;
  /** Why no model could be fitted, when it could not. */
  modelNote: string | null;
}
