// The comparisons API: a saved run's fitted model (one boundary of it) scored on a modern list
// through the list's crosswalk, and held against the listed threat categories. Saved like a run:
// parameters, a hash of the exact data read, results, who and when; exported as CSV.
import { z } from "zod";
import { exportQuerySchema, uuidSchema, cautionsSchema } from "./common";
import { confidenceLevelSchema, savedAnalysisSummarySchema } from "./savedAnalysis";
import { crosswalkSchema, iucnCategorySchema, listNameSchema } from "./modernLists";

/** Default probability from which a species listed LC or DD is "worth a look": more likely than not to have died out in the past crisis. */
export const DEFAULT_WORTH_A_LOOK_MIN = 0.5;

export const comparisonParamsSchema = z
  .strictObject({
    name: listNameSchema,
    listId: uuidSchema.meta({ description: "The modern list (its saved crosswalk is used)" }),
    runId: uuidSchema.meta({ description: "A succeeded run whose fitted model scores the species" }),
    boundaryIndex: z
      .number({ message: "boundaryIndex must be a whole number from 0" })
      .int("boundaryIndex must be a whole number from 0")
      .min(0, "boundaryIndex must be a whole number from 0")
      .default(0)
      .meta({ description: "Which of the run's boundaries (0 = the first); default 0" }),
    worthALookMin: z
      .number({ message: "Worth-a-look threshold must be a probability between 0.01 and 0.99" })
      .min(0.01, "Worth-a-look threshold must be at least 0.01")
      .max(0.99, "Worth-a-look threshold must be at most 0.99")
      .default(DEFAULT_WORTH_A_LOOK_MIN)
      .meta({ description: "Species listed LC or DD predicted at least this likely to have died out in the past crisis are listed as worth a look; default 0.5" }),
    level: confidenceLevelSchema,
  })
  .meta({ id: "ComparisonParams" });
export type ComparisonParamsInput = z.input<typeof comparisonParamsSchema>;
export type ComparisonParams = z.output<typeof comparisonParamsSchema>;

const ciSchema = z.tuple([z.number(), z.number()]);
const groupSchema = z.enum(["threatened", "notThreatened", "extinct", "noRiskLevel"]);
const scoredSpeciesSchema = z.object({
  name: z.string(),
  higherTaxon: z.string(),
  category: iucnCategorySchema,
  group: groupSchema,
  probability: z.number().nullable().meta({ description: "Predicted probability of extinction under the past crisis's selectivity" }),
  ci: ciSchema.nullable(),
  reason: z.string().nullable().meta({ description: "Why the species has no score" }),
});
const threeWay = z.object({ threatened: z.number().int(), notThreatened: z.number().int(), excluded: z.number().int() });

export const comparisonResultSchema = z
  .object({
    counts: z.object({
      species: z.number().int(),
      byCategory: z.record(iucnCategorySchema, z.number().int()),
      threatened: z.number().int().meta({ description: "Listed CR, EN or VU" }),
      notThreatened: z.number().int().meta({ description: "Listed NT or LC" }),
      excluded: z.object({ EX: z.number().int(), EW: z.number().int(), DD: z.number().int(), NE: z.number().int() }).meta({ description: "Kept out of the threatened-against-not comparison" }),
      excludedTotal: z.number().int(),
      scored: threeWay,
      unscored: threeWay,
    }),
    unscoredReasons: z.array(z.object({ reason: z.string(), count: z.number().int(), examples: z.array(z.string()) })),
    roc: z
      .object({
        auc: z.number(),
        se: z.number().meta({ description: "DeLong's standard error (at an area of 0 or 1: half the score interval's width over z)" }),
        ci: ciSchema,
        seMethod: z.enum(["delong", "score-interval"]).optional(),
        ciMethod: z.string().optional().meta({ description: "Score interval inverting the Hanley-McNeil variance; holds at 0 and 1" }),
        verdict: z.enum(["better-than-chance", "worse-than-chance", "no-verdict"]).optional().meta({ description: "A verdict only when the interval excludes 0.5 and each group has enough species" }),
        smallSample: z.boolean().optional(),
        level: z.number(),
        mannWhitneyU: z.number(),
        cases: z.number().int(),
        controls: z.number().int(),
        points: z.array(z.object({ falsePositiveRate: z.number(), truePositiveRate: z.number(), threshold: z.number().nullable() })),
      })
      .nullable(),
    rocNote: z.string().nullable(),
    spearman: z
      .object({
        rho: z.number(),
        statistic: z.number().nullable(),
        df: z.number(),
        pValue: z.number(),
        method: z.enum(["exact-permutation", "t-approximation"]).optional(),
        n: z.number().int(),
      })
      .nullable(),
    spearmanNote: z.string().nullable(),
    traits: z.array(
      z.object({
        key: z.string(),
        label: z.string(),
        kind: z.enum(["states", "numeric"]),
        contrasts: z.array(
          z.object({
            contrast: z.string(),
            state: z.string().nullable(),
            reference: z.string().nullable(),
            today: z
              .object({
                estimate: z.number(),
                ci: ciSchema,
                method: z.string(),
                table: z.tuple([z.tuple([z.number(), z.number()]), z.tuple([z.number(), z.number()])]).nullable(),
                n: z.number().int(),
              })
              .nullable()
              .meta({ description: "Odds ratio of being threatened today (CR, EN, VU against NT, LC)" }),
            todayNote: z.string().nullable(),
            pastCrude: z.object({ estimate: z.number(), ci: ciSchema, method: z.string() }).nullable().meta({ description: "Crude odds ratio of extinction in the past crisis" }),
            pastModelAdjusted: z.object({ estimate: z.number(), ci: ciSchema }).nullable(),
          }),
        ),
      }),
    ),
    worthALook: z.array(scoredSpeciesSchema.extend({ rank: z.number().int() })).meta({ description: "Listed LC or DD, predicted at least worthALookMin; highest first" }),
    species: z.array(scoredSpeciesSchema),
    notes: z.array(z.string()),
  })
  .meta({ id: "ComparisonResult" });

