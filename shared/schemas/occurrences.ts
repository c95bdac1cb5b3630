// Occurrences (dated finds of taxa): upload through the import steps (map columns, preview with row
// problems, commit all or nothing, revert), ranges derived from them (preview, then apply chosen
// changes as coding decisions), and three-timer sampling per stage.
import { z } from "zod";
import { AGE_LIMIT_MA, uuidSchema } from "./common";
import { importSummarySchema } from "./imports";
import { importChecksSchema, nameMergesSchema } from "./importChecks";
import { reasonSchema } from "./taxa";

/** Problems one preview or refused commit lists; the count is always complete. */
export const OCCURRENCE_MAX_PROBLEMS_LISTED = 5000;
/** The Earth's age in Ma: no find is older (common practice: 4.567 Ga, the age of the oldest solids of the solar system). */
export const EARTH_AGE_MA = AGE_LIMIT_MA;

const headerSchema = z.string({ message: "Choose a column" }).min(1, "Choose a column");
const optionalHeader = headerSchema.nullable().default(null);

export const NO_AGE_COLUMNS_MESSAGE =
  "No age columns: an occurrence table needs the age of each find, as a maximum and minimum age in Ma or as early and late interval names. Map at least one of them; this file cannot be read as occurrences without.";

/** Which column (by its header) fills which part of an occurrence. */
export const occurrenceMappingSchema = z
  .strictObject({
    taxon: headerSchema.meta({ description: "The column holding taxon names (required)" }),
    higherTaxon: optionalHeader,
    maxMa: optionalHeader.meta({ description: "Maximum (oldest) age in Ma" }),
    minMa: optionalHeader.meta({ description: "Minimum (youngest) age in Ma; without it each find is dated to the single age of maxMa" }),
    earlyInterval: optionalHeader.meta({ description: "Interval name of the oldest possible age (its base); used where the Ma cells are empty" }),
    lateInterval: optionalHeader.meta({ description: "Interval name of the youngest possible age (its top); empty means the same as earlyInterval" }),
    collection: optionalHeader.meta({ description: "Collection or locality id" }),
    count: optionalHeader.meta({ description: "Number of specimens or records the row stands for (a whole number >= 1)" }),
  })
  .superRefine((m, ctx) => {
    const seen = new Map<string, string>();
    const labels: Record<string, string> = {
      taxon: "taxon",
      higherTaxon: "higher taxon",
      maxMa: "maximum age",
      minMa: "minimum age",
      earlyInterval: "early interval",
      lateInterval: "late interval",
      collection: "collection",
      count: "count",
    };
    for (const [key, label] of Object.entries(labels)) {
      const header = m[key as keyof typeof m];
      if (header === null) continue;
      const other = seen.get(header);
      if (other) ctx.addIssue({ code: "custom", path: [key], message: `Column "${header}" is already mapped to ${other}` });
      else seen.set(header, label);
    }
    if (m.maxMa === null && m.minMa === null && m.earlyInterval === null && m.lateInterval === null) {
      ctx.addIssue({ code: "custom", path: ["maxMa"], message: NO_AGE_COLUMNS_MESSAGE });
    }
    if (m.minMa !== null && m.maxMa === null) ctx.addIssue({ code: "custom", path: ["maxMa"], message: "Choose the maximum age column too" });
    if (m.lateInterval !== null && m.earlyInterval === null) ctx.addIssue({ code: "custom", path: ["earlyInterval"], message: "Choose the early interval column too" });
  })
  .meta({ id: "OccurrenceMapping" });
export type OccurrenceMapping = z.output<typeof occurrenceMappingSchema>;
export type OccurrenceMappingInput = z.input<typeof occurrenceMappingSchema>;

/** A suggested mapping: like OccurrenceMapping, but any column may still be unknown. */
export const occurrenceMappingDraftSchema = z
  .object({
    taxon: z.string().nullable(),
    higherTaxon: z.string().nullable(),
    maxMa: z.string().nullable(),
    minMa: z.string().nullable(),
    earlyInterval: z.string().nullable(),
    lateInterval: z.string().nullable(),
    collection: z.string().nullable(),
    count: z.string().nullable(),
  })
  .meta({ id: "OccurrenceMappingDraft" });
