// The runs API: a selectivity analysis configured once (runParams.ts), previewed as counts,
// computed as a job, stored with a hash of the exact data it read and its results
// (selectivityResult.ts, runChecks.ts), reopened without recomputing, re-run on today's data,
// compared side by side (runDiff.ts) and exported. The input and result schemas are exported from
// here too, so a screen imports a run's shapes from one place.
import { z } from "zod";
import { cautionsSchema, exportQuerySchema, isoDateSchema, uuidSchema } from "./common";
import { numericTransformSchema, traitKindSchema } from "./traits";
import { runCrisisSchema, runRobustnessSchema } from "./runChecks";
import { runParamsSchema } from "./runParams";
import { selectivityResultSchema } from "./selectivityResult";
import { savedAnalysisSummarySchema } from "./savedAnalysis";
import { samplingCheckSchema } from "./samplingCheck";

export * from "./runParams";
export * from "./selectivityResult";

/** Largest page of the run list. */
export const RUN_MAX_PAGE_SIZE = 100;

export const RUN_STATUSES = ["queued", "running", "succeeded", "failed"] as const;
export const runStatusSchema = z
  .enum(RUN_STATUSES)
  .meta({ id: "RunStatus", description: "queued: waiting for a process to take the job; running: being computed; succeeded: results stored; failed: see `error`" });
export type RunStatus = z.infer<typeof runStatusSchema>;

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

// ---------------------------------------------------------------- results

export const runResultsSchema = z
  .object({
    boundaries: z.array(
      runBoundaryDesignSchema.extend({
        result: selectivityResultSchema,
        sampling: samplingCheckSchema
          .nullable()
          .optional()
          .meta({ description: "Each trait's odds ratio with and without the sampling covariates, when the run asked for them; absent otherwise and in runs stored before this existed" }),
      }),
    ),
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

export const runSummarySchema = savedAnalysisSummarySchema
  .extend({
    status: runStatusSchema,
    progress: z.number().meta({ description: "0..1 while queued or running" }),
    progressNote: z.string().nullable().meta({ description: "What the computation is doing now" }),
    params: runParamsSchema,
    dataHash: z.string().nullable().meta({ description: "SHA-256 (hex) of the canonical serialisation of exactly the data the run read; null until it has read them" }),
    dataHashShort: z.string().nullable().meta({ description: "The first 12 hex digits of dataHash" }),
    rowCount: z.number().int().nullable().meta({ description: "Taxon rows the run read: survivors and victims, summed over its boundaries" }),
    error: z.string().nullable().meta({ description: "Why the run failed" }),
    attempt: z.number().int().meta({ description: "1, plus one for each retry" }),
    rerunOf: z.uuid().nullable().meta({ description: "The run whose parameters this one re-ran on the data of its day" }),
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

// ---------------------------------------------------------------- export

export const RUN_EXPORT_TABLES = ["run", "design", "states", "tests", "contrasts", "coefficients", "terms", "crisis", "robustness", "sampling"] as const;
export type RunExportTable = (typeof RUN_EXPORT_TABLES)[number];

export const runExportQuerySchema = exportQuerySchema(
  RUN_EXPORT_TABLES,
  "json",
  "run: name, parameters, data hash and cautions as field and value; design, states: extinction proportions per trait state, tests, contrasts: odds ratios crude and adjusted, coefficients and terms of the multiple regression; crisis: crisis against background per trait contrast (background, crisis and ratio of odds ratios, the adjusted likelihood-ratio test); robustness: each contrast's crude and adjusted odds ratio under every variant of the robustness panel, with its verdicts; sampling: each contrast's odds ratio without and with the sampling covariates, and whether it holds",
);
export type RunExportQuery = z.input<typeof runExportQuerySchema>;

/** The re-run download of a finished run (binary). */
export const replicationZipSchema = z
  .string()
  .meta({ id: "RunReplicationZip", format: "binary", description: "A zip of the rows a run analysed, its parameters and results, and an R script that recomputes them" });
