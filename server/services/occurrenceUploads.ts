// Occurrence uploads, through the upload lifecycle (uploadLifecycle.ts) with target "occurrences":
// upload (columns, a mapping suggested from the header), preview (every row problem naming row and
// taxon, duplicates), commit (every valid row in one transaction, or none; leaving invalid rows out
// must be asked for), revert (the upload's rows removed) and discard.
import { sql } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import { studyIntervalLookup } from "./timeBins";
import { describeOccurrenceProblem, readOccurrenceRows } from "../../shared/occurrences/readOccurrenceRows";
import type { ImportSummary } from "../../shared/schemas/imports";
import {
  NO_AGE_COLUMNS_MESSAGE,
  OCCURRENCE_MAX_PROBLEMS_LISTED,
  type OccurrenceCommitInput,
  type OccurrenceMapping,
  type OccurrenceMappingDraft,
  type OccurrencePreview,
  type OccurrenceRow,
  type OccurrenceRevertResult,
  type OccurrenceUpload,
  type OccurrenceUploadList,
} from "../../shared/schemas/occurrences";
import { detailedError, invalidInput } from "../domain/errors";
import { recordActivity } from "./decisionLog";
import { copyRows, copyText } from "./sqlHelpers";
import type { AgeCell } from "../../shared/imports/agePlausibility";
import type { NameMerges } from "../../shared/schemas/importChecks";
import { collectImportChecks, prepareImportFile, type ImportMerges } from "./importChecks";
import { createUploadLifecycle, fileAsRead, readStoredUpload, refuseMappingProblems, TABLE_UPLOAD_REFUSALS, type UploadedFile, type UploadKind, type UploadRow } from "./uploadLifecycle";

export const OCCURRENCE_UPLOAD: UploadKind = {
  target: "occurrences",
  ...TABLE_UPLOAD_REFUSALS,
  defaultFileName: "occurrences.csv",
  notFound: "Occurrence upload not found in this study.",
  closedCode: "upload_closed",
  committingNow: "This upload is being committed right now.",
  alreadyDone: (status) => `This upload was already ${status}; upload the file again to read it anew.`,
  commitFailed: "The commit failed; nothing was written.",
  noun: "upload",
};

const PREVIEW_SAMPLE = 20;
/** Uploads listed. */
const LIST_LIMIT = 200;

const NOTES = [
  "Rows are numbered as a spreadsheet shows them: the header is row 1, so the first data row is row 2.",
  "Ages come from the Ma columns where filled (a cell may hold an interval name: the maximum reads its base, the minimum its top), else from the interval names (early: base, late: top).",
  "Interval names are units of the ICS chart; case, spaces and punctuation are ignored and Early/Late read as Lower/Upper.",
  "Duplicates are rows identical to an earlier row in every mapped column; they are kept unless dropping them is chosen.",
];

// Header words that suggest each part of an occurrence (compared after lower-casing and turning spaces and
// hyphens into underscores); the first column matching a pattern wins.
const SUGGESTIONS: Array<[keyof OccurrenceMappingDraft, RegExp]> = [
  ["taxon", /^(taxon(_name)?|accepted_name|identified_name|genus|species|name)$/],
  ["higherTaxon", /^(higher_taxon|family|order|class|clade|phylum|higher)$/],
  ["earlyInterval", /^(early_interval|interval_early|early_stage|max_interval|interval_max|interval|stage)$/],
  ["lateInterval", /^(late_interval|interval_late|late_stage|min_interval|interval_min)$/],
  ["maxMa", /^(max_ma|max_age|ma_max|age_max|maximum_age|oldest_ma|early_age)$/],
  ["minMa", /^(min_ma|min_age|ma_min|age_min|minimum_age|youngest_ma|late_age)$/],
  ["collection", /^(collection(_no|_id|_number)?|locality(_id)?|site(_id)?)$/],
  ["count", /^(count|abundance|specimens|n_specimens|n)$/],
];

export function suggestOccurrenceMapping(header: string[]): OccurrenceMappingDraft {
  const draft: OccurrenceMappingDraft = { taxon: null, higherTaxon: null, maxMa: null, minMa: null, earlyInterval: null, lateInterval: null, collection: null, count: null };
  const used = new Set<string>();
  for (const [field, pattern] of SUGGESTIONS) {
    const match = header.find((h) => !used.has(h) && pattern.test(h.trim().toLowerCase().replace(/[\s-]+/g, "_")));
    if (match) {
      draft[field] = match;
      used.add(match);
    }
  }
  return draft;
}

