// What every import (trait table, occurrences) checks beyond row errors: the study's declared
// missing-value tokens (kept in studies.settings), warnings that do not block a commit (implausible
// ages), names that differ only by case, spacing or punctuation, and qualified higher taxa.
import { z } from "zod";
import { oneLine } from "./common";
import { nameKey } from "../imports/nameHygiene";

/** Most tokens a study may declare. */
export const MAX_MISSING_TOKENS = 30;
/** Longest token. */
export const MAX_MISSING_TOKEN_LENGTH = 40;
/** Warnings one preview lists; the count is always complete. */
export const IMPORT_MAX_WARNINGS_LISTED = 2000;

const missingTokenSchema = z
  .string({ message: "Each missing-value token must be text" })
  .trim()
  .min(1, "A missing-value token must not be empty (empty cells are always missing)")
  .max(MAX_MISSING_TOKEN_LENGTH, `A missing-value token has at most ${MAX_MISSING_TOKEN_LENGTH} characters`)
  .check(oneLine("Missing-value token"));

/** The study's import settings, edited in the Imports screen's small form (the same schema on both sides). */
export const importSettingsSchema = z
  .strictObject({
    missingTokens: z
      .array(missingTokenSchema, { message: "missingTokens must be a list of texts" })
      .max(MAX_MISSING_TOKENS, `At most ${MAX_MISSING_TOKENS} missing-value tokens`)
      .superRefine((tokens, ctx) => {
        const seen = new Map<string, number>();
        tokens.forEach((t, i) => {
          const key = t.trim().toLowerCase();
          const earlier = seen.get(key);
          if (earlier !== undefined) ctx.addIssue({ code: "custom", path: [i], message: `"${t}" is already in the list (tokens are matched ignoring case)` });
          else seen.set(key, i);
        });
      })
      .meta({ description: "Cell texts read as missing (not as a value or state) in every import of the study; matched whole, trimmed, ignoring case" }),
  })
  .meta({ id: "ImportSettings" });
export type ImportSettings = z.output<typeof importSettingsSchema>;
export type ImportSettingsInput = z.input<typeof importSettingsSchema>;

export const IMPORT_WARNING_KINDS = ["age_interval_number", "age_far_outside"] as const;
export type ImportWarningKind = (typeof IMPORT_WARNING_KINDS)[number];

export const importWarningSchema = z
  .object({
    row: z.number().int().meta({ description: "Row as a spreadsheet shows it: the header is row 1, so the first data row is row 2" }),
    column: z.string().meta({ description: "The CSV header of the cell" }),
    taxon: z.string(),
    kind: z.enum(IMPORT_WARNING_KINDS),
    message: z.string(),
  })
  .meta({ id: "ImportWarning" });
export type ImportWarning = z.infer<typeof importWarningSchema>;

export const ageSpanSchema = z
  .object({
    oldestMa: z.number(),
    youngestMa: z.number(),
    source: z.enum(["study", "file"]).meta({ description: "study: the ranges of the study's taxa; file: the middle half of this file's ages (the study has no ages yet)" }),
  })
  .meta({ id: "AgeSpan" });
export type AgeSpan = z.infer<typeof ageSpanSchema>;

export const missingReadSchema = z
  .object({
    column: z.string(),
    token: z.string().meta({ description: "The declared token as the study lists it" }),
    count: z.number().int(),
    firstRows: z.array(z.number().int()).meta({ description: "Up to 5 rows (header is row 1)" }),
  })
  .meta({ id: "MissingRead" });
export type MissingRead = z.infer<typeof missingReadSchema>;

export const nameSpellingSchema = z
  .object({
    name: z.string(),
    fileRows: z.number().int().meta({ description: "Rows of the file with this exact spelling" }),
    firstRows: z.array(z.number().int()).meta({ description: "Up to 5 of them (header is row 1)" }),
    inStudy: z.boolean().meta({ description: "A taxon of the study already has this exact name" }),
  })
  .meta({ id: "NameSpelling" });
export type NameSpelling = z.infer<typeof nameSpellingSchema>;

export const similarNamesSchema = z
  .object({
    key: z.string().meta({ description: "The name with case, spaces and punctuation removed" }),
    spellings: z.array(nameSpellingSchema),
    mergedInto: z.string().nullable().meta({ description: "The spelling chosen for all of them in this preview; null: kept apart" }),
  })
  .meta({ id: "SimilarNames" });
export type SimilarNames = z.infer<typeof similarNamesSchema>;

export const qualifiedHigherTaxonSchema = z
  .object({
    name: z.string().meta({ description: "As written, e.g. Anavelidae?" }),
    base: z.string().meta({ description: "The name without its qualifier" }),
    qualifier: z.string(),
    rows: z.number().int(),
    firstRow: z.number().int(),
  })
  .meta({ id: "QualifiedHigherTaxon" });
export type QualifiedHigherTaxonDto = z.infer<typeof qualifiedHigherTaxonSchema>;

/** What a preview says beside its row errors; none of it blocks a commit. */
export const importChecksSchema = z
  .object({
    warnings: z.array(importWarningSchema).meta({ description: `By row; at most ${IMPORT_MAX_WARNINGS_LISTED} listed` }),
    warningCount: z.number().int(),
    ageSpan: ageSpanSchema.nullable().meta({ description: "The span the ages were compared with; null when there is none to compare with" }),
    missingRead: z.array(missingReadSchema).meta({ description: "Cells read as missing because they hold one of the study's declared tokens" }),
    missingTokens: z.array(z.string()),
    similarNames: z.array(similarNamesSchema).meta({ description: "Names of the file that differ from each other or from the study's taxa only by case, spaces or punctuation" }),
    similarHigherTaxa: z
      .array(similarNamesSchema)
      .meta({ description: "Higher taxa of the file that differ from each other or from the study's only by case, spaces or punctuation (qualified names such as Anavelidae? left out: they differ on purpose)" }),
    qualifiedHigherTaxa: z.array(qualifiedHigherTaxonSchema).meta({ description: "Higher taxa written with a qualifier (?, cf., aff.): kept as written" }),
  })
  .meta({ id: "ImportChecks" });
export type ImportChecks = z.infer<typeof importChecksSchema>;

const mergeNameSchema = z.string().trim().min(1, "A name must not be empty").max(300, "A name has at most 300 characters");

/**
 * Spellings to read as another spelling (spelling -> the one to use), chosen in the preview. A
 * spelling may only be mapped onto one that differs by case, spaces or punctuation.
 */
export const nameMergesSchema = z
  .record(mergeNameSchema, mergeNameSchema)
  .default({})
  .superRefine((merges, ctx) => {
    const entries = Object.entries(merges);
    if (entries.length > 10_000) ctx.addIssue({ code: "custom", message: "At most 10,000 names can be merged at once" });
    for (const [from, to] of entries) {
      if (merges[to] !== undefined && merges[to] !== to) ctx.addIssue({ code: "custom", path: [from], message: `"${to}" is itself read as "${merges[to]}": choose the final spelling` });
      if (nameKey(from) !== nameKey(to)) ctx.addIssue({ code: "custom", path: [from], message: `"${from}" and "${to}" differ by more than case, spaces or punctuation` });
    }
  })
  .meta({ id: "NameMerges", description: "Spelling -> the spelling to read it as (only names that differ by case, spaces or punctuation)" });
export type NameMerges = z.output<typeof nameMergesSchema>;
