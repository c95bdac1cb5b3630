// What one selectivity analysis (one boundary of a run) finds: per trait, the table of states, the
// test and the odds ratios crude and adjusted, and the multiple regression. These schemas are the
// one source of the result types: shared/selectivity computes values of these types (its types.ts
// takes them from here with z.infer) and runs store them.
import { z } from "zod";
import { numericTransformSchema, traitKindSchema } from "./traits";

const ciSchema = z.tuple([z.number(), z.number()]);
/** An estimate with its confidence interval. */
export const intervalSchema = z.object({ estimate: z.number(), ci: ciSchema });
export const confoundingJudgementSchema = z
  .object({
    crude: z.number(),
    standardised: z.number(),
    change: z.number(),
    seLogDifference: z.number().nullable(),
    z: z.number().nullable(),
    pValue: z.number().nullable(),
    informativeClades: z.number().int().nullable(),
    thin: z.boolean(),
    flagged: z.boolean(),
    replicates: z.number().int(),
    seed: z.number().int(),
    method: z.string(),
  })
  .meta({ id: "SelectivityConfoundingJudgement", description: "Crude odds ratio against the marginal odds ratio standardised over the adjustment, with a bootstrap standard error of the log difference" });

export const stateRowSchema = z
  .object({
    state: z.string(),
    label: z.string(),
    victims: z.number().int(),
    survivors: z.number().int(),
    proportion: z.number().nullable().meta({ description: "Extinction proportion victims / (victims + survivors)" }),
    ci: ciSchema.nullable().meta({ description: "Wilson interval of the proportion" }),
  })
  .meta({ id: "SelectivityStateRow" });

export const contrastResultSchema = z
  .object({
    contrast: z.string(),
    state: z.string().nullable(),
    reference: z.string().nullable(),
    crude: intervalSchema.extend({ method: z.string() }),
    cladeAdjusted: intervalSchema
      .extend({
        method: z.string(),
        informativeClades: z.number().int().optional().meta({ description: "Clades that carry information on the within-clade odds ratio" }),
        thin: z.boolean().optional().meta({ description: "Fewer informative clades than the run's minimum: shown, never flags" }),
        breslowDay: z.object({ chiSquare: z.number(), df: z.number(), pValue: z.number() }).optional(),
      })
      .nullable(),
    modelAdjusted: intervalSchema.nullable(),
    changeOnCladeAdjustment: z.number().nullable(),
    changeOnModelAdjustment: z.number().nullable(),
    cladeCheck: confoundingJudgementSchema.nullable().optional(),
    modelCheck: confoundingJudgementSchema.nullable().optional(),
    flagged: z.boolean().meta({ description: "Possible confounding: the crude odds ratio differs from the standardised marginal one by more than the threshold and more than its own uncertainty" }),
    notes: z.array(z.string()).meta({ description: "Why an adjusted odds ratio is missing, or what limits it" }),
  })
  .meta({ id: "SelectivityContrast" });

export const traitResultSchema = z
  .object({
    key: z.string(),
    label: z.string(),
    kind: traitKindSchema,
    used: z.number().int(),
    droppedMissing: z.number().int(),
    table: z.array(stateRowSchema),
    test: z
      .object({ method: z.string(), pValue: z.number().nullable(), adjustedPValue: z.number().nullable(), statistic: z.number().optional(), df: z.number().optional() })
      .meta({ description: "p-values are null when no test was possible; the method says why" }),
    contrasts: z.array(contrastResultSchema),
    confoundingNote: z.string().nullable(),
    reference: z.string().nullable().meta({ description: "Reference state of the odds ratios (null for numeric traits, or when no state has taxa)" }),
    droppedInvalid: z.number().int().meta({ description: "Taxa left out for a value that cannot be used" }),
    notes: z.array(z.string()).meta({ description: "What was left out and why, the reference chosen, how numbers were scaled" }),
  })
  .meta({ id: "SelectivityTraitResult" });

const encodingColumnSchema = z.union([
  z.object({ name: z.string(), trait: z.string(), kind: z.literal("state"), state: z.string() }),
  z.object({ name: z.string(), trait: z.string(), kind: z.literal("numeric"), transform: numericTransformSchema, center: z.number(), scale: z.number() }),
]);

/** What scoring new taxa with the fitted model needs (the modern comparison uses it). */
export const modelEncodingSchema = z.object({
  /** One per trait in the model: its reference state and the states it knows, or its numeric scaling. */
  traits: z.array(
    z.union([
      z.object({ key: z.string(), label: z.string(), kind: z.literal("states"), reference: z.string(), states: z.array(z.string()) }),
      z.object({ key: z.string(), label: z.string(), kind: z.literal("numeric"), transform: numericTransformSchema, center: z.number(), scale: z.number() }),
    ]),
  ),
  columns: z.array(encodingColumnSchema),
});

export const modelResultSchema = z
  .object({
    n: z.number().int(),
    victims: z.number().int(),
    droppedIncomplete: z.number().int().meta({ description: "Taxa left out because a chosen trait had no usable value" }),
    method: z.string(),
    coefficients: z.array(
      z.object({
        name: z.string(),
        estimate: z.number(),
        se: z.number(),
        z: z.number(),
        pValue: z.number(),
        ci: ciSchema,
        oddsRatio: z.number(),
        oddsRatioCi: ciSchema,
        label: z.string(),
      }),
    ),
    terms: z.array(z.object({ name: z.string(), df: z.number(), chiSquare: z.number(), pValue: z.number(), label: z.string() })).meta({ description: "Likelihood ratio test per trait; name is the trait key" }),
    deviance: z.number(),
    nullDeviance: z.number(),
    aic: z.number(),
    converged: z.boolean(),
    firth: z.boolean(),
    firthReason: z.enum(["separation", "requested"]).nullable(),
    separatedPredictors: z.array(z.string()),
    encoding: modelEncodingSchema,
    covariance: z.array(z.array(z.number())),
    notes: z.array(z.string()),
  })
  .meta({ id: "SelectivityModel" });

export const selectivityResultSchema = z
  .object({
    design: z.object({
      victims: z.number().int(),
      survivors: z.number().int(),
      droppedByTrait: z.record(z.string(), z.number().int()),
      completeCases: z.number().int(),
      withoutClade: z.number().int().optional().meta({ description: "Taxa without a higher taxon, left out of the clade-adjusted estimates" }),
      withQualifiedClade: z
        .number()
        .int()
        .optional()
        .meta({ description: "Taxa whose higher taxon carries a qualifier (?, cf., aff.): each such name is a clade of its own in the clade-adjusted estimates, not pooled into the clade it names" }),
    }),
    confoundingMethod: z.string().optional().meta({ description: "How the confounding flag is decided, with citations" }),
    traits: z.array(traitResultSchema),
    model: modelResultSchema.nullable(),
    modelNote: z.string().nullable(),
  })
  .meta({ id: "SelectivityResult" });

export type Interval = z.infer<typeof intervalSchema>;
export type ConfoundingJudgement = z.infer<typeof confoundingJudgementSchema>;
export type StateRow = z.infer<typeof stateRowSchema>;
export type ContrastResult = z.infer<typeof contrastResultSchema>;
export type TraitResult = z.infer<typeof traitResultSchema>;
export type ModelEncoding = z.infer<typeof modelEncodingSchema>;
export type ModelResult = z.infer<typeof modelResultSchema>;
export type SelectivityResult = z.infer<typeof selectivityResultSchema>;
