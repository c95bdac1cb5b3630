import { CLADE_CONFOUNDING_REPLICATES, CLADE_CONFOUNDING_SEED } from "./cladeConfounding";
import { formatNumber } from "./formatNumber";
import { numericStep } from "./scaleNumericTrait";
import type { ConfoundingJudgement, ContrastResult, SelectivityTraitSpec } from "./types";

export interface ConfoundingContext {
  spec: SelectivityTraitSpec;
  /** Relative change of an odds ratio that flags a contrast (0.1 = 10%). */
  threshold: number;
  /** Labels of the other traits in the multiple regression. */
  otherTraits: string[];
  /** Taxa in the trait's own table, and in the multiple regression (null without a model). */
  traitTaxa: number;
  modelTaxa: number | null;
}

/**
 * The confounding check, calibrated: a contrast is flagged "possible confounding" when its crude
 * odds ratio and the marginal odds ratio standardised over the adjustment (clade, or the other
 * traits) differ by more than the analyst's threshold (the change-in-estimate rule; common
 * practice, no source) and by more than their own uncertainty (a seeded bootstrap), and the
 * estimate is not thin (see judgeCladeConfounding and judgeModelConfounding, which fill
 * contrast.cladeCheck and contrast.modelCheck). The adjusted conditional odds ratios stay on screen
 * as estimates; the changes reported are those the judgement weighed. The note says in plain words
 * what a flagged move may mean; how the flag is decided is said once per result (confoundingMethod).
 *
 * @example
 * confoundingCheck(contrasts with cladeCheck { crude: 2.8, standardised: 1.1, flagged: true }, { threshold: 0.1, ... })
 * // => { contrasts: [{ ..., changeOnCladeAdjustment: 0.607, flagged: true }],
 * //      note: "The odds ratio of Life habit: infaunal (against epifaunal) moves from 2.80 to 1.10 once clade is taken into account: ..." }
 */
export function confoundingCheck(contrasts: ContrastResult[], context: ConfoundingContext): { contrasts: ContrastResult[]; note: string | null } {
  // Flagged moves grouped by what they may mean, so a reading shared by several contrasts of the
  // trait is said once after all their numbers ("... and that of ... once clade is taken into
  // account: they may ..."); groups keep the order in which their first contrast comes.
  const cladeGroups = new Map<CladeReadingKind, Array<{ contrast: ContrastResult; check: ConfoundingJudgement }>>();
  const modelGroups = new Map<ModelReadingKind, Array<{ contrast: ContrastResult; check: ConfoundingJudgement }>>();
  const add = <K>(groups: Map<K, Array<{ contrast: ContrastResult; check: ConfoundingJudgement }>>, kind: K, contrast: ContrastResult, check: ConfoundingJudgement): void => {
    groups.set(kind, [...(groups.get(kind) ?? []), { contrast, check }]);
  };
  const checked = contrasts.map((contrast) => {
    const cladeCheck = contrast.cladeCheck ?? null;
    const modelCheck = contrast.modelCheck ?? null;
    const cladeFlag = cladeCheck?.flagged === true;
    const modelFlag = modelCheck?.flagged === true;
    if (cladeFlag && cladeCheck) add(cladeGroups, cladeReadingKind(cladeCheck.crude, cladeCheck.standardised), contrast, cladeCheck);
    if (modelFlag && modelCheck) add(modelGroups, modelReadingKind(modelCheck.crude, modelCheck.standardised), contrast, modelCheck);
    return {
      ...contrast,
      cladeCheck,
      modelCheck,
      changeOnCladeAdjustment: cladeCheck ? cladeCheck.change : null,
      changeOnModelAdjustment: modelCheck ? modelCheck.change : null,
      flagged: cladeFlag || modelFlag,
    };
  });
  const sentences: string[] = [];
  for (const [kind, group] of cladeGroups) {
    const moves = group.map(({ contrast, check }, i) =>
      `${i === 0 ? `${subjectOf(contrast, context.spec)} moves` : `that of ${stateWords(contrast, context.spec)}`} from ${formatNumber(check.crude)} to ${formatNumber(check.standardised)} (standardised over clades; within clades ${formatNumber(contrast.cladeAdjusted?.estimate ?? NaN)})`,
    );
    const groups = group.map(({ contrast }) => groupOf(contrast, context.spec));
    sentences.push(`${listWords(moves)} once clade is taken into account: ${cladeReading(kind, groups)}`);
  }
  for (const [kind, group] of modelGroups) {
    const others = context.otherTraits.length > 0 ? `the other traits (${context.otherTraits.join(", ")})` : "the other traits";
    const smaller =
      context.modelTaxa !== null && context.modelTaxa < context.traitTaxa
        ? ` The model uses the ${context.modelTaxa} taxa with every chosen trait known, fewer than the ${context.traitTaxa} here.`
        : "";
    const moves = group.map(({ contrast, check }, i) =>
      i === 0
        ? `${subjectOf(contrast, context.spec)} moves from ${formatNumber(check.crude)} to ${formatNumber(check.standardised)}${group.length === 1 ? ` (standardised over ${others})` : ""}`
        : `that of ${stateWords(contrast, context.spec)} from ${formatNumber(check.crude)} to ${formatNumber(check.standardised)}`,
    );
    const over = group.length === 1 ? "" : `, each standardised over ${others},`;
    sentences.push(`${listWords(moves)}${over} once they are taken into account: ${modelReading(kind, group.length)}${smaller}`);
  }
  return { contrasts: checked, note: sentences.length === 0 ? null : sentences.join(" ") };
}