/** What holding the past selectivity against a threat list gives (the type of shared/comparison's result). */
export type ComparisonResult = z.infer<typeof comparisonResultSchema>;

export const comparisonResultsSchema = comparisonResultSchema
  .extend({
    run: z.object({ id: z.uuid(), name: z.string(), dataHash: z.string().nullable(), boundaryLabel: z.string(), boundaryMa: z.number(), modelMethod: z.string(), modelN: z.number().int() }),
    list: z.object({ id: z.uuid(), name: z.string(), speciesCount: z.number().int() }),
    crosswalk: crosswalkSchema.meta({ description: "The crosswalk as it was when the comparison read the list" }),
    crosswalkLabels: z.array(z.object({ traitId: z.uuid(), traitKey: z.string(), traitLabel: z.string(), column: z.string() })),
    cautions: cautionsSchema,
  })
  .meta({ id: "ComparisonResults" });
export type ComparisonResults = z.infer<typeof comparisonResultsSchema>;

export const comparisonSummarySchema = savedAnalysisSummarySchema
  .extend({
    listId: z.uuid(),
    listName: z.string(),
    runId: z.uuid(),
    runName: z.string(),
    params: comparisonParamsSchema,
    dataHash: z.string().meta({ description: "SHA-256 (hex) of the exact data read: the species as read through the crosswalk, the crosswalk, and the run's model" }),
    dataHashShort: z.string(),
    auc: z.number().nullable(),
    worthALookCount: z.number().int(),
  })
  .meta({ id: "ComparisonSummary" });
export type ComparisonSummary = z.infer<typeof comparisonSummarySchema>;

export const comparisonSchema = comparisonSummarySchema.extend({ results: comparisonResultsSchema }).meta({ id: "Comparison" });
export type Comparison = z.infer<typeof comparisonSchema>;

export const comparisonListSchema = z.object({ comparisons: z.array(comparisonSummarySchema).meta({ description: "Newest first" }) }).meta({ id: "ComparisonList" });
export type ComparisonList = z.infer<typeof comparisonListSchema>;

export const comparisonParamsPathSchema = z.object({ studyId: uuidSchema, comparisonId: uuidSchema });

export const COMPARISON_EXPORT_TABLES = ["comparison", "species", "traits", "worth_a_look", "roc"] as const;
export type ComparisonExportTable = (typeof COMPARISON_EXPORT_TABLES)[number];

export const comparisonExportQuerySchema = exportQuerySchema(
  COMPARISON_EXPORT_TABLES,
  "csv",
  "comparison: parameters, data hash, counts, AUC, Spearman and cautions as field and value; species: every species with its score; traits: odds ratios today and in the past; worth_a_look; roc: the curve's points",
);
export type ComparisonExportQuery = z.input<typeof comparisonExportQuerySchema>;
