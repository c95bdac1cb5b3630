// The trait table API: taxa with their ranges and one value per trait (keyed by trait id), a
// paginated grid with sorting and filtering, edits guarded by a row version, bulk edits, and the
// history of every cell.
import { z } from "zod";
import { AGE_LIMIT_MA, AGE_LIMIT_MESSAGE, isoDateSchema, oneLine, uuidSchema, wellFormed } from "./common";

/** Largest page of the grid one request returns. */
export const TAXA_MAX_PAGE_SIZE = 500;
/** Largest selection one bulk edit changes (the JSON body limit is 2 MB). */
export const TAXA_MAX_BULK = 20000;

export const traitValueSchema = z
  .union([z.string(), z.number()])
  .meta({ id: "TraitValue", description: "A state code (binary, categorical, ordinal) or a number (numeric); a missing value is absent or null" });
export type TraitValue = z.infer<typeof traitValueSchema>;

const nameSchema = z
  .string({ message: "Name is required" })
  .trim()
  .min(1, "Name is required")
  .max(300, "Name must have at most 300 characters")
  .check(oneLine("Name"));
const higherTaxonSchema = z.string().trim().max(300, "Higher taxon must have at most 300 characters").check(oneLine("Higher taxon"));
const notesSchema = z.string().trim().max(8000, "Notes must have at most 8,000 characters").check(wellFormed("Notes"));

export const reasonSchema = z.string().trim().max(2000, "Reason must have at most 2,000 characters").check(wellFormed("Reason"));
export const requiredReasonSchema = z
  .string({ message: "A reason is required" })
  .trim()
  .min(1, "A reason is required: say why this change is made")
  .max(2000, "Reason must have at most 2,000 characters")
  .check(wellFormed("Reason"));

/**
 * One end of a stratigraphic range as a person gives it: an age in Ma, or the name of a unit of the
 * time scale (resolved to an age: a first appearance to the unit's base, a last appearance to its
 * top); null clears it.
 */
export const rangeEndInputSchema = z
  .union([
    z.strictObject({
      ma: z
        .number({ message: "Age must be a number of Ma" })
        .refine(Number.isFinite, "Age must be a finite number of Ma")
        .refine((v) => v >= 0, "Age must not be negative (ages are in Ma before present)")
        .refine((v) => v <= AGE_LIMIT_MA, AGE_LIMIT_MESSAGE),
    }),
    z.strictObject({
      interval: z
        .string({ message: "Interval must be a name of the time scale or of the study's time bins" })
        .trim()
        .min(1, "Interval must be a name of the time scale or of the study's time bins")
        .max(300, "Interval must have at most 300 characters")
        // Known names depend on the study (its own time bins come first): the service resolves them and names an unknown one.
        .meta({ description: "A name of one of the study's time bins or of a unit of the ICS chart (bins first)" }),
    }),
  ])
  .nullable()
  .meta({ id: "RangeEndInput", description: "{ ma } or { interval }; null clears this end of the range" });
export type RangeEndInput = z.infer<typeof rangeEndInputSchema>;

/** The stored form of a range end: the age, and the interval it came from when given as one. */
export const rangeEndSchema = z.object({ ma: z.number(), interval: z.string().nullable() }).nullable().meta({ id: "RangeEnd" });
export type RangeEnd = z.infer<typeof rangeEndSchema>;

export const taxonCreateSchema = z
  .strictObject({
    name: nameSchema,
    higherTaxon: higherTaxonSchema.default(""),
    fad: rangeEndInputSchema.default(null).meta({ description: "First appearance" }),
    lad: rangeEndInputSchema.default(null).meta({ description: "Last appearance" }),
    notes: notesSchema.default(""),
    values: z.record(uuidSchema, traitValueSchema).default({}).meta({ description: "Trait values by trait id" }),
    reason: reasonSchema.default(""),
  })
  .meta({ id: "TaxonCreate" });
export type TaxonCreateInput = z.input<typeof taxonCreateSchema>;

export const taxonChangesSchema = z
  .strictObject({
    name: nameSchema.optional(),
    higherTaxon: higherTaxonSchema.optional(),
    notes: notesSchema.optional(),
    fad: rangeEndInputSchema.optional(),
    lad: rangeEndInputSchema.optional(),
    values: z.record(uuidSchema, traitValueSchema.nullable()).optional().meta({ description: "Trait id -> new value, or null to clear it" }),
  })
  .refine((c) => Object.values(c).some((v) => v !== undefined), "Give at least one change")
  .meta({ id: "TaxonChanges" });
