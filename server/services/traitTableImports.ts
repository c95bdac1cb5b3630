// CSV imports of the trait table, through the upload lifecycle (uploadLifecycle.ts): upload (the
// file kept outside the served folder, a mapping suggested from the header and what the study
// remembered), preview (every problem by row and column, what each row would change), commit
// (traitTableCommit.ts), revert (traitTableRevert.ts) and discard.
import { eq } from "drizzle-orm";
import type { Database } from "../db";
import type { ParsedCsv } from "../../shared/csv/parse";
import { studyIntervalLookup } from "./timeBins";
import { studies } from "../../db/schema/index";
import { mappingProblems, suggestMapping, type RememberedMapping } from "../../shared/csv/mapping";
import {
  IMPORT_MAX_BYTES,
  IMPORT_MAX_PROBLEMS_LISTED,
  type ImportCommitInput,
  type ImportList,
  type ImportMapping,
  type ImportPreview,
  type ImportRevertResult,
  type ImportSummary,
  type ImportUpload,
} from "../../shared/schemas/imports";
import { loadCodebook } from "./codebookStore";
import { taxaByName } from "./taxaStore";
import { commitTraitTable } from "./traitTableCommit";
import { namesIn, planRow, rememberMapping, traitTableAges, traitTableColumns, TRAIT_TABLE_UPLOAD, validateTraitTable } from "./traitTablePlan";
import { collectImportChecks, prepareImportFile } from "./importChecks";
import type { NameMerges } from "../../shared/schemas/importChecks";
import { revertTraitTable } from "./traitTableRevert";
import { createUploadLifecycle, fileAsRead, createUploadSweeps, readStoredUpload, refuseMappingProblems, type UploadedFile } from "./uploadLifecycle";

const PREVIEW_SAMPLE = 50;

const NOTES = [
  "Rows are matched to taxa by exact name; a new name adds a taxon.",
  "An empty cell (or NA, or one of the study's missing-value tokens) keeps what the taxon already holds; it never clears a value.",
  "Range columns take ages in Ma or interval names: a first appearance reads an interval's base, a last appearance its top.",
  "States are read by code or label, ignoring case; numbers may use a decimal comma unless the file is comma separated.",
];

