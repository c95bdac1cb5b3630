// The modern lists API: a species list with threat categories uploaded in three steps (upload, map
// and preview every problem by row and column, commit all or nothing), and its crosswalk onto the
// study's codebook (list columns -> traits, list values -> states).
import { z } from "zod";
import { IUCN_CATEGORIES } from "../iucn";
import { isoDateSchema, oneLine, uuidSchema, personOrNoneSchema } from "./common";
import { csvDelimiterSchema, importProblemSchema, IMPORT_MAX_PROBLEMS_LISTED } from "./imports";
import { traitKindSchema } from "./traits";

/** A modern list is read whole into memory; 20 MB holds a few hundred thousand species. */
export const MODERN_LIST_MAX_BYTES = 20 * 1024 * 1024;
export const MODERN_LIST_MAX_LABEL = "20 MB";
/** Trait columns one list keeps. */
export const MODERN_LIST_MAX_TRAIT_COLUMNS = 60;

export const iucnCategorySchema = z
  .enum(IUCN_CATEGORIES)
  .meta({ id: "IucnCategory", description: "IUCN Red List Categories and Criteria 3.1: EX, EW, CR, EN, VU, NT, LC, DD, NE" });

const headerSchema = z.string({ message: "Choose a column" }).min(1, "Choose a column");

export const modernListMappingSchema = z
  .strictObject({
    name: headerSchema.meta({ description: "The column holding species names (required)" }),
    higherTaxon: headerSchema.nullable().default(null),
    category: headerSchema.meta({ description: "The column holding the threat category: an IUCN 3.1 code or name (required)" }),
    traitColumns: z
      .array(headerSchema)
      .max(MODERN_LIST_MAX_TRAIT_COLUMNS, `Keep at most ${MODERN_LIST_MAX_TRAIT_COLUMNS} trait columns`)
      .default([])
      .meta({ description: "Columns kept as the list's traits, to be paired with the codebook in the crosswalk" }),
  })
  .superRefine((m, ctx) => {
    const seen = new Map<string, string>();
    const use = (header: string | null, target: string, path: Array<string | number>) => {
      if (header === null) return;
      const other = seen.get(header);
      if (other) ctx.addIssue({ code: "custom", path, message: `Column "${header}" is already used for ${other}` });
      else seen.set(header, target);
    };
    use(m.name, "the species name", ["name"]);
    use(m.higherTaxon, "the higher taxon", ["higherTaxon"]);
    use(m.category, "the threat category", ["category"]);
    m.traitColumns.forEach((c, i) => use(c, "a trait column", ["traitColumns", i]));
  })
  .meta({ id: "ModernListMapping" });
export type ModernListMapping = z.output<typeof modernListMappingSchema>;
export type ModernListMappingInput = z.input<typeof modernListMappingSchema>;

export const modernListMappingDraftSchema = z
  .object({ name: z.string().nullable(), higherTaxon: z.string().nullable(), category: z.string().nullable(), traitColumns: z.array(z.string()) })
  .meta({ id: "ModernListMappingDraft" });
export type ModernListMappingDraft = z.infer<typeof modernListMappingDraftSchema>;

export const MODERN_UPLOAD_STATUSES = ["previewed", "committing", "committed", "discarded"] as const;

export const modernUploadSummarySchema = z
  .object({
    id: z.uuid(),
    fileName: z.string(),
    status: z.enum(MODERN_UPLOAD_STATUSES),
    rowCount: z.number().int(),
    validCount: z.number().int(),
    errorCount: z.number().int(),
    failureReason: z.string().nullable(),
    createdBy: personOrNoneSchema,
    createdAt: isoDateSchema,
  })
  .meta({ id: "ModernUploadSummary" });
export type ModernUploadSummary = z.infer<typeof modernUploadSummarySchema>;