export type TaxonChanges = z.infer<typeof taxonChangesSchema>;

export const taxonUpdateSchema = z
  .strictObject({
    version: z.number({ message: "version is required: the row version the edit is based on" }).int().min(1),
    changes: taxonChangesSchema,
    reason: reasonSchema.default("").meta({ description: "Required when a change replaces or clears an existing value" }),
  })
  .meta({ id: "TaxonUpdate" });
export type TaxonUpdateInput = z.input<typeof taxonUpdateSchema>;

export const taxonDeleteQuerySchema = z.object({
  version: z.coerce.number({ message: "version must be the row version the deletion is based on" }).int("version must be a whole number").min(1),
  reason: requiredReasonSchema,
});

/** Fields a bulk edit can set across a selection (besides any trait id). */
export const BULK_FIELDS = ["higherTaxon", "notes", "fad", "lad"] as const;

export const taxaBulkEditSchema = z
  .strictObject({
    taxonIds: z
      .array(uuidSchema, { message: "taxonIds must be a list of taxon ids" })
      .min(1, "Select at least one taxon")
      .max(TAXA_MAX_BULK, `At most ${TAXA_MAX_BULK.toLocaleString("en-US")} taxa per bulk edit`)
      .refine((ids) => new Set(ids).size === ids.length, "taxonIds lists a taxon twice"),
    field: z.string({ message: "field is required: a trait id or higherTaxon, notes, fad, lad" }).meta({ description: "A trait id, or higherTaxon | notes | fad | lad" }),
    value: z
      .union([z.string(), z.number(), rangeEndInputSchema])
      .meta({ description: "A trait value, a text for higherTaxon/notes, a RangeEndInput for fad/lad; null clears" }),
    reason: requiredReasonSchema,
  })
  .meta({ id: "TaxaBulkEdit" });
export type TaxaBulkEditInput = z.input<typeof taxaBulkEditSchema>;

export const taxaBulkResultSchema = z
  .object({
    batchId: z.uuid().nullable().meta({ description: "Shared by the coding decisions of this edit (null when nothing changed)" }),
    changed: z.number().int(),
    unchanged: z.number().int().meta({ description: "Selected taxa that already held the value" }),
  })
  .meta({ id: "TaxaBulkResult" });
export type TaxaBulkResult = z.infer<typeof taxaBulkResultSchema>;

export const openThreadsSchema = z
  .object({
    count: z.number().int().meta({ description: "Open threads about the taxon or one of its values" }),
    traitIds: z.array(z.uuid()).meta({ description: "Traits whose value of this taxon has an open thread" }),
  })
  .meta({ id: "OpenThreads" });

export const taxonRowSchema = z
  .object({
    id: z.uuid(),
    name: z.string(),
    higherTaxon: z.string(),
    fadMa: z.number().nullable().meta({ description: "First appearance in Ma" }),
    ladMa: z.number().nullable().meta({ description: "Last appearance in Ma" }),
    fadInterval: z.string().nullable().meta({ description: "The interval the first appearance was given as (its base)" }),
    ladInterval: z.string().nullable().meta({ description: "The interval the last appearance was given as (its top)" }),
    notes: z.string(),
    values: z.record(z.string(), traitValueSchema).meta({ description: "By trait id; a missing value is absent" }),
    version: z.number().int(),
    updatedAt: isoDateSchema,
    openThreads: openThreadsSchema,
    occurrences: z.number().int().optional().meta({ description: "Finds of this taxon (occurrences whose taxon is this name); on grid pages only" }),
    collections: z.number().int().optional().meta({ description: "Distinct collections among those finds; on grid pages only" }),
  })
  .meta({ id: "TaxonRow" });
export type TaxonRow = z.infer<typeof taxonRowSchema>;

// ---------------------------------------------------------------- the grid query

