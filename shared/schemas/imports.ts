// The CSV import API: upload (parsed and kept outside the served folder), map columns, preview
// every problem by row and column, commit in one transaction (or nothing), list, revert.
import { z } from "zod";
import { isoDateSchema, uuidSchema } from "./common";
import { decisionUserSchema, reasonSchema } from "./taxa";
import { importChecksSchema, nameMergesSchema } from "./importChecks";

export const IMPORT_MAX_BYTES = 50 * 1024 * 1024;
/** The limit as the upload screen states it. */
export const IMPORT_MAX_LABEL = "50 MB";
/** Problems one preview or refused commit lists; the count is always complete. */
export const IMPORT_MAX_PROBLEMS_LISTED = 5000;

const headerSchema = z.string({ message: "Choose a column" }).min(1, "Choose a column");

/**
 * Which CSV column (by its header) fills which part of a taxon. A range column may hold ages in
 * Ma or names of units of the time scale, row by row.
 */
export const importMappingSchema = z
  .strictObject({
    name: headerSchema.meta({ description: "The column holding taxon names (required)" }),
    higherTaxon: headerSchema.nullable().default(null),
    firstAppearance: headerSchema.nullable().default(null).meta({ description: "Ages in Ma or interval names (an interval's base)" }),
    lastAppearance: headerSchema.nullable().default(null).meta({ description: "Ages in Ma or interval names (an interval's top)" }),
    notes: headerSchema.nullable().default(null),
    traits: z.record(uuidSchema, headerSchema).default({}).meta({ description: "Trait id -> column" }),
  })
  .superRefine((m, ctx) => {
    const seen = new Map<string, string>();
    const use = (header: string | null, target: string, path: string[]) => {
      if (header === null) return;
      const other = seen.get(header);
      if (other) ctx.addIssue({ code: "custom", path, message: `Column "${header}" is already mapped to ${other}` });
      else seen.set(header, target);
    };
    use(m.name, "name", ["name"]);
    use(m.higherTaxon, "higher taxon", ["higherTaxon"]);
    use(m.firstAppearance, "first appearance", ["firstAppearance"]);
    use(m.lastAppearance, "last appearance", ["lastAppearance"]);
    use(m.notes, "notes", ["notes"]);
    for (const [traitId, header] of Object.entries(m.traits)) use(header, "a trait", ["traits", traitId]);
  })
  .meta({ id: "ImportMapping" });
export type ImportMapping = z.output<typeof importMappingSchema>;
export type ImportMappingInput = z.input<typeof importMappingSchema>;

/** A suggested mapping: like ImportMapping, but the name column may still be unknown. */
export const importMappingDraftSchema = z
  .object({
    name: z.string().nullable(),
    higherTaxon: z.string().nullable(),
    firstAppearance: z.string().nullable(),
    lastAppearance: z.string().nullable(),
    notes: z.string().nullable(),
    traits: z.record(z.string(), z.string()),
  })
  .meta({ id: "ImportMappingDraft" });
export type ImportMappingDraft = z.infer<typeof importMappingDraftSchema>;

export const IMPORT_STATUSES = ["previewed", "committing", "committed", "reverted", "discarded"] as const;

export const importSummarySchema = z
  .object({
    id: z.uuid(),
    fileName: z.string(),
    status: z.enum(IMPORT_STATUSES).meta({ description: "previewed: uploaded, not yet written; committing: being written (see progress)" }),
    progress: z.number().meta({ description: "0 to 1 while committing; 1 once committed" }),
    rowCount: z.number().int(),
    validCount: z.number().int(),
    errorCount: z.number().int(),
    createdCount: z.number().int(),
    updatedCount: z.number().int(),
    skippedInvalid: z.number().int().meta({ description: "Invalid rows left out because skipping was chosen" }),
    failureReason: z.string().nullable().meta({ description: "Why the last commit attempt failed (nothing was written)" }),
    createdBy: decisionUserSchema,
    createdAt: isoDateSchema,
    committedAt: isoDateSchema.nullable(),
    revertedAt: isoDateSchema.nullable(),
    revertedBy: decisionUserSchema,
  })
  .meta({ id: "ImportSummary" });
export type ImportSummary = z.infer<typeof importSummarySchema>;

export const csvDelimiterSchema = z.enum([",", ";", "\t"]).meta({ id: "CsvDelimiter" });

export const importUploadSchema = z
  .object({
    import: importSummarySchema,
    columns: z.array(z.string()).meta({ description: "Header names, in file order" }),
    delimiter: csvDelimiterSchema,
    encoding: z.enum(["utf-8", "utf-16le", "utf-16be", "windows-1252"]).meta({ description: "From the byte-order mark; else utf-8, or windows-1252 when the file is not valid UTF-8" }),
    hadBom: z.boolean(),
    rowCount: z.number().int().meta({ description: "Data rows (blank lines not counted)" }),
    sampleRows: z.array(z.array(z.string())).meta({ description: "The first 10 data rows, cells in column order" }),
    suggestedMapping: importMappingDraftSchema,
    rememberedColumns: z.array(z.string()).meta({ description: "Columns mapped as this study mapped them last time" }),
    maxBytes: z.number().int(),
  })
  .meta({ id: "ImportUpload" });