export const modernListUploadSchema = z
  .object({
    upload: modernUploadSummarySchema,
    columns: z.array(z.string()).meta({ description: "Header names, in file order" }),
    delimiter: csvDelimiterSchema,
    encoding: z.enum(["utf-8", "utf-16le", "utf-16be", "windows-1252"]),
    hadBom: z.boolean(),
    rowCount: z.number().int(),
    sampleRows: z.array(z.array(z.string())).meta({ description: "The first 10 data rows, cells in column order" }),
    suggestedMapping: modernListMappingDraftSchema,
    suggestedName: z.string().meta({ description: "A name for the list, from the file name" }),
    maxBytes: z.number().int(),
  })
  .meta({ id: "ModernListUpload" });
export type ModernListUpload = z.infer<typeof modernListUploadSchema>;

export const modernListUploadFormSchema = z
  .object({ file: z.string().meta({ format: "binary", description: "The CSV file (comma, semicolon or tab separated; UTF-8 with or without BOM)" }) })
  .meta({ id: "ModernListUploadForm" });

export const modernListPreviewRequestSchema = z.strictObject({ mapping: modernListMappingSchema }).meta({ id: "ModernListPreviewRequest" });

const categoryCountsSchema = z.record(iucnCategorySchema, z.number().int()).meta({ id: "IucnCategoryCounts", description: "Species per category" });

export const modernListPreviewSchema = z
  .object({
    upload: modernUploadSummarySchema,
    counts: z.object({ rows: z.number().int(), valid: z.number().int(), invalid: z.number().int() }),
    categories: categoryCountsSchema.meta({ description: "Valid rows per category" }),
    problems: z.array(importProblemSchema).meta({ description: `By row then column; at most ${IMPORT_MAX_PROBLEMS_LISTED} listed` }),
    problemCount: z.number().int(),
    sample: z
      .array(z.object({ row: z.number().int(), name: z.string(), higherTaxon: z.string(), category: iucnCategorySchema, traits: z.record(z.string(), z.string()) }))
      .meta({ description: "The first 50 valid rows as they would be stored" }),
    notes: z.array(z.string()),
  })
  .meta({ id: "ModernListPreview" });
export type ModernListPreview = z.infer<typeof modernListPreviewSchema>;

export const listNameSchema = z.string({ message: "Name is required" }).trim().min(1, "Name is required").max(120, "Name must have at most 120 characters").check(oneLine("Name"));

export const modernListCommitSchema = z
  .strictObject({
    mapping: modernListMappingSchema,
    name: listNameSchema,
    skipInvalid: z.boolean({ message: "skipInvalid is required: say whether invalid rows are left out (true) or block the upload (false)" }),
  })
  .meta({ id: "ModernListCommit" });
export type ModernListCommitInput = z.input<typeof modernListCommitSchema>;

/** 400 answer of a commit with invalid rows and skipInvalid false: nothing was written. */
export const modernListProblemsErrorSchema = z
  .object({
    error: z.object({ code: z.literal("list_has_problems"), message: z.string() }),
    problems: z.array(importProblemSchema),
    problemCount: z.number().int(),
  })
  .meta({ id: "ModernListProblemsError" });

// ---------------------------------------------------------------- crosswalk

export const crosswalkPairSchema = z
  .strictObject({
    traitId: uuidSchema,
    column: z.string({ message: "Choose a list column" }).min(1, "Choose a list column"),
    states: z
      .record(z.string(), z.string().min(1, "A state code must not be empty").nullable())
      .default({})
      .meta({ description: "Traits with states: list value -> state code, or null for a value that matches no state" }),
    multiplier: z
      .number({ message: "Multiplier must be a number" })
      .refine(Number.isFinite, "Multiplier must be a finite number")
      .refine((v) => v > 0, "Multiplier must be greater than 0")
      .default(1)
      .meta({ description: "Numeric traits: list values times this give the trait's unit (e.g. 10 for cm to mm); default 1" }),
  })
  .meta({ id: "CrosswalkPair" });

