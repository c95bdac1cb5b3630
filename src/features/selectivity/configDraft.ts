// The Selectivity screen's set-up as the person edits it, and its translation to the run
// parameters that the shared schema checks on both sides.
import type { NumericTransform } from "@shared/codebook";
import { DEFAULT_CONFOUNDING_THRESHOLD, DEFAULT_MIN_INFORMATIVE_CLADES, runParamsSchema, type RunParams, type RunParamsInput } from "@shared/schemas/runs";
import type { Trait } from "@shared/schemas/traits";
import type { SamplingCovariate } from "@shared/schemas/samplingCheck";
import { formatMa } from "../../components/timescale/ages";
import type { ScaleIndex } from "../../components/timescale/scaleIndex";
import { issuesToFieldErrors, type FieldErrors } from "../../lib/forms";

export interface DraftBoundary {
  /** Local key for lists (a boundary may be added, removed and added again). */
  key: string;
  boundaryMa: number;
  /** Myr; undefined: the duration of the stage just below the boundary. */
  windowMyr?: number;
  /** A name for tables and figures; undefined: the server names it from the time scale. */
  label?: string;
}

export interface DraftTrait {
  traitId: string;
  /** A state code; undefined: the most common state. */
  reference?: string;
  /** Numeric traits; undefined: the codebook's transform. */
  transform?: NumericTransform;
  standardise?: boolean;
}

export interface Draft {
  /** Null while the person has not typed a name: the suggested one is used. */
  name: string | null;
  boundaries: DraftBoundary[];
  traits: DraftTrait[];
  correction: RunParams["correction"];
  forceFirth: boolean;
  level: number;
  confoundingThreshold: number;
  /** Clade-adjusted estimates from fewer informative clades are thin and never flag. */
  minInformativeClades: number;
  /** Key of the boundary named as the crisis (crisis against background); undefined: none. */
  crisisKey?: string;
  /** Robustness panel: window factors as typed ("0.5, 1.5, 2") and the truncation distance in Myr; undefined: the defaults. */
  windowFactors?: string;
  truncationMyr?: string;
  /** Sampling covariates added to the multiple regression (from the study's occurrences); empty: none. */
  samplingCovariates: SamplingCovariate[];
}

let nextKey = 1;
export const boundaryKey = () => `b${nextKey++}`;

export const EMPTY_DRAFT: Draft = {
  name: null,
  boundaries: [],
  traits: [],
  correction: "bh",
  forceFirth: false,
  level: 0.95,
  confoundingThreshold: DEFAULT_CONFOUNDING_THRESHOLD,
  minInformativeClades: DEFAULT_MIN_INFORMATIVE_CLADES,
  samplingCovariates: [],
};

/** A boundary as a reader knows it: the unit whose base it is, or the age. */
export function boundaryName(scale: ScaleIndex | null, b: Pick<DraftBoundary, "boundaryMa" | "label">): string {
  if (b.label) return b.label;
  const units = scale?.withBase(b.boundaryMa) ?? [];
  const unit = units[units.length - 1];
  return unit ? `Base of the ${unit.label}` : `${formatMa(b.boundaryMa)} (custom age)`;
}

/** "Selectivity at the base of the Danian": a name to start from, until the person types one. */
export function suggestedName(scale: ScaleIndex | null, draft: Draft): string {
  if (draft.boundaries.length === 0) return "Selectivity run";
  const first = boundaryName(scale, draft.boundaries[0]).replace(/^Base of the /, "the base of the ");
  const more = draft.boundaries.length > 1 ? ` and ${draft.boundaries.length - 1} more` : "";
  return `Selectivity at ${first}${more}`.slice(0, 120);
}

