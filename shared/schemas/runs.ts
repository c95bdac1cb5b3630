// The runs API: a selectivity analysis configured once (boundaries, traits, options), previewed as
// counts, computed as a job, stored with a hash of the exact data it read, reopened without
// recomputing, re-run on today's data, compared side by side and exported.
import { z } from "zod";
import type { SelectivityResult } from "../selectivity/types";
import { AGE_LIMIT_MA, exportQuerySchema, isoDateSchema, oneLine, uuidSchema, personOrNoneSchema, type Same, cautionsSchema } from "./common";
import { numericTransformSchema, traitKindSchema } from "./traits";
import { crisisBoundaryParamSchema, robustnessParamsSchema, runCrisisSchema, runRobustnessSchema } from "./runChecks";

/** Most boundaries one run tests. */
export const RUN_MAX_BOUNDARIES = 8;
/** Most traits one run tests. */
export const RUN_MAX_TRAITS = 30;
/** Largest page of the run list. */
export const RUN_MAX_PAGE_SIZE = 100;
/**
 * Default relative change of an odds ratio on adjustment that flags possible confounding: the
 * "10% change-in-estimate" rule (Mickey & Greenland 1989, Am J Epidemiol 129:125; common practice).
 */
export const DEFAULT_CONFOUNDING_THRESHOLD = 0.1;
export const DEFAULT_MIN_INFORMATIVE_CLADES = 3;

export const RUN_STATUSES = ["queued", "running", "succeeded", "failed"] as const;
export const runStatusSchema = z
  .enum(RUN_STATUSES)
  .meta({ id: "RunStatus", description: "queued: waiting for a process to take the job; running: being computed; succeeded: results stored; failed: see `error`" });
export type RunStatus = z.infer<typeof runStatusSchema>;

export const CORRECTIONS = ["bh", "holm", "bonferroni"] as const;
export const CORRECTION_LABELS: Record<(typeof CORRECTIONS)[number], string> = {
  bh: "Benjamini-Hochberg (false discovery rate)",
  holm: "Holm (family-wise error, step-down)",
  bonferroni: "Bonferroni (family-wise error)",
};

/** Clade fields a run can stratify by; the trait table holds one clade level now, the higher taxon. */
export const STRATIFY_FIELDS = ["higherTaxon"] as const;

// ---------------------------------------------------------------- parameters

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
    level: z
      .number({ message: "level must be a number between 0.5 and 0.999" })
      .min(0.5, "level must be at least 0.5")
      .max(0.999, "level must be at most 0.999")
      .default(0.95)
      .meta({ description: "Confidence level of the intervals" }),
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

// ---------------------------------------------------------------- preview

export const runPreviewTraitSchema = z
  .object({
    traitId: z.uuid(),
    key: z.string(),
    label: z.string(),
    kind: traitKindSchema,
    used: z.number().int().meta({ description: "Taxa at risk with a value for this trait" }),
    victimsUsed: z.number().int(),
    survivorsUsed: z.number().int(),
    droppedMissing: z.number().int().meta({ description: "Taxa at risk left out of this trait's test for a missing value" }),
    droppedInvalid: z.number().int().meta({ description: "Taxa at risk left out for a value the test cannot use (a code outside the codebook, zero or below under log10); `notes` says which" }),
    states: z
      .array(z.object({ code: z.string(), label: z.string(), victims: z.number().int(), survivors: z.number().int() }))
      .meta({ description: "Per state, in codebook order (empty for numeric traits)" }),
    reference: z.string().nullable().meta({ description: "The reference state the run will use (numeric traits: null)" }),
    transform: numericTransformSchema,
    standardise: z.boolean(),
    notes: z.array(z.string()).meta({ description: "Plain-language problems the test will meet (an empty state, a value a log cannot take, one state only)" }),
  })
  .meta({ id: "RunPreviewTrait" });

export const runBoundaryDesignSchema = z
  .object({
    boundaryMa: z.number(),
    windowMyr: z.number().meta({ description: "Window used, in Myr (the default filled in)" }),
    windowDefaultFrom: z
      .object({ name: z.string(), label: z.string() })
      .nullable()
      .meta({ description: "The stage whose duration gave the window, when none was given" }),
    label: z.string().meta({ description: "The boundary's name in tables and figures" }),
    victims: z.number().int(),
    survivors: z.number().int(),
    notAtRisk: z.number().int().meta({ description: "Taxa that neither survive nor die across the boundary, and taxa whose range cannot be used" }),
    overridesApplied: z.number().int().meta({ description: "Taxa whose outcome was set by hand" }),
    completeCases: z.number().int().meta({ description: "Taxa at risk with every chosen trait present: the multiple regression's sample" }),
  })
  .meta({ id: "RunBoundaryDesign" });
