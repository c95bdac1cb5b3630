// Modern species lists come in through the upload lifecycle (uploadLifecycle.ts) with target
// "modern": upload (a mapping and a name suggested), preview (every problem by row and column, the
// species per threat category), and commit: the list with all its valid species in one transaction,
// or nothing; leaving invalid rows out must be asked for.
import type { Database } from "../db";
import { modernLists, modernSpecies } from "../../db/schema/index";
import { listColumns, modernMappingProblems, suggestModernListMapping, validateModernListRows } from "../../shared/comparison/index";
import { IUCN_CATEGORIES, type IucnCategory } from "../../shared/iucn";
import { IMPORT_MAX_PROBLEMS_LISTED } from "../../shared/schemas/imports";
import {
  MODERN_LIST_MAX_BYTES,
  MODERN_LIST_MAX_LABEL,
  type ModernListCommitInput,
  type ModernListMapping,
  type ModernListPreview,
  type ModernListUpload,
  type ModernUploadSummary,
} from "../../shared/schemas/modernLists";
import { detailedError, invalidInput } from "../domain/errors";
import { createUploadLifecycle, fileAsRead, readStoredUpload, refuseMappingProblems, type UploadedFile, type UploadKind } from "./uploadLifecycle";

export const MODERN_LIST_UPLOAD: UploadKind = {
  target: "modern",
  maxBytes: MODERN_LIST_MAX_BYTES,
  tooLarge: `The file is larger than the upload limit of ${MODERN_LIST_MAX_LABEL}.`,
  empty: "The file is empty: it needs a header row and at least one species.",
  noRows: "The file has a header row but no species rows.",
  defaultFileName: "modern-list.csv",
  notFound: "This study has no such upload of a modern list.",
  closedCode: "upload_closed",
  committingNow: "This list is being saved right now.",
  alreadyDone: () => "This upload was already saved as a list; upload the file again to add it anew.",
  commitFailed: "Saving the list failed; nothing was written.",
  noun: "upload",
};

const PREVIEW_SAMPLE = 50;
const INSERT_BATCH = 2000;

const NOTES = [
  "Each row is a species: its name (once per file), higher taxon, threat category and trait columns.",
  "Threat categories are read as IUCN Red List Categories and Criteria 3.1 codes or names, ignoring case.",
  "Trait cells are kept as written; the crosswalk decides which trait and state each value means.",
];

/** A count of zero for every IUCN category. */
export const emptyCategoryCounts = (): Record<IucnCategory, number> => Object.fromEntries(IUCN_CATEGORIES.map((c) => [c, 0])) as Record<IucnCategory, number>;

