// The shapes of a modern comparison: a list's trait columns paired with the study's codebook (the
// crosswalk), the species as the model reads them, and what holding the past crisis's selectivity
// against the list's threat categories gives.
import type { TraitKind } from "../codebook";
import type { IucnCategory } from "../iucn";
import type { ComparisonResult } from "../schemas/comparisons";
import type { Crosswalk, CrosswalkCoverage, ListColumn } from "../schemas/modernLists";

// The shapes a comparison stores come from their zod schemas (shared/schemas/modernLists.ts and
// comparisons.ts), the one description of what is saved and served; the names below pick out their
// parts for the code that builds them. The inputs (the codebook's traits, the species as read,
// the options) are described here.
export type { ComparisonResult, Crosswalk, CrosswalkCoverage, ListColumn };
export type CrosswalkPair = Crosswalk["pairs"][number];
export type PairCoverage = CrosswalkCoverage["pairs"][number];
export type UnusableValue = PairCoverage["unusable"][number];
export type ComparisonCounts = ComparisonResult["counts"];
export type UnscoredReason = ComparisonResult["unscoredReasons"][number];
export type RocSummary = NonNullable<ComparisonResult["roc"]>;
export type SpearmanSummary = NonNullable<ComparisonResult["spearman"]>;
export type TraitComparison = ComparisonResult["traits"][number];
export type OddsRatioToday = NonNullable<TraitComparison["contrasts"][number]["today"]>;
export type ScoredSpecies = ComparisonResult["species"][number];

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