export type RunBoundaryDesign = z.infer<typeof runBoundaryDesignSchema>;

export const runPreviewSchema = z
  .object({
    boundaries: z.array(
      runBoundaryDesignSchema.extend({
        traits: z.array(runPreviewTraitSchema),
        summary: z.string().meta({ description: "The design in one plain-language paragraph" }),
      }),
    ),
  })
  .meta({ id: "RunPreview" });
export type RunPreview = z.infer<typeof runPreviewSchema>;

// ---------------------------------------------------------------- results (mirrors shared/selectivity/types.ts)

const ciSchema = z.tuple([z.number(), z.number()]);
const intervalSchema = z.object({ estimate: z.number(), ci: ciSchema });
const confoundingJudgementSchema = z
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
    encoding: z.object({
      traits: z.array(
        z.union([
          z.object({ key: z.string(), label: z.string(), kind: z.literal("states"), reference: z.string(), states: z.array(z.string()) }),
          z.object({ key: z.string(), label: z.string(), kind: z.literal("numeric"), transform: numericTransformSchema, center: z.number(), scale: z.number() }),
        ]),
      ),
      columns: z.array(encodingColumnSchema),
    }),
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
    }),
    confoundingMethod: z.string().optional().meta({ description: "How the confounding flag is decided, with citations" }),
    traits: z.array(traitResultSchema),
    model: modelResultSchema.nullable(),
    modelNote: z.string().nullable(),
  })
  .meta({ id: "SelectivityResult" });

// The zod schema and the analysis contract must describe the same object.
const resultSchemaMatchesContract: Same<z.infer<typeof selectivityResultSchema>, SelectivityResult> = true;
void resultSchemaMatchesContract;

export const runResultsSchema = z
  .object({
    boundaries: z.array(runBoundaryDesignSchema.extend({ result: selectivityResultSchema })),
    traits: z
      .array(z.object({ traitId: z.uuid(), key: z.string(), label: z.string() }))
      .meta({ description: "The traits tested, as the codebook named them when the run read it" }),
    cautions: cautionsSchema,
    robustness: runRobustnessSchema.optional().meta({ description: "Each contrast re-estimated under other windows, without each clade, without single-stage taxa and with last appearances recoded; absent in runs stored before this existed" }),
    crisisVersusBackground: runCrisisSchema.optional().meta({ description: "Crisis against background per trait, when the run names a crisis among several boundaries; absent in runs stored before this existed" }),
  })
  .meta({ id: "RunResults" });
export type RunResults = z.infer<typeof runResultsSchema>;

// ---------------------------------------------------------------- runs

export const runSummarySchema = z
  .object({
    id: z.uuid(),
    studyId: z.uuid(),
    name: z.string(),
    status: runStatusSchema,
    progress: z.number().meta({ description: "0..1 while queued or running" }),
    progressNote: z.string().nullable().meta({ description: "What the computation is doing now" }),
    params: runParamsSchema,
    dataHash: z.string().nullable().meta({ description: "SHA-256 (hex) of the canonical serialisation of exactly the data the run read; null until it has read them" }),
    dataHashShort: z.string().nullable().meta({ description: "The first 12 hex digits of dataHash" }),
    rowCount: z.number().int().nullable().meta({ description: "Taxon rows the run read: survivors and victims, summed over its boundaries" }),
    error: z.string().nullable().meta({ description: "Why the run failed" }),
    appVersion: z.string(),
    attempt: z.number().int().meta({ description: "1, plus one for each retry" }),
    rerunOf: z.uuid().nullable().meta({ description: "The run whose parameters this one re-ran on the data of its day" }),
    createdBy: personOrNoneSchema,
    createdAt: isoDateSchema,
    startedAt: isoDateSchema.nullable(),
    finishedAt: isoDateSchema.nullable(),
    heartbeatAt: isoDateSchema.nullable().meta({ description: "Last sign of life of the process computing the run; while queued, when the attempt was queued" }),
  })
  .meta({ id: "RunSummary" });
export type RunSummary = z.infer<typeof runSummarySchema>;