/** How the flag is decided, said once per result, with its citations. */
export function confoundingMethod(threshold: number, level: number, minInformativeClades: number): string {
  const percent = String(Number((threshold * 100).toFixed(1)));
  return (
    `"Possible confounding" flags a contrast whose crude odds ratio differs from the marginal odds ratio standardised over the adjustment (over clades, or over the other traits) ` +
    `by more than ${percent}% (the change-in-estimate threshold; common practice, no source) and by more than its own uncertainty: the log difference over its standard error ` +
    `from a seeded bootstrap (taxa resampled within clades; ${CLADE_CONFOUNDING_REPLICATES} replicates, seed ${CLADE_CONFOUNDING_SEED}), two-sided p below ${String(Number((1 - level).toFixed(4)))}. ` +
    `Traits with states are standardised directly over the clades holding both states; numeric traits through the conditional (within-clade) slope. ` +
    `The crude odds ratio is compared with a standardised marginal one, not with the within-clade (conditional) one shown as the estimate, because odds ratios are not collapsible: ` +
    `when risk differs between clades the within-clade odds ratio lies further from 1 than the crude one even without confounding (Greenland, Robins & Pearl 1999, Statistical Science 14:29; Miettinen & Cook 1981). ` +
    `Clade-adjusted estimates resting on fewer than ${minInformativeClades} informative clades are marked thin and never flag on their own.`
  );
}

/** |adjusted / crude - 1|, or null when either is not a positive finite number. */
export function relativeChange(crude: number, adjusted: number): number | null {
  if (!(crude > 0 && Number.isFinite(crude) && adjusted > 0 && Number.isFinite(adjusted))) return null;
  return Math.abs(adjusted / crude - 1);
}

/** "The odds ratio of Life habit: Infaunal (against Epifaunal)" */
function subjectOf(contrast: ContrastResult, spec: SelectivityTraitSpec): string {
  if (contrast.state === null) return `The odds ratio of ${spec.label} ${numericStep(spec)}`;
  return `The odds ratio of ${spec.label}: ${stateWords(contrast, spec)}`;
}

/** "Infaunal (against Epifaunal)" */
function stateWords(contrast: ContrastResult, spec: SelectivityTraitSpec): string {
  const label = (code: string | null): string => spec.states.find((s) => s.code === code)?.label ?? String(code);
  return `${label(contrast.state)} (against ${label(contrast.reference)})`;
}

function groupOf(contrast: ContrastResult, spec: SelectivityTraitSpec): string {
  if (contrast.state === null) return `taxa with higher values of ${spec.label}`;
  return spec.states.find((s) => s.code === contrast.state)?.label ?? contrast.state;
}

/** "a", "a and b", "a, b and c" */
function listWords(items: string[]): string {
  return items.length <= 1 ? (items[0] ?? "") : `${items.slice(0, -1).join(", ")} and ${items[items.length - 1]}`;
}

/** Moving toward 1 (same side or onto it): the crude figure was largely a clade effect. */
function towardOne(crude: number, adjusted: number): boolean {
  const c = Math.log(crude);
  const a = Math.log(adjusted);
  return Math.abs(a) < Math.abs(c) && (Math.sign(a) === Math.sign(c) || Math.abs(a) < 0.05);
}

type CladeReadingKind = "extinction" | "survival" | "reversed" | "stronger";
type ModelReadingKind = "toward" | "reversed" | "stronger";

function cladeReadingKind(crude: number, adjusted: number): CladeReadingKind {
  if (towardOne(crude, adjusted)) return crude > 1 ? "extinction" : "survival";
  return Math.sign(Math.log(adjusted)) !== Math.sign(Math.log(crude)) ? "reversed" : "stronger";
}

function modelReadingKind(crude: number, adjusted: number): ModelReadingKind {
  if (towardOne(crude, adjusted)) return "toward";
  return Math.sign(Math.log(adjusted)) !== Math.sign(Math.log(crude)) ? "reversed" : "stronger";
}

/** What a move on clade adjustment may mean, for the groups of taxa it concerns (state labels, or one "taxa with higher values of ..."). */
function cladeReading(kind: CladeReadingKind, groups: string[]): string {
  const one = groups.length === 1;
  const who = groups[0]?.startsWith("taxa with") ? groups[0] : `${listWords(groups)} taxa`;
  switch (kind) {
    case "extinction":
      return `${one ? "it" : "they"} may track extinction only because ${who} are concentrated in hard-hit clades — a shared cause, not necessarily an effect of the trait.`;
    case "survival":
      return `${one ? "it" : "they"} may track survival only because ${who} are concentrated in clades that came through well — a shared cause, not necessarily an effect of the trait.`;
    case "reversed":
      return one
        ? "within clades the association runs the other way; differences between clades turn it around in the crude figure."
        : "within clades the associations run the other way; differences between clades turn them around in the crude figures.";
    case "stronger":
      return one
        ? "within clades the association is stronger than across all taxa; differences between clades hide part of it in the crude figure."
        : "within clades the associations are stronger than across all taxa; differences between clades hide part of them in the crude figures.";
  }
}

function modelReading(kind: ModelReadingKind, count: number): string {
  const one = count === 1;
  switch (kind) {
    case "toward":
      return one
        ? "part of its association may be carried by those traits, or by a cause it shares with them."
        : "part of their association may be carried by those traits, or by a cause they share with them.";
    case "reversed":
      return one
        ? "beside those traits the association runs the other way; they mask it in the crude figure."
        : "beside those traits the associations run the other way; those traits mask them in the crude figures.";
    case "stronger":
      return one
        ? "beside those traits the association is stronger; they mask part of it in the crude figure."
        : "beside those traits the associations are stronger; those traits mask part of them in the crude figures.";
  }
}