export type ImportUpload = z.infer<typeof importUploadSchema>;

export const importUploadFormSchema = z
  .object({ file: z.string().meta({ format: "binary", description: "The CSV file (comma, semicolon or tab separated; UTF-8 with or without BOM)" }) })
  .meta({ id: "ImportUploadForm" });

export const importProblemSchema = z
  .object({
    row: z.number().int().meta({ description: "Row as a spreadsheet shows it: the header is row 1" }),
    column: z.string().nullable().meta({ description: "The CSV header of the cell at fault" }),
    message: z.string(),
  })
  .meta({ id: "ImportProblem" });
export type ImportProblem = z.infer<typeof importProblemSchema>;

export const importPreviewRequestSchema = z.strictObject({ mapping: importMappingSchema, nameMerges: nameMergesSchema, higherTaxonMerges: nameMergesSchema }).meta({ id: "ImportPreviewRequest" });
export type ImportPreviewRequest = z.input<typeof importPreviewRequestSchema>;

export const importCountsSchema = z
  .object({
    rows: z.number().int(),
    valid: z.number().int(),
    invalid: z.number().int(),
    create: z.number().int().meta({ description: "Valid rows that add a taxon" }),
    update: z.number().int().meta({ description: "Valid rows that change a taxon of the same name" }),
    unchanged: z.number().int().meta({ description: "Valid rows that match a taxon exactly" }),
  })
  .meta({ id: "ImportCounts" });

export const importPreviewSchema = z
  .object({
    import: importSummarySchema,
    counts: importCountsSchema,
    problems: z.array(importProblemSchema).meta({ description: `By row then column; at most ${IMPORT_MAX_PROBLEMS_LISTED} listed` }),
    problemCount: z.number().int(),
    sample: z
      .array(
        z.object({
          row: z.number().int(),
          name: z.string(),
          action: z.enum(["create", "update", "unchanged"]),
          changes: z.array(z.object({ field: z.string(), traitId: z.uuid().nullable(), from: z.unknown(), to: z.unknown() })),
        }),
      )
      .meta({ description: "The first 50 valid rows and what committing them changes" }),
    notes: z.array(z.string()).meta({ description: "How the mapping is read, e.g. that empty cells keep existing values" }),
    checks: importChecksSchema.meta({ description: "Warnings that do not block a commit: implausible ages, similar names, missing-value tokens read, qualified higher taxa" }),
  })
  .meta({ id: "ImportPreview" });
export type ImportPreview = z.infer<typeof importPreviewSchema>;

export const importCommitSchema = z
  .strictObject({
    mapping: importMappingSchema,
    nameMerges: nameMergesSchema,
    higherTaxonMerges: nameMergesSchema,
    skipInvalid: z.boolean({ message: "skipInvalid is required: say whether invalid rows are left out (true) or block the import (false)" }),
    reason: reasonSchema.default("").meta({ description: "Recorded on every coding decision; default: the file name" }),
  })
  .meta({ id: "ImportCommit" });
export type ImportCommitInput = z.input<typeof importCommitSchema>;

/** 400 answer of a commit with invalid rows and skipInvalid false: nothing was written. */
export const importProblemsErrorSchema = z
  .object({
    error: z.object({ code: z.literal("import_has_problems"), message: z.string() }),
    problems: z.array(importProblemSchema),
    problemCount: z.number().int(),
  })
  .meta({ id: "ImportProblemsError" });

export const importRevertSchema = z
  .strictObject({
    reason: reasonSchema.default(""),
    skipChanged: z.boolean().default(false).meta({ description: "Revert what is unchanged and leave values edited since the import alone; default: refuse (409) when any changed" }),
  })
  .meta({ id: "ImportRevert" });
export type ImportRevertInput = z.input<typeof importRevertSchema>;

export const importRevertResultSchema = z
  .object({
    import: importSummarySchema,
    batchId: z.uuid(),
    reverted: z.number().int().meta({ description: "Decisions of the import reverted" }),
    skipped: z.number().int(),
  })
  .meta({ id: "ImportRevertResult" });
export type ImportRevertResult = z.infer<typeof importRevertResultSchema>;

export const importListQuerySchema = z.object({
  page: z.coerce.number({ message: "page must be a whole number from 1" }).int("page must be a whole number from 1").min(1, "page must be a whole number from 1").default(1),
  pageSize: z.coerce
    .number({ message: "pageSize must be a whole number from 1 to 200" })
    .int("pageSize must be a whole number from 1 to 200")
    .min(1, "pageSize must be a whole number from 1 to 200")
    .max(200, "pageSize must be a whole number from 1 to 200")
    .default(50),
});

export const importListSchema = z
  .object({ rows: z.array(importSummarySchema).meta({ description: "Newest first" }), total: z.number().int(), page: z.number().int(), pageSize: z.number().int() })
  .meta({ id: "ImportList" });
export type ImportList = z.infer<typeof importListSchema>;

export const importParamsSchema = z.object({ studyId: uuidSchema, importId: uuidSchema });