/** The run parameters the draft stands for, before the schema has checked them. */
export function paramsInput(scale: ScaleIndex | null, draft: Draft): RunParamsInput {
  return {
    name: draft.name ?? suggestedName(scale, draft),
    boundaries: draft.boundaries.map((b) => ({
      boundaryMa: b.boundaryMa,
      ...(b.windowMyr !== undefined ? { windowMyr: b.windowMyr } : {}),
      ...(b.label ? { label: b.label } : {}),
    })),
    traits: draft.traits.map((t) => ({
      traitId: t.traitId,
      ...(t.reference ? { reference: t.reference } : {}),
      ...(t.transform ? { transform: t.transform } : {}),
      ...(t.standardise ? { standardise: true } : {}),
    })),
    stratifyBy: "higherTaxon",
    correction: draft.correction,
    forceFirth: draft.forceFirth,
    level: draft.level,
    confoundingThreshold: draft.confoundingThreshold,
    minInformativeClades: draft.minInformativeClades,
    ...crisisParam(draft),
    ...robustnessParam(draft),
    ...(draft.samplingCovariates.length ? { samplingCovariates: draft.samplingCovariates } : {}),
  };
}

/** The robustness settings as typed, left out when both are empty (the defaults apply). */
function robustnessParam(draft: Draft): Pick<RunParamsInput, "robustness"> {
  const factors = draft.windowFactors?.trim() ?? "";
  const truncation = draft.truncationMyr?.trim() ?? "";
  if (factors === "" && truncation === "") return {};
  return {
    robustness: {
      ...(factors !== "" ? { windowFactors: factors.split(/[\s,;]+/).filter(Boolean).map(Number) } : {}),
      ...(truncation !== "" ? { truncationMyr: Number(truncation) } : {}),
    },
  };
}

/** The crisis as the run parameter: the index of the boundary marked as the crisis, while it is still chosen. */
function crisisParam(draft: Draft): { crisisBoundary?: number } {
  const index = draft.crisisKey === undefined ? -1 : draft.boundaries.findIndex((b) => b.key === draft.crisisKey);
  return index >= 0 ? { crisisBoundary: index } : {};
}

export type DraftCheck = { ok: true; params: RunParams } | { ok: false; errors: FieldErrors };

/** The shared schema's verdict on the draft: the parameters, or a message per field ("traits.1.reference"). */
export function checkDraft(scale: ScaleIndex | null, draft: Draft): DraftCheck {
  const parsed = runParamsSchema.safeParse(paramsInput(scale, draft));
  if (parsed.success) return { ok: true, params: parsed.data };
  return { ok: false, errors: issuesToFieldErrors(parsed.error) };
}

/** A stored run's parameters as a draft to edit, keeping only traits still in the codebook. */
export function draftFromParams(params: RunParams, codebook: readonly Trait[]): { draft: Draft; missingTraits: number } {
  const live = new Set(codebook.filter((t) => !t.retired).map((t) => t.id));
  const traits = params.traits.filter((t) => live.has(t.traitId));
  const boundaries = params.boundaries.map((b) => ({ key: boundaryKey(), boundaryMa: b.boundaryMa, windowMyr: b.windowMyr, label: b.label }));
  return {
    draft: {
      name: params.name,
      boundaries,
      crisisKey: params.crisisBoundary !== undefined ? boundaries[params.crisisBoundary]?.key : undefined,
      windowFactors: params.robustness ? params.robustness.windowFactors.join(", ") : undefined,
      truncationMyr: params.robustness?.truncationMyr !== undefined ? String(params.robustness.truncationMyr) : undefined,
      traits: traits.map((t) => ({ traitId: t.traitId, reference: t.reference, transform: t.transform, standardise: t.standardise })),
      correction: params.correction,
      forceFirth: params.forceFirth,
      level: params.level,
      confoundingThreshold: params.confoundingThreshold,
      minInformativeClades: params.minInformativeClades ?? DEFAULT_MIN_INFORMATIVE_CLADES,
      samplingCovariates: [...(params.samplingCovariates ?? [])],
    },
    missingTraits: params.traits.length - traits.length,
  };
}

/** The draft's traits kept in codebook order, so tables and exports list them as the codebook does. */
export function withTraitToggled(draft: Draft, codebook: readonly Trait[], traitId: string, on: boolean): Draft {
  const chosen = new Map(draft.traits.map((t) => [t.traitId, t]));
  if (on && !chosen.has(traitId)) chosen.set(traitId, { traitId });
  if (!on) chosen.delete(traitId);
  const order = codebook.map((t) => t.id);
  return { ...draft, traits: order.filter((id) => chosen.has(id)).map((id) => chosen.get(id)!) };
}