export const TAXON_TEXT_COLUMNS = ["name", "higherTaxon", "notes", "fadInterval", "ladInterval"] as const;
export const TAXON_AGE_COLUMNS = ["fadMa", "ladMa"] as const;
/** Read-only counts from the study's occurrences: sortable, not filterable (like updatedAt). */
export const TAXON_OCCURRENCE_COLUMNS = ["occurrences", "collections"] as const;
export const TAXON_SORT_COLUMNS = [...TAXON_TEXT_COLUMNS, ...TAXON_AGE_COLUMNS, "updatedAt", ...TAXON_OCCURRENCE_COLUMNS] as const;
export const FILTER_OPS = ["contains", "eq", "min", "max"] as const;
export type FilterOp = (typeof FILTER_OPS)[number];

/** One column filter of the grid: `column` is a taxon column or a trait id. */
export interface TaxaColumnFilter {
  column: string;
  op: FilterOp;
  value: string;
}

const UUID_PATTERN = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const isColumn = (c: string) => (TAXON_SORT_COLUMNS as readonly string[]).includes(c) || UUID_PATTERN.test(c);

/** The query form of a column filter: `<column>:<op>:<value>` (the value may hold colons). */
export function formatTaxaFilter(f: TaxaColumnFilter): string {
  return `${f.column}:${f.op}:${f.value}`;
}

export function parseTaxaFilter(text: string): TaxaColumnFilter | string {
  const first = text.indexOf(":");
  const second = first < 0 ? -1 : text.indexOf(":", first + 1);
  if (second < 0) return `filter "${text}" must read <column>:<op>:<value>`;
  const column = text.slice(0, first);
  const op = text.slice(first + 1, second);
  const value = text.slice(second + 1);
  if (!isColumn(column)) return `filter "${text}": unknown column "${column}" (a trait id or one of ${TAXON_SORT_COLUMNS.join(", ")})`;
  if (!(FILTER_OPS as readonly string[]).includes(op)) return `filter "${text}": unknown operator "${op}" (${FILTER_OPS.join(", ")})`;
  if ((op === "min" || op === "max") && !Number.isFinite(Number(value))) return `filter "${text}": ${op} needs a number`;
  if (value.trim() === "") return `filter "${text}" has no value`;
  return { column, op: op as FilterOp, value };
}

const listParam = z.union([z.string(), z.array(z.string())]).optional().transform((v) => (v === undefined ? [] : Array.isArray(v) ? v : [v]));

export const taxaListQuerySchema = z.object({
  page: z.coerce.number({ message: "page must be a whole number from 1" }).int("page must be a whole number from 1").min(1, "page must be a whole number from 1").default(1),
  pageSize: z.coerce
    .number({ message: `pageSize must be a whole number from 1 to ${TAXA_MAX_PAGE_SIZE}` })
    .int(`pageSize must be a whole number from 1 to ${TAXA_MAX_PAGE_SIZE}`)
    .min(1, `pageSize must be a whole number from 1 to ${TAXA_MAX_PAGE_SIZE}`)
    .max(TAXA_MAX_PAGE_SIZE, `pageSize must be a whole number from 1 to ${TAXA_MAX_PAGE_SIZE}`)
    .default(100),
  sort: z
    .string()
    .default("name")
    .refine(isColumn, `sort must be a trait id or one of ${TAXON_SORT_COLUMNS.join(", ")}`)
    .meta({ description: "A taxon column or a trait id; missing values sort last; ties by name" }),
  dir: z.enum(["asc", "desc"], { message: "dir must be asc or desc" }).default("asc"),
  filter: listParam
    .transform((list, ctx) => {
      const out: TaxaColumnFilter[] = [];
      for (const text of list) {
        const parsed = parseTaxaFilter(text);
        if (typeof parsed === "string") ctx.addIssue({ code: "custom", message: parsed });
        else out.push(parsed);
      }
      return out;
    })
    .meta({
      description:
        "Repeatable `<column>:<op>:<value>`: contains (text, case-blind), eq (a state code, or an exact text or number), min / max (ages and numeric traits, inclusive)",
    }),
  missing: listParam
    .refine((list) => list.every((c) => isColumn(c) || c === "fad" || c === "lad"), "missing names a trait id or a taxon column (fad, lad, fadMa, ladMa, higherTaxon, notes)")
    .meta({ description: "Repeatable: taxa with no value in this column (a trait id, fad, lad, higherTaxon, notes)" }),
  hasOpenThread: z
    .enum(["true", "false"], { message: "hasOpenThread must be true or false" })
    .optional()
    .transform((v) => (v === undefined ? undefined : v === "true"))
    .meta({ description: "true: only taxa with an open thread about the taxon or one of its values" }),
});
export type TaxaListQuery = z.output<typeof taxaListQuerySchema>;