export type OccurrenceMappingDraft = z.infer<typeof occurrenceMappingDraftSchema>;

export const occurrenceUploadSchema = z
  .object({
    upload: importSummarySchema,
    columns: z.array(z.string()),
    rowCount: z.number().int().meta({ description: "Data rows (blank lines not counted)" }),
    sampleRows: z.array(z.array(z.string())).meta({ description: "The first 10 data rows, cells in column order" }),
    suggestedMapping: occurrenceMappingDraftSchema,
    ageColumnsFound: z.boolean().meta({ description: "Whether any column looks like an age or interval column" }),
  })
  .meta({ id: "OccurrenceUpload" });
export type OccurrenceUpload = z.infer<typeof occurrenceUploadSchema>;

export const DUPLICATE_HANDLING = ["keep", "drop"] as const;
const duplicatesSchema = z
  .enum(DUPLICATE_HANDLING, { message: "duplicates must be keep or drop" })
  .default("keep")
  .meta({ description: "Rows identical to an earlier row in every mapped column: keep them (default) or drop them" });

export const occurrencePreviewRequestSchema = z.strictObject({ mapping: occurrenceMappingSchema, duplicates: duplicatesSchema, nameMerges: nameMergesSchema, higherTaxonMerges: nameMergesSchema }).meta({ id: "OccurrencePreviewRequest" });
export type OccurrencePreviewRequest = z.input<typeof occurrencePreviewRequestSchema>;

export const occurrenceProblemSchema = z
  .object({
    row: z.number().int().meta({ description: "Row as a spreadsheet shows it: the header is row 1, so the first data row is row 2" }),
    taxon: z.string().meta({ description: "The row's taxon name as written (may be empty)" }),
    column: z.string().nullable().meta({ description: "The CSV header of the cell at fault" }),
    message: z.string(),
    suggestions: z.array(z.string()).optional().meta({ description: "For an unknown interval name: the closest names of the chart" }),
  })
  .meta({ id: "OccurrenceProblem" });
export type OccurrenceProblem = z.infer<typeof occurrenceProblemSchema>;

export const occurrenceDuplicateSchema = z
  .object({ row: z.number().int(), firstRow: z.number().int().meta({ description: "The earlier row it repeats" }), taxon: z.string() })
  .meta({ id: "OccurrenceDuplicate" });

export const occurrenceRowSchema = z
  .object({
    row: z.number().int(),
    taxon: z.string(),
    higherTaxon: z.string().nullable(),
    maxMa: z.number(),
    minMa: z.number(),
    earlyInterval: z.string().nullable(),
    lateInterval: z.string().nullable(),
    collection: z.string().nullable(),
    count: z.number().int().nullable(),
  })
  .meta({ id: "OccurrenceRow" });
export type OccurrenceRow = z.infer<typeof occurrenceRowSchema>;

export const occurrencePreviewSchema = z
  .object({
    upload: importSummarySchema,
    counts: z.object({
      rows: z.number().int(),
      valid: z.number().int().meta({ description: "Rows a commit writes (duplicates left out when dropping them)" }),
      invalid: z.number().int(),
      duplicates: z.number().int(),
      taxa: z.number().int().meta({ description: "Distinct taxon names among the valid rows" }),
    }),
    problems: z.array(occurrenceProblemSchema).meta({ description: `By row; at most ${OCCURRENCE_MAX_PROBLEMS_LISTED} listed` }),
    problemCount: z.number().int(),
    duplicates: z.array(occurrenceDuplicateSchema).meta({ description: `At most ${OCCURRENCE_MAX_PROBLEMS_LISTED} listed` }),
    sample: z.array(occurrenceRowSchema).meta({ description: "The first 20 valid rows as they would be stored" }),
    notes: z.array(z.string()),
    checks: importChecksSchema.meta({ description: "Warnings that do not block a commit: implausible ages, similar names, missing-value tokens read, qualified higher taxa" }),
  })
  .meta({ id: "OccurrencePreview" });
