// A run's input: the boundaries, traits and options of a selectivity analysis as a form sends
// them and a run stores them (defaults filled in), and the body of a re-run.
import { z } from "zod";
import { AGE_LIMIT_MA, oneLine, uuidSchema } from "./common";
import { confidenceLevelSchema } from "./savedAnalysis";
import { numericTransformSchema } from "./traits";
import { crisisBoundaryParamSchema, robustnessParamsSchema } from "./runChecks";
import { samplingCovariatesSchema } from "./samplingCheck";

/** Most boundaries one run tests. */
export const RUN_MAX_BOUNDARIES = 8;
/** Most traits one run tests. */
export const RUN_MAX_TRAITS = 30;
/**
 * Default relative change of an odds ratio on adjustment that flags possible confounding: the
 * "10% change-in-estimate" rule (Mickey & Greenland 1989, Am J Epidemiol 129:125; common practice).
 */
export const DEFAULT_CONFOUNDING_THRESHOLD = 0.1;
export const DEFAULT_MIN_INFORMATIVE_CLADES = 3;

export const CORRECTIONS = ["bh", "holm", "bonferroni"] as const;
export const CORRECTION_LABELS: Record<(typeof CORRECTIONS)[number], string> = {
  bh: "Benjamini-Hochberg (false discovery rate)",
  holm: "Holm (family-wise error, step-down)",
  bonferroni: "Bonferroni (family-wise error)",
};

/** Clade fields a run can stratify by; the trait table holds one clade level now, the higher taxon. */
export const STRATIFY_FIELDS = ["higherTaxon"] as const;

export const runBoundaryParamsSchema = z
  .strictObject({
    boundaryMa: z
      .number({ message: "Boundary must be an age in Ma (a number greater than 0)" })
      .refine(Number.isFinite, "Boundary must be a finite age in Ma")
      .refine((v) => v > 0, "Boundary must be an age in Ma greater than 0")
      .refine((v) => v <= AGE_LIMIT_MA, `Boundary must be at most ${AGE_LIMIT_MA.toLocaleString("en-US")} Ma: nothing is older than the Earth`)
      .meta({ description: "Boundary age in Ma" }),
    windowMyr: z
      .number({ message: "Window must be a duration in Myr (a number of 0 or more)" })
      .refine(Number.isFinite, "Window must be a finite duration in Myr")
      .refine((v) => v >= 0, "Window must be a duration in Myr of 0 or more")
      .optional()
      .meta({ description: "Window below the boundary in Myr; default: the duration of the stage just below the boundary" }),
    label: z.string().trim().max(120, "Label must have at most 120 characters").check(oneLine("Label")).optional().meta({ description: "A name for the boundary in tables and figures; default from the time scale" }),
  })
  .meta({ id: "RunBoundaryParams" });
export type RunBoundaryParams = z.infer<typeof runBoundaryParamsSchema>;

export const runTraitParamsSchema = z
  .strictObject({
    traitId: uuidSchema,
    reference: z
      .string()
      .trim()
      .min(1, "Reference state must be a state code of the trait")
      .optional()
      .meta({ description: "State the other states are compared with (binary, categorical, ordinal traits); default: the most common state" }),
    transform: numericTransformSchema.optional().meta({ description: "Numeric traits only; default: the transform the codebook sets" }),
    standardise: z.boolean({ message: "standardise must be true or false" }).optional().meta({ description: "Numeric traits only: odds ratios per standard deviation instead of per unit; default false" }),
  })
  .meta({ id: "RunTraitParams" });
export type RunTraitParams = z.infer<typeof runTraitParamsSchema>;