export const crosswalkSchema = z
  .strictObject({
    pairs: z.array(crosswalkPairSchema).max(100, "At most 100 pairs"),
  })
  .superRefine((c, ctx) => {
    const traits = new Map<string, number>();
    const columns = new Map<string, number>();
    c.pairs.forEach((p, i) => {
      const t = traits.get(p.traitId);
      if (t !== undefined) ctx.addIssue({ code: "custom", path: ["pairs", i, "traitId"], message: `This trait is already paired (pair ${t + 1}); pair each trait once` });
      else traits.set(p.traitId, i);
      const col = columns.get(p.column);
      if (col !== undefined) ctx.addIssue({ code: "custom", path: ["pairs", i, "column"], message: `Column "${p.column}" is already paired (pair ${col + 1}); a column holds one trait` });
      else columns.set(p.column, i);
    });
  })
  .meta({ id: "Crosswalk" });
export type CrosswalkInput = z.input<typeof crosswalkSchema>;

const unusableValueSchema = z.object({ value: z.string(), count: z.number().int(), message: z.string() });

export const crosswalkCoverageSchema = z
  .object({
    pairs: z.array(
      z.object({
        traitId: z.uuid(),
        traitKey: z.string(),
        traitLabel: z.string(),
        kind: traitKindSchema,
        column: z.string(),
        usable: z.number().int(),
        missing: z.number().int(),
        unusable: z.array(unusableValueSchema).meta({ description: "Values with no state (or not a number), each with the species holding it" }),
        unusableSpecies: z.number().int(),
      }),
    ),
    unpairedColumns: z.array(z.string()),
    unpairedTraits: z.array(z.object({ traitId: z.uuid(), key: z.string(), label: z.string() })),
  })
  .meta({ id: "CrosswalkCoverage" });

export const listColumnSchema = z
  .object({
    name: z.string(),
    values: z.array(z.object({ value: z.string(), count: z.number().int() })).meta({ description: "Distinct values, most frequent first" }),
    missing: z.number().int().meta({ description: "Species with the cell empty or NA" }),
  })
  .meta({ id: "ListColumn" });

// The types of the pure module (shared/comparison/types.ts) come from these schemas.
export type Crosswalk = z.output<typeof crosswalkSchema>;
export type CrosswalkCoverage = z.infer<typeof crosswalkCoverageSchema>;
export type ListColumn = z.infer<typeof listColumnSchema>;

export const modernListSummarySchema = z
  .object({
    id: z.uuid(),
    name: z.string(),
    speciesCount: z.number().int(),
    categories: categoryCountsSchema,
    fileName: z.string().nullable(),
    crosswalkSaved: z.boolean().meta({ description: "A crosswalk has been saved for this list" }),
    comparisonCount: z.number().int(),
    createdBy: personOrNoneSchema,
    createdAt: isoDateSchema,
    updatedAt: isoDateSchema,
  })
  .meta({ id: "ModernListSummary" });
export type ModernListSummary = z.infer<typeof modernListSummarySchema>;

export const modernListSchema = modernListSummarySchema
  .extend({
    columns: z.array(listColumnSchema).meta({ description: "The list's trait columns with their values" }),
    decimalComma: z.boolean().meta({ description: "Numbers may use a decimal comma (the file was not comma separated)" }),
    crosswalk: crosswalkSchema.nullable().meta({ description: "The saved crosswalk; null until one is saved" }),
    suggestedCrosswalk: crosswalkSchema.meta({ description: "A first crosswalk: as earlier lists of the study were paired, else by names" }),
    coverage: crosswalkCoverageSchema.meta({ description: "What the saved crosswalk (or, before one is saved, the suggestion) reads of the list" }),
  })
  .meta({ id: "ModernList" });
export type ModernList = z.infer<typeof modernListSchema>;

export const modernListListSchema = z.object({ lists: z.array(modernListSummarySchema).meta({ description: "Newest first" }) }).meta({ id: "ModernListList" });
export type ModernListList = z.infer<typeof modernListListSchema>;

export const crosswalkSavedSchema = z
  .object({ crosswalk: crosswalkSchema, coverage: crosswalkCoverageSchema, updatedAt: isoDateSchema })
  .meta({ id: "CrosswalkSaved" });
export type CrosswalkSaved = z.infer<typeof crosswalkSavedSchema>;

export const modernListParamsSchema = z.object({ studyId: uuidSchema, listId: uuidSchema });
export const modernUploadParamsSchema = z.object({ studyId: uuidSchema, uploadId: uuidSchema });