export type OccurrencePreview = z.infer<typeof occurrencePreviewSchema>;

export const occurrenceCommitSchema = z
  .strictObject({
    mapping: occurrenceMappingSchema,
    duplicates: duplicatesSchema,
    nameMerges: nameMergesSchema,
    higherTaxonMerges: nameMergesSchema,
    skipInvalid: z.boolean({ message: "skipInvalid is required: say whether invalid rows are left out (true) or block the upload (false)" }),
  })
  .meta({ id: "OccurrenceCommit" });
export type OccurrenceCommitInput = z.input<typeof occurrenceCommitSchema>;

export const occurrenceProblemsErrorSchema = z
  .object({
    error: z.object({ code: z.literal("occurrences_have_problems"), message: z.string() }),
    problems: z.array(occurrenceProblemSchema),
    problemCount: z.number().int(),
  })
  .meta({ id: "OccurrenceProblemsError" });

export const occurrenceRevertResultSchema = z
  .object({ upload: importSummarySchema, removed: z.number().int().meta({ description: "Occurrences removed" }) })
  .meta({ id: "OccurrenceRevertResult" });
export type OccurrenceRevertResult = z.infer<typeof occurrenceRevertResultSchema>;

export const occurrenceUploadListSchema = z.object({ rows: z.array(importSummarySchema).meta({ description: "Newest first" }) }).meta({ id: "OccurrenceUploadList" });
export type OccurrenceUploadList = z.infer<typeof occurrenceUploadListSchema>;

export const occurrenceUploadParamsSchema = z.object({ studyId: uuidSchema, uploadId: uuidSchema });

export const occurrenceListQuerySchema = z.object({
  taxon: z.string({ message: "taxon is required" }).trim().min(1, "taxon is required").max(500, "taxon must have at most 500 characters"),
});
export const storedOccurrenceSchema = occurrenceRowSchema.extend({ uploadId: z.uuid(), fileName: z.string() }).meta({ id: "StoredOccurrence" });
export const occurrenceListSchema = z
  .object({
    taxon: z.string(),
    occurrences: z.array(storedOccurrenceSchema).meta({ description: "Oldest first, at most 5,000" }),
    total: z.number().int(),
    collections: z.number().int().meta({ description: "Distinct non-empty collection ids" }),
  })
  .meta({ id: "OccurrenceList" });
export type OccurrenceList = z.infer<typeof occurrenceListSchema>;

// ---------------------------------------------------------------- ranges from occurrences

export const rangeDerivationSchema = z
  .strictObject({
    ageMode: z
      .enum(["bounds", "midpoint"], { message: "ageMode must be bounds or midpoint" })
      .default("bounds")
      .meta({ description: "bounds: the widest range the dates allow; midpoint: each find at the middle of its dates" }),
    maxSpanMyr: z
      .number({ message: "maxSpanMyr must be a number of Myr" })
      .positive("maxSpanMyr must be above 0")
      .max(5000, "maxSpanMyr must be at most 5,000")
      .nullable()
      .default(null)
      .meta({ description: "Leave out finds dated more coarsely than this (Myr); none left out unless given" }),
  })
  .meta({ id: "RangeDerivation" });
export type RangeDerivation = z.output<typeof rangeDerivationSchema>;
export type RangeDerivationInput = z.input<typeof rangeDerivationSchema>;

const derivedRangeSchema = z.object({
  taxon: z.string(),
  higherTaxon: z.string().nullable(),
  fadMa: z.number(),
  ladMa: z.number(),
  occurrences: z.number().int(),
  collections: z.number().int(),
});