/** Problems of a mapping against the file's header, by mapping field. */
function mappingProblems(mapping: OccurrenceMapping, header: string[]): Record<string, string> {
  const problems: Record<string, string> = {};
  for (const [field, column] of Object.entries(mapping)) {
    if (column !== null && !header.includes(column)) problems[field] = `The file has no column "${column}"`;
  }
  if (mapping.maxMa === null && mapping.earlyInterval === null) problems.maxMa = NO_AGE_COLUMNS_MESSAGE;
  return problems;
}

/**
 * The stored file read through a mapping: valid rows, row problems, duplicates. The study's
 * missing-value tokens are blanked in the mapped columns and the chosen spellings merged first
 * (importChecks.ts), in preview and commit alike.
 */
async function readThrough(db: DbOrTx, studyId: string, upload: UploadRow, mapping: OccurrenceMapping, dropDuplicates: boolean, merges: ImportMerges) {
  const raw = await readStoredUpload(upload);
  refuseMappingProblems(mappingProblems(mapping, raw.header));
  const prepared = await prepareImportFile(db, studyId, raw, { name: mapping.taxon, higherTaxon: mapping.higherTaxon, mapped: Object.values(mapping) }, merges);
  return { ...readOccurrenceRows(prepared.parsed, mapping, { dropDuplicates, intervals: await studyIntervalLookup(db, studyId) }), prepared };
}

/** Ages read from the Ma columns (interval names resolve to the chart and are not checked), for the plausibility warnings. */
function agesOf(rows: OccurrenceRow[], mapping: OccurrenceMapping): AgeCell[] {
  const ages: AgeCell[] = [];
  if (mapping.maxMa === null) return ages;
  for (const r of rows) {
    if (r.earlyInterval !== null) continue;
    ages.push({ row: r.row, column: mapping.maxMa, taxon: r.taxon, ma: r.maxMa });
    if (mapping.minMa !== null && r.minMa !== r.maxMa) ages.push({ row: r.row, column: mapping.minMa, taxon: r.taxon, ma: r.minMa });
  }
  return ages;
}