export const runParamsSchema = z
  .strictObject({
    name: z.string({ message: "Name is required" }).trim().min(1, "Name is required").max(120, "Name must have at most 120 characters").check(oneLine("Name")),
    boundaries: z
      .array(runBoundaryParamsSchema, { message: "boundaries must be a list of { boundaryMa, windowMyr?, label? }" })
      .min(1, "Choose at least one boundary")
      .max(RUN_MAX_BOUNDARIES, `Choose at most ${RUN_MAX_BOUNDARIES} boundaries`),
    traits: z
      .array(runTraitParamsSchema, { message: "traits must be a list of { traitId, reference?, transform?, standardise? }" })
      .min(1, "Choose at least one trait to test")
      .max(RUN_MAX_TRAITS, `Choose at most ${RUN_MAX_TRAITS} traits`),
    stratifyBy: z
      .enum(STRATIFY_FIELDS, { message: "stratifyBy must be higherTaxon" })
      .default("higherTaxon")
      .meta({ description: "The clade field the clade-adjusted odds ratios are stratified by" }),
    correction: z
      .enum(CORRECTIONS, { message: "correction must be bh, holm or bonferroni" })
      .default("bh")
      .meta({ description: "Multiple-testing correction over the traits' tests: bh (Benjamini-Hochberg, default), holm or bonferroni" }),
    forceFirth: z.boolean({ message: "forceFirth must be true or false" }).default(false).meta({ description: "Fit Firth's bias-reduced regression even when the data do not separate" }),
    level: confidenceLevelSchema,
    confoundingThreshold: z
      .number({ message: "confoundingThreshold must be a number between 0.01 and 1" })
      .min(0.01, "confoundingThreshold must be at least 0.01")
      .max(1, "confoundingThreshold must be at most 1")
      .default(DEFAULT_CONFOUNDING_THRESHOLD)
      .meta({ description: "Relative change of an odds ratio on adjustment that flags possible confounding (0.1 = 10%)" }),
    minInformativeClades: z
      .number({ message: "minInformativeClades must be a whole number between 1 and 50" })
      .int("minInformativeClades must be a whole number")
      .min(1, "minInformativeClades must be at least 1")
      .max(50, "minInformativeClades must be at most 50")
      .optional()
      .meta({ description: "Clade-adjusted estimates resting on fewer informative clades than this are marked thin and never flag possible confounding (default 3 when left out)" }),
    crisisBoundary: crisisBoundaryParamSchema,
    samplingCovariates: samplingCovariatesSchema,
    robustness: robustnessParamsSchema.optional().meta({ description: "Settings of the robustness panel; left out: the defaults (windows 0.5, 1.5 and 2 times each boundary's, truncation a quarter of the window)" }),
  })
  .superRefine((p, ctx) => {
    if (p.crisisBoundary !== undefined) {
      if (p.boundaries.length < 2) ctx.addIssue({ code: "custom", path: ["crisisBoundary"], message: "Crisis against background needs at least two boundaries: add a background boundary or leave the crisis unset" });
      else if (p.crisisBoundary >= p.boundaries.length) ctx.addIssue({ code: "custom", path: ["crisisBoundary"], message: `crisisBoundary must name one of the ${p.boundaries.length} boundaries (0 to ${p.boundaries.length - 1})` });
    }
    const seenBoundary = new Map<string, number>();
    p.boundaries.forEach((b, i) => {
      const key = `${b.boundaryMa}|${b.windowMyr ?? "default"}`;
      const earlier = seenBoundary.get(key);
      if (earlier !== undefined) ctx.addIssue({ code: "custom", path: ["boundaries", i, "boundaryMa"], message: `The same boundary and window as boundary ${earlier + 1}` });
      else seenBoundary.set(key, i);
    });
    const seenTrait = new Map<string, number>();
    p.traits.forEach((t, i) => {
      const earlier = seenTrait.get(t.traitId);
      if (earlier !== undefined) ctx.addIssue({ code: "custom", path: ["traits", i, "traitId"], message: `The same trait as trait ${earlier + 1}; choose each trait once` });
      else seenTrait.set(t.traitId, i);
    });
  })
  .meta({ id: "RunParams" });
/** What a form sends (defaults may be left out). */
export type RunParamsInput = z.input<typeof runParamsSchema>;
/** What is stored with a run (defaults filled in). */
export type RunParams = z.output<typeof runParamsSchema>;

export const runRerunSchema = z
  .strictObject({
    name: z.string().trim().min(1, "Name must not be empty").max(120, "Name must have at most 120 characters").check(oneLine("Name")).optional().meta({ description: "Default: the name of the run re-run" }),
  })
  .meta({ id: "RunRerun" });
export type RunRerunInput = z.input<typeof runRerunSchema>;