export const rangesPreviewSchema = z
  .object({
    changes: z
      .array(derivedRangeSchema.extend({ taxonId: z.uuid(), oldFadMa: z.number().nullable(), oldLadMa: z.number().nullable() }))
      .meta({ description: "Taxa of the table whose range would change (old -> new)" }),
    newTaxa: z.array(derivedRangeSchema).meta({ description: "Names with occurrences that the table lacks" }),
    unchanged: z.number().int().meta({ description: "Taxa whose range already matches" }),
    withoutOccurrences: z
      .array(z.object({ taxonId: z.uuid(), name: z.string(), fadMa: z.number().nullable(), ladMa: z.number().nullable() }))
      .meta({ description: "Taxa of the table with no occurrence" }),
    dropped: z.object({ count: z.number().int(), reasons: z.array(z.string()).meta({ description: "The first 20 reasons" }) }),
    occurrenceCount: z.number().int(),
    uploads: z.array(z.object({ id: z.uuid(), fileName: z.string() })).meta({ description: "The committed uploads the ranges come from" }),
  })
  .meta({ id: "RangesPreview" });
export type RangesPreview = z.infer<typeof rangesPreviewSchema>;

export const rangesApplySchema = rangeDerivationSchema
  .extend({
    taxa: z
      .array(z.string().trim().min(1, "A taxon name must not be empty"), { message: "taxa must be a list of names" })
      .min(1, "Choose at least one taxon to apply")
      .max(200_000, "At most 200,000 taxa at once")
      .meta({ description: "Names to apply: a taxon of the table gets its derived range, a new name becomes a taxon" }),
    reason: reasonSchema.default("").meta({ description: "Added to the reason, which always names the uploads" }),
  })
  .meta({ id: "RangesApply" });
export type RangesApplyInput = z.input<typeof rangesApplySchema>;

export const rangesApplyResultSchema = z
  .object({
    batchId: z.uuid().meta({ description: "Revert all of it with POST /api/studies/{studyId}/decisions/batches/{batchId}/revert" }),
    changed: z.number().int(),
    created: z.number().int(),
    unchanged: z.number().int().meta({ description: "Chosen taxa whose range already matched" }),
    reason: z.string(),
  })
  .meta({ id: "RangesApplyResult" });
export type RangesApplyResult = z.infer<typeof rangesApplyResultSchema>;

// ---------------------------------------------------------------- three-timer sampling

export const threeTimerRowSchema = z
  .object({
    bin: z.string(),
    label: z.string(),
    baseMa: z.number(),
    topMa: z.number(),
    t3: z.number().int(),
    partTimers: z.number().int(),
    t2Below: z.number().int(),
    t2Above: z.number().int(),
    sampled: z.number().int(),
    occurrences: z.number().int(),
    samplingCompleteness: z.number().nullable(),
    extinction: z.number().nullable(),
    origination: z.number().nullable(),
  })
  .meta({ id: "ThreeTimerRow" });
export type ThreeTimerRowDto = z.infer<typeof threeTimerRowSchema>;

export const threeTimerQuerySchema = z.object({
  boundaryMa: z.coerce.number({ message: "boundaryMa must be an age in Ma" }).min(0, "boundaryMa must be an age in Ma").max(EARTH_AGE_MA).optional(),
});

export const threeTimerSchema = z
  .object({
    method: z.string(),
    stages: z.array(threeTimerRowSchema).meta({ description: "Stages of the chart, oldest first, from the oldest to the youngest with an occurrence" }),
    occurrenceCount: z.number().int(),
    straddling: z.number().int().meta({ description: "Occurrences dated across a stage limit, counted in no stage" }),
    boundary: z
      .object({
        boundaryMa: z.number(),
        below: threeTimerRowSchema.nullable().meta({ description: "The stage just below (older than) the boundary" }),
        above: threeTimerRowSchema.nullable().meta({ description: "The stage just above (younger than) the boundary" }),
        warnings: z.array(z.string()),
      })
      .nullable(),
  })
  .meta({ id: "ThreeTimer" });
export type ThreeTimer = z.infer<typeof threeTimerSchema>;
