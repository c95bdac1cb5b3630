// The vocabulary of a study's codebook, and the suggested codebook a new study starts from.

export const TRAIT_KINDS = ["binary", "categorical", "ordinal", "numeric"] as const;
export type TraitKind = (typeof TRAIT_KINDS)[number];

/** What a trait is about: ecological traits (habitat, feeding, life habit, size, range, environment) or anything else. */
export const TRAIT_ASPECTS = ["ecology", "other"] as const;
export type TraitAspect = (typeof TRAIT_ASPECTS)[number];

export const NUMERIC_TRANSFORMS = ["none", "log10"] as const;
export type NumericTransform = (typeof NUMERIC_TRANSFORMS)[number];

export interface TraitState {
  code: string;
  label: string;
  order: number;
}

export interface SuggestedTrait {
  key: string;
  label: string;
  kind: TraitKind;
  aspect: TraitAspect;
  states: TraitState[];
  unit: string | null;
  transform: NumericTransform;
  minValue: number | null;
  maxValue: number | null;
  codingRule: string;
}

const states = (...pairs: Array<[string, string]>): TraitState[] => pairs.map(([code, label], order) => ({ code, label, order }));

/** Where every new study starts; the team edits, extends or retires these. */
export const SUGGESTED_CODEBOOK: SuggestedTrait[] = [
  {
    key: "environment",
    label: "Environment",
    kind: "binary",
    aspect: "ecology",
    states: states(["marine", "Marine"], ["nonmarine", "Non-marine"]),
    unit: null,
    transform: "none",
    minValue: null,
    maxValue: null,
    codingRule: "Marine when most occurrences come from marine facies; non-marine for lacustrine, fluvial or terrestrial settings.",
  },
  {
    key: "life_habit",
    label: "Life habit",
    kind: "categorical",
    aspect: "ecology",
    states: states(["epifaunal", "Epifaunal"], ["infaunal", "Infaunal"], ["nektonic", "Nektonic"], ["planktonic", "Planktonic"], ["terrestrial", "Terrestrial"]),
    unit: null,
    transform: "none",
    minValue: null,
    maxValue: null,
    codingRule: "The habit of adults. Semi-infaunal forms count as infaunal; record doubtful cases in a thread.",
  },
  {
    key: "feeding",
    label: "Feeding mode",
    kind: "categorical",
    aspect: "ecology",
    states: states(["suspension", "Suspension feeder"], ["deposit", "Deposit feeder"], ["predator", "Predator"], ["grazer", "Grazer"]),
    unit: null,
    transform: "none",
    minValue: null,
    maxValue: null,
    codingRule: "The dominant mode of the adult; use functional morphology when no direct evidence exists.",
  },
  {
    key: "body_size",
    label: "Body size",
    kind: "numeric",
    aspect: "ecology",
    states: [],
    unit: "mm",
    transform: "log10",
    minValue: 0,
    maxValue: null,
    codingRule: "Largest dimension of the largest well-preserved specimen, in millimetres.",
  },
  {
    key: "geographic_range",
    label: "Geographic range",
    kind: "numeric",
    aspect: "ecology",
    states: [],
    unit: "regions",
    transform: "none",
    minValue: 0,
    maxValue: null,
    codingRule: "Number of regions with occurrences in the last stage before the boundary.",
  },
];
