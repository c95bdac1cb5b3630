// The shapes of a selectivity analysis. What goes in (plain arrays built by the server from the
// trait table and the outcomes across a boundary) is declared here; what comes out is stored in a
// run, so its one source is the zod schemas in shared/schemas/selectivityResult.ts and its types
// are derived from them (z.infer).
import type { NumericTransform, TraitKind } from "../codebook";
import type { CORRECTIONS } from "../schemas/runParams";

export type {
  ConfoundingJudgement,
  ContrastResult,
  Interval,
  ModelEncoding,
  ModelResult,
  SelectivityResult,
  StateRow,
  TraitResult,
} from "../schemas/selectivityResult";

/** The multiple-testing corrections a run can choose (shared/schemas/runParams.ts). */
export type MultipleTestingMethod = (typeof CORRECTIONS)[number];

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
  transform: NumericTransform;
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
