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
 * The confounding check (change-in-estimate rule; common practice, no source): each contrast's
 * crude odds ratio is compared with its odds ratio adjusted for clade and for the other traits, as
 * the relative change |adjusted / crude - 1|; a contrast is flagged when either change exceeds the
 * threshold. The note says in plain words what the move may mean: a trait can track extinction only
 * because both share a cause (e.g. the trait is concentrated in hard-hit clades).
 *
 * @example
 * confoundingCheck(contrasts with crude 2.8 and clade-adjusted 1.1, { threshold: 0.1, ... })
 * // => { contrasts: [{ ..., changeOnCladeAdjustment: 0.607, flagged: true }],
 * //      note: "The odds ratio of Life habit: infaunal (against epifaunal) moves from 2.80 to 1.10 once clade is taken into account: ..." }
 */
export function confoundingCheck(contrasts: ContrastResult[], context: ConfoundingContext): { contrasts: ContrastResult[]; note: string | null } {
  const sentences: string[] = [];
  const checked = contrasts.map((contrast) => {
    const crude = contrast.crude.estimate;
    const cladeChange = contrast.cladeAdjusted ? relativeChange(crude, contrast.cladeAdjusted.estimate) : null;
    const modelChange = contrast.modelAdjusted ? relativeChange(crude, contrast.modelAdjusted.estimate) : null;
    const cladeFlag = cladeChange !== null && cladeChange > context.threshold;
    const modelFlag = modelChange !== null && modelChange > context.threshold;
    const subject = subjectOf(contrast, context.spec);
    if (cladeFlag && contrast.cladeAdjusted) {
      sentences.push(`${subject} moves from ${formatNumber(crude)} to ${formatNumber(contrast.cladeAdjusted.estimate)} once clade is taken into account: ${cladeReading(contrast, context.spec, crude, contrast.cladeAdjusted.estimate)}`);
    }
    if (modelFlag && contrast.modelAdjusted) {
      const others = context.otherTraits.length > 0 ? `the other traits (${context.otherTraits.join(", ")})` : "the other traits";
      const smaller =
        context.modelTaxa !== null && context.modelTaxa < context.traitTaxa
          ? ` The model uses the ${context.modelTaxa} taxa with every chosen trait known, fewer than the ${context.traitTaxa} here, so part of this change may come from the smaller sample.`
          : "";
      sentences.push(`${subject} moves from ${formatNumber(crude)} to ${formatNumber(contrast.modelAdjusted.estimate)} once ${others} are taken into account: ${modelReading(crude, contrast.modelAdjusted.estimate)}${smaller}`);
    }
    return { ...contrast, changeOnCladeAdjustment: cladeChange, changeOnModelAdjustment: modelChange, flagged: cladeFlag || modelFlag };
  });
  if (sentences.length === 0) return { contrasts: checked, note: null };
  const percent = String(Number((context.threshold * 100).toFixed(1)));
  sentences.push(
    `(Flagged because the odds ratio moves by more than ${percent}% on adjustment. A trait can track extinction only because both share a cause; the adjusted odds ratios show how much of the association remains within clades and beside the other traits.)`,
  );
  return { contrasts: checked, note: sentences.join(" ") };
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
