import { CLADE_CONFOUNDING_REPLICATES, CLADE_CONFOUNDING_SEED } from "./cladeConfounding";
import { formatNumber } from "./formatNumber";
import { numericStep } from "./scaleNumericTrait";
import type { ContrastResult, SelectivityTraitSpec } from "./types";

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
  const sentences: string[] = [];
  const checked = contrasts.map((contrast) => {
    const cladeCheck = contrast.cladeCheck ?? null;
    const modelCheck = contrast.modelCheck ?? null;
    const cladeFlag = cladeCheck?.flagged === true;
    const modelFlag = modelCheck?.flagged === true;
    const subject = subjectOf(contrast, context.spec);
    if (cladeFlag && cladeCheck) {
      sentences.push(
        `${subject} moves from ${formatNumber(cladeCheck.crude)} to ${formatNumber(cladeCheck.standardised)} (standardised over clades; within clades ${formatNumber(contrast.cladeAdjusted?.estimate ?? NaN)}) once clade is taken into account: ${cladeReading(contrast, context.spec, cladeCheck.crude, cladeCheck.standardised)}`,
      );
    }
    if (modelFlag && modelCheck) {
      const others = context.otherTraits.length > 0 ? `the other traits (${context.otherTraits.join(", ")})` : "the other traits";
      const smaller =
        context.modelTaxa !== null && context.modelTaxa < context.traitTaxa
          ? ` The model uses the ${context.modelTaxa} taxa with every chosen trait known, fewer than the ${context.traitTaxa} here.`
          : "";
      sentences.push(
        `${subject} moves from ${formatNumber(modelCheck.crude)} to ${formatNumber(modelCheck.standardised)} (standardised over ${others}) once they are taken into account: ${modelReading(modelCheck.crude, modelCheck.standardised)}${smaller}`,
      );
    }
    return {
      ...contrast,
      cladeCheck,
      modelCheck,
      changeOnCladeAdjustment: cladeCheck ? cladeCheck.change : null,
      changeOnModelAdjustment: modelCheck ? modelCheck.change : null,
      flagged: cladeFlag || modelFlag,
    };
  });
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

function subjectOf(contrast: ContrastResult, spec: SelectivityTraitSpec): string {
  if (contrast.state === null) return `The odds ratio of ${spec.label} ${numericStep(spec)}`;
  const label = (code: string | null): string => spec.states.find((s) => s.code === code)?.label ?? String(code);
  return `The odds ratio of ${spec.label}: ${label(contrast.state)} (against ${label(contrast.reference)})`;
}

function groupOf(contrast: ContrastResult, spec: SelectivityTraitSpec): string {
  if (contrast.state === null) return `taxa with higher values of ${spec.label}`;
  const state = spec.states.find((s) => s.code === contrast.state)?.label ?? contrast.state;
  return `${state} taxa`;
}

/** Moving toward 1 (same side or onto it): the crude figure was largely a clade effect. */
function towardOne(crude: number, adjusted: number): boolean {
  const c = Math.log(crude);
  const a = Math.log(adjusted);
  return Math.abs(a) < Math.abs(c) && (Math.sign(a) === Math.sign(c) || Math.abs(a) < 0.05);
}

function cladeReading(contrast: ContrastResult, spec: SelectivityTraitSpec, crude: number, adjusted: number): string {
  const group = groupOf(contrast, spec);
  if (towardOne(crude, adjusted)) {
    return crude > 1
      ? `it may track extinction only because ${group} are concentrated in hard-hit clades — a shared cause, not necessarily an effect of the trait.`
      : `it may track survival only because ${group} are concentrated in clades that came through well — a shared cause, not necessarily an effect of the trait.`;
  }
  return Math.sign(Math.log(adjusted)) !== Math.sign(Math.log(crude))
    ? "within clades the association runs the other way; differences between clades turn it around in the crude figure."
    : "within clades the association is stronger than across all taxa; differences between clades hide part of it in the crude figure.";
}

function modelReading(crude: number, adjusted: number): string {
  if (towardOne(crude, adjusted)) return "part of its association may be carried by those traits, or by a cause it shares with them.";
  return Math.sign(Math.log(adjusted)) !== Math.sign(Math.log(crude))
    ? "beside those traits the association runs the other way; they mask it in the crude figure."
    : "beside those traits the association is stronger; they mask part of it in the crude figure.";
}