export function createImportService(db: Database) {
  const lifecycle = createUploadLifecycle(db, TRAIT_TABLE_UPLOAD);
  const sweeps = createUploadSweeps(db);

  /** What an upload answers: the file as read and a mapping (the one last previewed, else one suggested from the header and what the study remembered). */
  async function uploadAnswer(studyId: string, importId: string, parsed: ParsedCsv, lastMapping: ImportMapping | undefined): Promise<ImportUpload> {
    const codebook = await loadCodebook(db, studyId);
    const [study] = await db.select({ settings: studies.settings }).from(studies).where(eq(studies.id, studyId));
    const remembered = ((study?.settings as { importMapping?: RememberedMapping } | undefined)?.importMapping ?? {}) as RememberedMapping;
    const suggestion = suggestMapping(parsed.header, codebook, remembered);
    return {
      import: await lifecycle.summary(studyId, importId),
      ...fileAsRead(parsed),
      suggestedMapping: lastMapping ?? suggestion.mapping,
      rememberedColumns: lastMapping ? [] : suggestion.rememberedColumns,
      maxBytes: IMPORT_MAX_BYTES,
    };
  }

  return {
    /** Keeps the file multer stored as the upload's file (removed when anything fails) and suggests a mapping. */
    async upload(studyId: string, user: { id: string }, file: UploadedFile): Promise<ImportUpload> {
      const { id, parsed } = await lifecycle.receive(studyId, user, file);
      return uploadAnswer(studyId, id, parsed, undefined);
    },

    get: lifecycle.summary,

    /** An upload left before its commit, read again so the mapping step can resume: the upload's answer, with the mapping last previewed when there is one. */
    async resume(studyId: string, importId: string): Promise<ImportUpload> {
      const upload = await lifecycle.openRow(studyId, importId);
      return uploadAnswer(studyId, importId, await readStoredUpload(upload), (upload.mapping as { mapping?: ImportMapping }).mapping);
    },

    async list(studyId: string, q: { page: number; pageSize: number }): Promise<ImportList> {
      const { rows, total } = await lifecycle.summaries(studyId, { limit: q.pageSize, offset: (q.page - 1) * q.pageSize });
      return { rows, total, page: q.page, pageSize: q.pageSize };
    },

    async preview(studyId: string, importId: string, mapping: ImportMapping, nameMerges: NameMerges = {}, higherTaxonMerges: NameMerges = {}): Promise<ImportPreview> {
      const upload = await lifecycle.openRow(studyId, importId);
      const raw = await readStoredUpload(upload);
      const codebook = await loadCodebook(db, studyId);
      refuseMappingProblems(mappingProblems(mapping, raw.header, codebook));
      // Declared missing-value tokens blanked and chosen spellings merged, as the commit reads the file.
      const prepared = await prepareImportFile(db, studyId, raw, traitTableColumns(mapping), { names: nameMerges, higherTaxa: higherTaxonMerges });
      const parsed = prepared.parsed;
      const existing = new Map((await taxaByName(db, studyId, namesIn(parsed, mapping), false)).map((s) => [s.name, s]));
      const result = validateTraitTable(parsed, mapping, codebook, existing, await studyIntervalLookup(db, studyId));
      const plans = result.rows.map((r) => planRow(r, existing.get(r.name) ?? null));
      const counts = {
        rows: result.rowCount,
        valid: result.rows.length,
        invalid: result.invalidRowCount,
        create: plans.filter((p) => !p.existing).length,
        update: plans.filter((p) => p.existing && p.changes.length).length,
        unchanged: plans.filter((p) => p.existing && !p.changes.length).length,
      };
      const checks = await collectImportChecks(db, studyId, prepared, { ages: traitTableAges(result.rows, mapping), higherTaxa: result.rows });
      await lifecycle.recordPreview(upload, mapping, { rowCount: counts.rows, validCount: counts.valid, errorCount: counts.invalid });
      await rememberMapping(db, studyId, mapping);
      return {
        import: await lifecycle.summary(studyId, importId),
        counts,
        problems: result.problems.slice(0, IMPORT_MAX_PROBLEMS_LISTED),
        problemCount: result.problems.length,
        sample: plans.slice(0, PREVIEW_SAMPLE).map((p) => ({
          row: p.row.row,
          name: p.row.name,
          action: !p.existing ? ("create" as const) : p.changes.length ? ("update" as const) : ("unchanged" as const),
          changes: p.changes,
        })),
        notes: NOTES,
        checks,
      };
    },

    /** Writes the valid rows in one transaction, or nothing (traitTableCommit.ts); progress is polled through `get`. */
    async commit(studyId: string, importId: string, user: { id: string }, input: ImportCommitInput & { mapping: ImportMapping }): Promise<ImportSummary> {
      await commitTraitTable(db, lifecycle, studyId, importId, user, input);
      return lifecycle.summary(studyId, importId);
    },

    /** Restores the values the import replaced and removes the taxa it added (traitTableRevert.ts). */
    async revert(studyId: string, importId: string, user: { id: string }, input: { reason: string; skipChanged: boolean }): Promise<ImportRevertResult> {
      const outcome = await revertTraitTable(lifecycle, studyId, importId, user, input);
      return { import: await lifecycle.summary(studyId, importId), ...outcome };
    },

    /** Drops an upload that was never committed, and its stored file. */
    discard: lifecycle.discard,

    // The sweeps cover every kind of upload (occurrences and modern lists too), whichever service starts them.
    sweepInterrupted: sweeps.sweepInterrupted,
    sweepStaleUploads: sweeps.sweepStaleUploads,
    /** Sweeps interrupted commits and stale uploads now and every IMPORT_SWEEP_EVERY_MS until stopSweeping. */
    startSweeping: sweeps.startSweeping,
    stopSweeping: sweeps.stopSweeping,
  };
}
export type ImportService = ReturnType<typeof createImportService>;
