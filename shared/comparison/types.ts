// The shapes of a modern comparison: a list's trait columns paired with the study's codebook (the
// crosswalk), the species as the model reads them, and what holding the past crisis's selectivity
// against the list's threat categories gives.
import type { TraitKind } from "../codebook";
import type { IucnCategory, ThreatGroup } from "../iucn";

/** One pairing of a list column with a study trait. */
export interface CrosswalkPair {
  traitId: string;
  /** The list column (its header) that holds this trait. */
  column: string;
  /** Traits with states: a list value (as written, trimmed) -> the state code it means, or null for "matches no state". */
  states: Record<string, string | null>;
  /** Numeric traits: list values are multiplied by this to reach the trait's unit (e.g. 10 for cm to mm). */
  multiplier: number;
}

export interface Crosswalk {
  pairs: CrosswalkPair[];
}

/** What the crosswalk needs to know of a study trait. */
export interface CrosswalkTrait {
  id: string;
  key: string;
  label: string;
  kind: TraitKind;
  states: Array<{ code: string; label: string }>;
  unit: string | null;
  retired?: boolean;
}

/** A list column with its distinct values and how many species hold each. */
export interface ListColumn {
  name: string;
  /** Distinct values other than missing ones (empty, NA), most frequent first. */
  values: Array<{ value: string; count: number }>;
  /** Species with no value in this column (empty or NA). */
  missing: number;
}

/** A list value a crosswalk pair cannot use: no state for it, or not a number. */
export interface UnusableValue {
  value: string;
  /** Species holding the value. */
  count: number;
  /** Why it cannot be used, in words. */
  message: string;
}

export interface PairCoverage {
  traitId: string;
  traitKey: string;
  traitLabel: string;
  kind: TraitKind;
  column: string;
  /** Species whose value is read into the trait. */
  usable: number;
  /** Species with no value in the column. */
  missing: number;
  /** Values with no state in the crosswalk (traits with states) or that are not numbers (numeric traits): listed, never dropped silently. */
  unusable: UnusableValue[];
  /** Species holding an unusable value. */
  unusableSpecies: number;
}

export interface CrosswalkCoverage {
  pairs: PairCoverage[];
  /** List columns no trait is paired with. */
  unpairedColumns: string[];
  /** Study traits (not retired) no list column is paired with. */
  unpairedTraits: Array<{ traitId: string; key: string; label: string }>;
}

/** A species of the list as the comparison reads it. */
export interface ComparisonSpecies {
  name: string;
  higherTaxon: string;
  category: IucnCategory;
  /** Trait values by trait key, through the crosswalk: a state code, a number in the trait's unit, or null. */
  values: Record<string, string | number | null>;
  /** Why a trait has no value although the list has one (an unmapped state, not a number): by trait key. */
  problems: Record<string, string>;
}

export interface ComparisonOptions {
  /** Confidence level of the intervals. */
  level: number;
  /** Species listed LC or DD with a predicted probability at least this high are "worth a look". */
  worthALookMin: number;
}

export interface ScoredSpecies {
  name: string;
  higherTaxon: string;
  category: IucnCategory;
  group: ThreatGroup;
  /** Predicted probability of extinction under the past crisis's selectivity; null when it cannot be scored. */
  probability: number | null;
  ci: [number, number] | null;
  /** Why no score, in words; null when scored. */
  reason: string | null;
}

export interface UnscoredReason {
  /** The reason without a species' particulars, e.g. "No value of Life habit". */
  reason: string;
  count: number;
  /** Up to three species names. */
  examples: string[];
}

export interface RocSummary {
  auc: number;
  se: number;
  ci: [number, number];
  /** How se and the interval were obtained (absent in older results: DeLong, auc +- z se). */
  seMethod?: "delong" | "score-interval";
  ciMethod?: string;
  /**
   * Whether a verdict sentence may be read from the area: the interval's lower bound above 0.5 (or
   * upper below it) and at least ROC_MIN_PER_CLASS species in each group. Absent in older results.
   */
  verdict?: "better-than-chance" | "worse-than-chance" | "no-verdict";
  /** Fewer than ROC_MIN_PER_CLASS scored species in a group: the screen shows a small-sample caution. */
  smallSample?: boolean;
  level: number;
  /** Pairs (threatened, not threatened) with the threatened species scored higher, ties counting one half. */
  mannWhitneyU: number;
  /** Threatened (CR, EN, VU) and not threatened (NT, LC) species with a score. */
  cases: number;
  controls: number;
  /** The empirical ROC curve, from (0, 0) to (1, 1); thinned to at most ROC_MAX_POINTS points. */
  points: Array<{ falsePositiveRate: number; truePositiveRate: number; threshold: number | null }>;
}

export interface SpearmanSummary {
  rho: number;
  /** t statistic of the approximation; null when not finite (|rho| = 1). */
  statistic: number | null;
  df: number;
  pValue: number;
  /** Exact permutation p-value for small samples, else the t approximation (older results: absent, t approximation). */
  method?: "exact-permutation" | "t-approximation";
  /** Scored species on the ordinal scale LC = 0 ... CR = 4. */
  n: number;
}

export interface OddsRatioToday {
  estimate: number;
  ci: [number, number];
  method: string;
  /** State traits: [[threatened, not] with the state, [threatened, not] with the reference]; null for numeric traits. */
  table: [[number, number], [number, number]] | null;
  /** Species in the comparison groups with a usable value of the trait. */
  n: number;
}

export interface TraitComparison {
  key: string;
  label: string;
  kind: "states" | "numeric";
  contrasts: Array<{
    /** "Infaunal vs Epifaunal", or "per 1 log10 unit" / "per SD" for numeric traits. */
    contrast: string;
    state: string | null;
    reference: string | null;
    /** Odds of being threatened today (CR, EN, VU against NT, LC). */
    today: OddsRatioToday | null;
    /** Why there is no odds ratio today. */
    todayNote: string | null;
    /** The same contrast's odds of extinction in the past crisis: crude, and adjusted for the model's other traits. */
    pastCrude: { estimate: number; ci: [number, number]; method: string } | null;
    pastModelAdjusted: { estimate: number; ci: [number, number] } | null;
  }>;
}

export interface ComparisonCounts {
  species: number;
  byCategory: Record<IucnCategory, number>;
  /** Listed CR, EN or VU / NT or LC. */
  threatened: number;
  notThreatened: number;
  /** Kept out of the threatened-against-not comparison, by category (EX, EW, DD, NE). */
  excluded: { EX: number; EW: number; DD: number; NE: number };
  excludedTotal: number;
  /** Species with a predicted probability, by group. */
  scored: { threatened: number; notThreatened: number; excluded: number };
  /** Species the model cannot score (a trait missing or unusable), by group. */
  unscored: { threatened: number; notThreatened: number; excluded: number };
}

export interface ComparisonResult {
  counts: ComparisonCounts;
  unscoredReasons: UnscoredReason[];
  roc: RocSummary | null;
  rocNote: string | null;
  spearman: SpearmanSummary | null;
  spearmanNote: string | null;
  traits: TraitComparison[];
  /** Listed LC or DD and predicted at least worthALookMin: highest first. */
  worthALook: Array<ScoredSpecies & { rank: number }>;
  /** Every species of the list, in the order given (the service gives them by name). */
  species: ScoredSpecies[];
  /** Plain-language notes on how to read the numbers. */
  notes: string[];
}