/** GET taxa/ids: the same filters as a page, without paging. */
export const taxaIdsQuerySchema = taxaListQuerySchema.omit({ page: true, pageSize: true });
export type TaxaIdsQuery = z.output<typeof taxaIdsQuerySchema>;

export const taxaIdsSchema = z
  .object({
    ids: z.array(z.uuid()).meta({ description: `Every matching taxon, in the grid's order (at most ${TAXA_MAX_BULK.toLocaleString("en-US")})` }),
    total: z.number().int(),
  })
  .meta({ id: "TaxaIds" });
export type TaxaIds = z.infer<typeof taxaIdsSchema>;

export const taxaPageSchema = z
  .object({ rows: z.array(taxonRowSchema), total: z.number().int(), page: z.number().int(), pageSize: z.number().int() })
  .meta({ id: "TaxaPage" });
export type TaxaPage = z.infer<typeof taxaPageSchema>;

export const taxonParamsSchema = z.object({ studyId: uuidSchema, taxonId: uuidSchema });

// ---------------------------------------------------------------- conflicts and history

export const decisionUserSchema = z.object({ id: z.uuid(), name: z.string() }).nullable().meta({ id: "DecisionUser" });

/** 409 answer of PATCH/DELETE taxa/:taxonId when the edit was based on an older version. */
export const taxonConflictSchema = z
  .object({
    error: z.object({ code: z.literal("version_conflict"), message: z.string() }),
    currentVersion: z.number().int(),
    taxon: taxonRowSchema.meta({ description: "The row as it is now" }),
    conflicts: z
      .array(
        z.object({
          field: z.string().meta({ description: "name | higherTaxon | notes | fad | lad | a trait id" }),
          traitId: z.uuid().nullable(),
          yourValue: z.unknown().meta({ description: "The value the edit wanted to write" }),
          currentValue: z.unknown().meta({ description: "The value held now" }),
          setBy: decisionUserSchema,
          setAt: isoDateSchema.nullable(),
          reason: z.string().nullable(),
        }),
      )
      .meta({ description: "One entry per field of the edit: what it holds now, who set it, when and why" }),
  })
  .meta({ id: "TaxonConflict" });
export type TaxonConflict = z.infer<typeof taxonConflictSchema>;

export const taxonHistoryQuerySchema = z.object({
  traitId: uuidSchema.optional().meta({ description: "History of one cell: this trait's value of the taxon" }),
  field: z
    .enum(["name", "higherTaxon", "notes", "fad", "lad"], { message: "field must be name, higherTaxon, notes, fad or lad" })
    .optional()
    .meta({ description: "History of one taxon column" }),
});

export const historyEntrySchema = z
  .object({
    decisionId: z.uuid(),
    field: z.string(),
    traitId: z.uuid().nullable(),
    action: z.string().meta({ description: "create | update | delete | restore | revert | override" }),
    oldValue: z.unknown(),
    newValue: z.unknown(),
    reason: z.string(),
    user: decisionUserSchema,
    importId: z.uuid().nullable(),
    importFileName: z.string().nullable(),
    revertsId: z.uuid().nullable(),
    batchId: z.uuid().nullable(),
    createdAt: isoDateSchema,
  })
  .meta({ id: "HistoryEntry" });
export type HistoryEntry = z.infer<typeof historyEntrySchema>;

export const taxonHistorySchema = z
  .object({
    taxonId: z.uuid(),
    name: z.string(),
    deleted: z.boolean(),
    entries: z
      .array(historyEntrySchema)
      .meta({ description: "Newest first. With traitId or field, taxon-level entries (create, delete, restore) show that cell's value only" }),
  })
  .meta({ id: "TaxonHistory" });
export type TaxonHistory = z.infer<typeof taxonHistorySchema>;

export const taxonSavedSchema = z.object({ taxon: taxonRowSchema, decisions: z.number().int().meta({ description: "Coding decisions written" }) }).meta({ id: "TaxonSaved" });
export type TaxonSaved = z.infer<typeof taxonSavedSchema>;