export const runSchema = runSummarySchema.extend({ results: runResultsSchema.nullable().meta({ description: "Stored results; null until the run succeeds" }) }).meta({ id: "Run" });
export type Run = z.infer<typeof runSchema>;

export const runParamsPathSchema = z.object({ studyId: uuidSchema, runId: uuidSchema });

export const runListQuerySchema = z.object({
  page: z.coerce.number({ message: "page must be a whole number from 1" }).int("page must be a whole number from 1").min(1, "page must be a whole number from 1").default(1),
  pageSize: z.coerce
    .number({ message: `pageSize must be a whole number from 1 to ${RUN_MAX_PAGE_SIZE}` })
    .int(`pageSize must be a whole number from 1 to ${RUN_MAX_PAGE_SIZE}`)
    .min(1, `pageSize must be a whole number from 1 to ${RUN_MAX_PAGE_SIZE}`)
    .max(RUN_MAX_PAGE_SIZE, `pageSize must be a whole number from 1 to ${RUN_MAX_PAGE_SIZE}`)
    .default(20),
});
export type RunListQuery = z.input<typeof runListQuerySchema>;

export const runListSchema = z
  .object({
    total: z.number().int(),
    page: z.number().int(),
    pageSize: z.number().int(),
    runs: z.array(runSummarySchema).meta({ description: "Newest first" }),
  })
  .meta({ id: "RunList" });
export type RunList = z.infer<typeof runListSchema>;

// ---------------------------------------------------------------- comparison of two runs

const pairSchema = z.object({ base: z.number().nullable(), run: z.number().nullable() });

export const runDiffSchema = z
  .object({
    base: runSummarySchema.meta({ description: "The run compared against (?against=)" }),
    run: runSummarySchema,
    hashChanged: z.boolean().meta({ description: "The two runs read different data" }),
    rowCount: pairSchema.extend({ change: z.number().nullable() }),
    paramsChanged: z.array(z.string()).meta({ description: "Parameters that differ, in words; empty when the same analysis was run" }),
    boundaries: z.array(
      z.object({
        boundaryMa: z.number(),
        windowMyr: pairSchema,
        label: z.string(),
        presence: z.enum(["both", "baseOnly", "runOnly"]),
        victims: pairSchema,
        survivors: pairSchema,
        completeCases: pairSchema,
        traits: z.array(
          z.object({
            key: z.string(),
            label: z.string(),
            presence: z.enum(["both", "baseOnly", "runOnly"]),
            used: pairSchema,
            pValue: pairSchema,
            adjustedPValue: pairSchema,
            contrasts: z.array(
              z.object({
                contrast: z.string(),
                crudeOddsRatio: pairSchema,
                cladeAdjustedOddsRatio: pairSchema,
                modelAdjustedOddsRatio: pairSchema,
                flagged: z.object({ base: z.boolean().nullable(), run: z.boolean().nullable() }),
                changed: z.boolean().meta({ description: "Any number or flag of this contrast differs" }),
              }),
            ),
            changed: z.boolean().meta({ description: "Any number of this trait differs" }),
          }),
        ),
      }),
    ),
  })
  .meta({ id: "RunDiff" });
export type RunDiff = z.infer<typeof runDiffSchema>;

export const runDiffQuerySchema = z.object({ against: uuidSchema.meta({ description: "The run to compare with" }) });

// ---------------------------------------------------------------- export

export const RUN_EXPORT_TABLES = ["run", "design", "states", "tests", "contrasts", "coefficients", "terms", "crisis", "robustness"] as const;
export type RunExportTable = (typeof RUN_EXPORT_TABLES)[number];

export const runExportQuerySchema = exportQuerySchema(
  RUN_EXPORT_TABLES,
  "json",
  "run: name, parameters, data hash and cautions as field and value; design, states: extinction proportions per trait state, tests, contrasts: odds ratios crude and adjusted, coefficients and terms of the multiple regression; crisis: crisis against background per trait contrast (background, crisis and ratio of odds ratios, the adjusted likelihood-ratio test); robustness: each contrast's crude and adjusted odds ratio under every variant of the robustness panel, with its verdicts",
);
export type RunExportQuery = z.input<typeof runExportQuerySchema>;

/** The re-run download of a finished run (binary). */
export const replicationZipSchema = z
  .string()
  .meta({ id: "RunReplicationZip", format: "binary", description: "A zip of the rows a run analysed, its parameters and results, and an R script that recomputes them" });