export function createModernListUploadService(db: Database) {
  const lifecycle = createUploadLifecycle(db, MODERN_LIST_UPLOAD);

  async function uploadSummary(studyId: string, uploadId: string): Promise<ModernUploadSummary> {
    const { id, fileName, status, rowCount, validCount, errorCount, failureReason, createdBy, createdAt } = await lifecycle.summary(studyId, uploadId);
    // A modern list upload is never reverted (the list is deleted instead).
    return { id, fileName, status: status as ModernUploadSummary["status"], rowCount, validCount, errorCount, failureReason, createdBy, createdAt };
  }

  return {
    /** Keeps the file multer stored as the upload's file (removed when anything fails) and suggests a mapping and a name. */
    async upload(studyId: string, user: { id: string }, file: UploadedFile): Promise<ModernListUpload> {
      const { id, parsed, fileName } = await lifecycle.receive(studyId, user, file);
      return {
        upload: await uploadSummary(studyId, id),
        ...fileAsRead(parsed),
        suggestedMapping: suggestModernListMapping(parsed.header),
        suggestedName: fileName.replace(/\.(csv|tsv|txt)$/i, "").replace(/[-_]+/g, " ").trim().slice(0, 120) || "Modern list",
        maxBytes: MODERN_LIST_MAX_BYTES,
      };
    },

    async preview(studyId: string, uploadId: string, mapping: ModernListMapping): Promise<ModernListPreview> {
      const upload = await lifecycle.openRow(studyId, uploadId);
      const parsed = await readStoredUpload(upload);
      refuseMappingProblems(modernMappingProblems(mapping, parsed.header));
      const result = validateModernListRows(parsed, mapping);
      const categories = emptyCategoryCounts();
      for (const r of result.rows) categories[r.category]++;
      await lifecycle.recordPreview(upload, mapping, { rowCount: result.rowCount, validCount: result.rows.length, errorCount: result.invalidRowCount });
      return {
        upload: await uploadSummary(studyId, uploadId),
        counts: { rows: result.rowCount, valid: result.rows.length, invalid: result.invalidRowCount },
        categories,
        problems: result.problems.slice(0, IMPORT_MAX_PROBLEMS_LISTED),
        problemCount: result.problems.length,
        sample: result.rows.slice(0, PREVIEW_SAMPLE).map(({ row: r, name, higherTaxon, category, traits }) => ({ row: r, name, higherTaxon, category, traits })),
        notes: NOTES,
      };
    },

    /**
     * Saves the list with its valid species in one transaction and returns its id. With invalid rows
     * and skipInvalid false nothing is written and the problems are listed (400).
     */
    saveList(studyId: string, uploadId: string, user: { id: string }, input: ModernListCommitInput & { mapping: ModernListMapping }): Promise<string> {
      return lifecycle.commit(studyId, uploadId, user, async (tx, upload, progress) => {
        const parsed = await readStoredUpload(upload);
        refuseMappingProblems(modernMappingProblems(input.mapping, parsed.header));
        const checked = validateModernListRows(parsed, input.mapping);
        if (checked.problems.length && !input.skipInvalid) {
          throw detailedError(
            "invalid",
            "list_has_problems",
            `Nothing was saved: ${checked.invalidRowCount} of ${checked.rowCount} rows have problems. Correct them, or choose to leave the invalid rows out.`,
            { problems: checked.problems.slice(0, IMPORT_MAX_PROBLEMS_LISTED), problemCount: checked.problems.length },
          );
        }
        if (checked.rows.length === 0) throw invalidInput("No valid rows to save.", { file: "No valid rows" });
        const columns = listColumns(
          checked.rows.map((r) => r.traits),
          input.mapping.traitColumns,
        ).map((c) => ({ name: c.name, values: c.values.map((v) => v.value).sort((a, b) => a.localeCompare(b, "en", { numeric: true })) }));
        const name = input.name.trim();
        const [list] = await tx
          .insert(modernLists)
          .values({ studyId, name, importId: uploadId, speciesCount: checked.rows.length, columns, crosswalk: {}, createdBy: user.id })
          .returning({ id: modernLists.id });
        for (let i = 0; i < checked.rows.length; i += INSERT_BATCH) {
          await tx
            .insert(modernSpecies)
            .values(checked.rows.slice(i, i + INSERT_BATCH).map((r) => ({ listId: list!.id, name: r.name, higherTaxon: r.higherTaxon, category: r.category, rawTraits: r.traits })));
          await progress((i + INSERT_BATCH) / checked.rows.length);
        }
        return {
          result: list!.id,
          mapping: input.mapping,
          counts: {
            rowCount: checked.rowCount,
            validCount: checked.rows.length,
            errorCount: checked.invalidRowCount,
            createdCount: checked.rows.length,
            skippedInvalid: checked.invalidRowCount,
          },
          activity: {
            kind: "modern_list.added",
            summary: `Added the modern list "${name}" from ${upload.fileName}: ${checked.rows.length} species${checked.invalidRowCount ? `, ${checked.invalidRowCount} invalid rows left out` : ""}`,
            refType: "modern_list",
            refId: list!.id,
          },
        };
      });
    },

    /** Drops an upload that was never saved, and its stored file. */
    discard: lifecycle.discard,
  };
}