export function createOccurrenceUploadService(db: Database) {
  const lifecycle = createUploadLifecycle(db, OCCURRENCE_UPLOAD);

  return {
    /** Keeps the file multer stored as the upload's file (removed when anything fails) and suggests a mapping. */
    async upload(studyId: string, user: { id: string }, file: UploadedFile): Promise<OccurrenceUpload> {
      const { id, parsed } = await lifecycle.receive(studyId, user, file);
      const suggestedMapping = suggestOccurrenceMapping(parsed.header);
      const { columns, rowCount, sampleRows } = fileAsRead(parsed);
      return {
        upload: await lifecycle.summary(studyId, id),
        columns,
        rowCount,
        sampleRows,
        suggestedMapping,
        ageColumnsFound: [suggestedMapping.maxMa, suggestedMapping.minMa, suggestedMapping.earlyInterval, suggestedMapping.lateInterval].some((c) => c !== null),
      };
    },

    get: lifecycle.summary,

    async list(studyId: string): Promise<OccurrenceUploadList> {
      return { rows: (await lifecycle.summaries(studyId, { limit: LIST_LIMIT, offset: 0 })).rows };
    },

    async preview(studyId: string, uploadId: string, input: { mapping: OccurrenceMapping; duplicates: "keep" | "drop"; nameMerges: NameMerges; higherTaxonMerges: NameMerges }): Promise<OccurrencePreview> {
      const upload = await lifecycle.openRow(studyId, uploadId);
      const read = await readThrough(db, studyId, upload, input.mapping, input.duplicates === "drop", { names: input.nameMerges, higherTaxa: input.higherTaxonMerges });
      const checks = await collectImportChecks(db, studyId, read.prepared, { ages: agesOf(read.rows, input.mapping), higherTaxa: read.rows });
      await lifecycle.recordPreview(upload, input.mapping, { rowCount: read.rowCount, validCount: read.rows.length, errorCount: read.invalidRowCount });
      return {
        upload: await lifecycle.summary(studyId, uploadId),
        counts: {
          rows: read.rowCount,
          valid: read.rows.length,
          invalid: read.invalidRowCount,
          duplicates: read.duplicates.length,
          taxa: new Set(read.rows.map((r) => r.taxon)).size,
        },
        problems: read.problems.slice(0, OCCURRENCE_MAX_PROBLEMS_LISTED),
        problemCount: read.problems.length,
        duplicates: read.duplicates.slice(0, OCCURRENCE_MAX_PROBLEMS_LISTED),
        sample: read.rows.slice(0, PREVIEW_SAMPLE),
        notes: NOTES,
        checks,
      };
    },

    /** Writes every valid row in one transaction, or nothing; progress (0..1) is polled through `get`. */
    async commit(studyId: string, uploadId: string, user: { id: string }, input: Required<Omit<OccurrenceCommitInput, "nameMerges" | "higherTaxonMerges">> & { mapping: OccurrenceMapping; nameMerges?: NameMerges; higherTaxonMerges?: NameMerges }): Promise<ImportSummary> {
      await lifecycle.commit(studyId, uploadId, user, async (tx, upload, progress) => {
        const read = await readThrough(tx, studyId, upload, input.mapping, input.duplicates === "drop", { names: input.nameMerges ?? {}, higherTaxa: input.higherTaxonMerges ?? {} });
        if (read.problems.length && !input.skipInvalid) {
          throw detailedError(
            "invalid",
            "occurrences_have_problems",
            `Nothing was written: ${read.invalidRowCount} of ${read.rowCount} rows have problems (first: ${describeOccurrenceProblem(read.problems[0]!)}). Correct them, or choose to skip invalid rows.`,
            { problems: read.problems.slice(0, OCCURRENCE_MAX_PROBLEMS_LISTED), problemCount: read.problems.length },
          );
        }
        if (read.rows.length === 0) throw invalidInput("No valid rows to write.", { file: "No valid rows" });
        const rows = read.rows;
        const prefix = `${studyId}\t${uploadId}\t`;
        let written = 0;
        await copyRows(
          tx,
          "occurrences",
          ["study_id", "upload_id", "source_row", "taxon", "higher_taxon", "max_ma", "min_ma", "early_interval", "late_interval", "collection", "count"],
          rows.length,
          (i) => {
            const o = rows[i]!;
            return `${prefix}${o.row}\t${copyText(o.taxon)}\t${copyText(o.higherTaxon)}\t${o.maxMa}\t${o.minMa}\t${copyText(o.earlyInterval)}\t${copyText(o.lateInterval)}\t${copyText(o.collection)}\t${copyText(o.count)}\n`;
          },
          async (n) => {
            written += n;
            await progress(written / rows.length);
          },
        );
        return {
          result: undefined,
          mapping: input.mapping,
          counts: {
            rowCount: read.rowCount,
            validCount: read.rows.length,
            errorCount: read.invalidRowCount,
            createdCount: read.rows.length,
            skippedInvalid: read.invalidRowCount,
          },
          activity: {
            kind: "occurrences.committed",
            summary: `Uploaded ${read.rows.length} occurrences from ${upload.fileName}${read.invalidRowCount ? `, ${read.invalidRowCount} invalid rows skipped` : ""}`,
            refType: "import",
            refId: uploadId,
          },
        };
      });
      return lifecycle.summary(studyId, uploadId);
    },

    /** Removes the upload's occurrences. Ranges applied from them stay until their batch is reverted. */
    async revert(studyId: string, uploadId: string, user: { id: string }): Promise<OccurrenceRevertResult> {
      const removed = await lifecycle.revert(studyId, uploadId, user, async (tx, upload) => {
        const deleted = await tx.execute(sql`DELETE FROM occurrences WHERE upload_id = ${uploadId}`);
        await recordActivity(tx, {
          studyId,
          userId: user.id,
          kind: "occurrences.reverted",
          summary: `Reverted the occurrence upload ${upload.fileName}: ${deleted.rowCount ?? 0} occurrences removed`,
          refType: "import",
          refId: uploadId,
        });
        return deleted.rowCount ?? 0;
      });
      return { upload: await lifecycle.summary(studyId, uploadId), removed };
    },

    /** Drops an upload that was never committed, and its stored file. */
    discard: lifecycle.discard,
  };
}
