// Occurrence uploads and what follows from them. An upload goes through the trait-table import's steps
// (an `imports` row with target "occurrences"): the file is kept outside the served folder, a mapping is
// previewed with every row problem, a commit writes all rows in one transaction (or none; leaving invalid
// rows out must be asked for) with progress written outside it, and a revert removes the upload's rows.
// Ranges derived from the study's occurrences (shared/occurrences deriveRanges) are previewed against the
// trait table and applied as coding decisions whose reason names the uploads, revertible as one batch.
// Three-timer sampling per stage comes from the same rows (threeTimerRates).
import { randomUUID } from "node:crypto";
import { chmod, readFile, rm } from "node:fs/promises";
import { and, desc, eq, sql } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import { imports, users } from "../../db/schema/index";
import { parseCsv } from "../../shared/csv/parse";
import { csvTextProblem } from "../../shared/csv/textCheck";
import { deriveRanges, threeTimerRates, type Occurrence } from "../../shared/occurrences/index";
import { describeOccurrenceProblem, readOccurrenceRows } from "../../shared/occurrences/readOccurrenceRows";
import { IMPORT_MAX_BYTES, type ImportSummary } from "../../shared/schemas/imports";
import {
  NO_AGE_COLUMNS_MESSAGE,
  OCCURRENCE_MAX_PROBLEMS_LISTED,
  type OccurrenceCommitInput,
  type OccurrenceList,
  type OccurrenceMapping,
  type OccurrenceMappingDraft,
  type OccurrencePreview,
  type OccurrenceRevertResult,
  type OccurrenceUpload,
  type OccurrenceUploadList,
  type RangeDerivation,
  type RangesApplyResult,
  type RangesPreview,
  type ThreeTimer,
  type ThreeTimerRowDto,
} from "../../shared/schemas/occurrences";
import { timescaleStages } from "../../shared/timescale/index";
import { detailedError, DomainError, invalidInput, notFound } from "../domain/errors";
import { removingOnFailure, type UploadedFile } from "../http/uploads";
import { readStoredUpload, refuseMappingProblems } from "./storedUploads";
import {
  fieldValue,
  insertDecisions,
  insertTaxaWithDecisions,
  isUniqueViolation,
  newBatchId,
  recordActivity,
  setField,
  taxaByName,
  writeTaxa,
  type NewDecision,
  type TaxonState,
} from "./taxonState";

type ImportRow = typeof imports.$inferSelect;
const TARGET = "occurrences";

/** What imports.mapping holds for an occurrence upload: the file's shape and the mapping last previewed. */
interface StoredUploadInfo {
  columns: string[];
  delimiter: "," | ";" | "\t";
  mapping?: OccurrenceMapping;
}

// The trait-table import's commit lock (server/services/imports.ts): the same key space, so that service's
// sweep of interrupted commits, which looks at every "committing" row, sees this commit's lock as held.
const COMMIT_LOCK_SPACE = 0x1a9c0e;
const commitLockKey = (uploadId: string) => sql`${COMMIT_LOCK_SPACE}::int4, hashtext(${uploadId}::text)`;

const STAGES_OLDEST_FIRST = [...timescaleStages].sort((a, b) => b.base - a.base);

/** Occurrences per insert statement. */
const INSERT_CHUNK = 20_000;
const SAMPLE_ROWS = 10;
const PREVIEW_SAMPLE = 20;
/** Finds listed for one taxon. */
const TAXON_LIST_LIMIT = 5000;
/** Below this sampling completeness the Boundary screen warns (common practice, no source). */
export const LOW_SAMPLING_COMPLETENESS = 0.5;

export const THREE_TIMER_METHOD =
  "Three-timer counts and rates (Alroy 2008, PNAS 105 suppl. 1): a taxon counts in a stage where it has a find dated wholly inside it; sampling completeness = three-timers / (three-timers + part-timers).";

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

function toSummary(i: ImportRow, creatorName: string | null, reverterName: string | null): ImportSummary {
  return {
    id: i.id,
    fileName: i.fileName,
    status: i.status as ImportSummary["status"],
    progress: i.status === "committed" || i.status === "reverted" ? 1 : i.progress,
    rowCount: i.rowCount,
    validCount: i.validCount,
    errorCount: i.errorCount,
    createdCount: i.createdCount,
    updatedCount: i.updatedCount,
    skippedInvalid: i.skippedInvalid,
    failureReason: i.failureReason,
    createdBy: i.createdBy ? { id: i.createdBy, name: creatorName ?? "" } : null,
    createdAt: i.createdAt.toISOString(),
    committedAt: i.committedAt?.toISOString() ?? null,
    revertedAt: i.revertedAt?.toISOString() ?? null,
    revertedBy: i.revertedBy ? { id: i.revertedBy, name: reverterName ?? "" } : null,
  };
}

/** Every occurrence of the study (committed uploads only: a revert removes its rows), in storage order. */
export async function loadStudyOccurrences(db: DbOrTx, studyId: string): Promise<Occurrence[]> {
  const res = await db.execute(sql`SELECT taxon, higher_taxon, max_ma, min_ma, collection FROM occurrences WHERE study_id = ${studyId} ORDER BY id`);
  return (res.rows as Array<{ taxon: string; higher_taxon: string | null; max_ma: number; min_ma: number; collection: string | null }>).map((r) => ({
    taxon: r.taxon,
    higherTaxon: r.higher_taxon,
    maxMa: r.max_ma,
    minMa: r.min_ma,
    collection: r.collection,
  }));
}

export function createOccurrenceService(db: Database) {
  async function uploadRow(studyId: string, uploadId: string): Promise<ImportRow> {
    const [row] = await db.select().from(imports).where(and(eq(imports.id, uploadId), eq(imports.studyId, studyId), eq(imports.target, TARGET)));
    if (!row) throw notFound("Occurrence upload not found in this study.");
    return row;
  }

  async function summary(studyId: string, uploadId: string): Promise<ImportSummary> {
    const row = await uploadRow(studyId, uploadId);
    const ids = [row.createdBy, row.revertedBy].filter((id): id is string => id !== null);
    const names = new Map<string, string>();
    for (const id of ids) {
      const [u] = await db.select({ name: users.name }).from(users).where(eq(users.id, id));
      if (u) names.set(id, u.name);
    }
    return toSummary(row, row.createdBy ? (names.get(row.createdBy) ?? null) : null, row.revertedBy ? (names.get(row.revertedBy) ?? null) : null);
  }

  const closed = (row: ImportRow) =>
    new DomainError("conflict",
      "upload_closed",
      row.status === "committing"
        ? "This upload is being committed right now."
        : row.status === "discarded"
          ? "This upload was discarded; upload the file again."
          : `This upload was already ${row.status}; upload the file again to read it anew.`,
    );

  async function readThrough(row: ImportRow, mapping: OccurrenceMapping, dropDuplicates: boolean) {
    const parsed = await readStoredUpload(row);
    refuseMappingProblems(mappingProblems(mapping, parsed.header));
    return readOccurrenceRows(parsed, mapping, { dropDuplicates });
  }

  /** The committed uploads of the study, oldest first. */
  async function committedUploads(tx: DbOrTx, studyId: string) {
    return tx
      .select({ id: imports.id, fileName: imports.fileName })
      .from(imports)
      .where(and(eq(imports.studyId, studyId), eq(imports.target, TARGET), eq(imports.status, "committed")))
      .orderBy(imports.committedAt);
  }

  /** Derived ranges of the study against its trait table. */
  async function planRanges(tx: DbOrTx, studyId: string, opts: RangeDerivation) {
    const occurrences = await loadStudyOccurrences(tx, studyId);
    const { ranges, dropped } = deriveRanges(occurrences, { ageMode: opts.ageMode, maxSpanMyr: opts.maxSpanMyr ?? undefined });
    const live = await tx.execute(sql`SELECT id, name, fad_ma, lad_ma FROM taxa WHERE study_id = ${studyId} AND deleted_at IS NULL`);
    const table = new Map((live.rows as Array<{ id: string; name: string; fad_ma: number | null; lad_ma: number | null }>).map((r) => [r.name, r]));
    const derivedNames = new Set(ranges.map((r) => r.taxon));
    return { occurrences, ranges, dropped, table, derivedNames };
  }

  return {
    upload(studyId: string, user: { id: string }, file: UploadedFile): Promise<OccurrenceUpload> {
      return removingOnFailure(file, async () => {
        if (file.size > IMPORT_MAX_BYTES) throw new DomainError("too_large", "too_large", "The file is larger than the upload limit of 50 MB.");
        const content = await readFile(file.path);
        const bytes = new Uint8Array(content.buffer, content.byteOffset, content.byteLength);
        const notText = csvTextProblem(bytes);
        if (notText) throw new DomainError("unsupported_media", "not_csv_text", notText, { file: notText });
        const parsed = parseCsv(bytes);
        if (parsed.header.length === 0) throw invalidInput("The file is empty: it needs a header row and at least one row of data.", { file: "The file is empty" });
        if (parsed.rows.length === 0) throw invalidInput("The file has a header row but no data rows.", { file: "No data rows" });
        await chmod(file.path, 0o600);
        const info: StoredUploadInfo = { columns: parsed.header, delimiter: parsed.delimiter };
        const fileName = file.originalname.replace(/[\\/]/g, "_").slice(0, 255) || "occurrences.csv";
        const [row] = await db
          .insert(imports)
          .values({ studyId, target: TARGET, fileName, storedPath: file.path, status: "previewed", mapping: info as never, rowCount: parsed.rows.length, createdBy: user.id })
          .returning({ id: imports.id });
        const suggestedMapping = suggestOccurrenceMapping(parsed.header);
        return {
          upload: await summary(studyId, row!.id),
          columns: parsed.header,
          rowCount: parsed.rows.length,
          sampleRows: parsed.rows.slice(0, SAMPLE_ROWS).map((r) => r.cells),
          suggestedMapping,
          ageColumnsFound: [suggestedMapping.maxMa, suggestedMapping.minMa, suggestedMapping.earlyInterval, suggestedMapping.lateInterval].some((c) => c !== null),
        };
      });
    },

    get: summary,

    async list(studyId: string): Promise<OccurrenceUploadList> {
      const rows = await db.select().from(imports).where(and(eq(imports.studyId, studyId), eq(imports.target, TARGET))).orderBy(desc(imports.createdAt)).limit(200);
      const people = new Map<string, string>();
      for (const id of new Set(rows.flatMap((r) => [r.createdBy, r.revertedBy]).filter((id): id is string => id !== null))) {
        const [u] = await db.select({ name: users.name }).from(users).where(eq(users.id, id));
        if (u) people.set(id, u.name);
      }
      return { rows: rows.map((r) => toSummary(r, r.createdBy ? (people.get(r.createdBy) ?? null) : null, r.revertedBy ? (people.get(r.revertedBy) ?? null) : null)) };
    },

    async preview(studyId: string, uploadId: string, input: { mapping: OccurrenceMapping; duplicates: "keep" | "drop" }): Promise<OccurrencePreview> {
      const row = await uploadRow(studyId, uploadId);
      if (row.status !== "previewed") throw closed(row);
      const read = await readThrough(row, input.mapping, input.duplicates === "drop");
      await db
        .update(imports)
        .set({ mapping: { ...(row.mapping as unknown as StoredUploadInfo), mapping: input.mapping } as never, rowCount: read.rowCount, validCount: read.rows.length, errorCount: read.invalidRowCount })
        .where(eq(imports.id, uploadId));
      return {
        upload: await summary(studyId, uploadId),
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
      };
    },

    /** Writes every valid row in one transaction, or nothing; progress (0..1) goes on the upload row from outside it. */
    async commit(studyId: string, uploadId: string, user: { id: string }, input: Required<OccurrenceCommitInput> & { mapping: OccurrenceMapping }): Promise<ImportSummary> {
      const claim: { row?: ImportRow } = {};
      let lastReported = 0;
      const reportProgress = async (fraction: number) => {
        if (fraction - lastReported < 0.02 && fraction < 1) return;
        lastReported = fraction;
        await db.update(imports).set({ progress: Math.min(0.99, fraction) }).where(eq(imports.id, uploadId));
      };
      try {
        const claimed = await db.transaction(async (tx) => {
          await tx.execute(sql`SELECT pg_advisory_xact_lock(${commitLockKey(uploadId)})`);
          const [row] = await db
            .update(imports)
            .set({ status: "committing", progress: 0, failureReason: null })
            .where(and(eq(imports.id, uploadId), eq(imports.studyId, studyId), eq(imports.target, TARGET), eq(imports.status, "previewed")))
            .returning();
          if (!row) throw closed(await uploadRow(studyId, uploadId));
          claim.row = row;
          const read = await readThrough(row, input.mapping, input.duplicates === "drop");
          if (read.problems.length && !input.skipInvalid) {
            throw detailedError("invalid",
              "occurrences_have_problems",
              `Nothing was written: ${read.invalidRowCount} of ${read.rowCount} rows have problems (first: ${describeOccurrenceProblem(read.problems[0]!)}). Correct them, or choose to skip invalid rows.`,
              { problems: read.problems.slice(0, OCCURRENCE_MAX_PROBLEMS_LISTED), problemCount: read.problems.length },
            );
          }
          if (read.rows.length === 0) throw invalidInput("No valid rows to write.", { file: "No valid rows" });
          for (let i = 0; i < read.rows.length; i += INSERT_CHUNK) {
            const chunk = read.rows.slice(i, i + INSERT_CHUNK);
            // One JSON document per statement with one-letter keys, unpacked by PostgreSQL (as taxonState writes taxa).
            const records = chunk.map((o) => ({ r: o.row, t: o.taxon, h: o.higherTaxon, x: o.maxMa, n: o.minMa, e: o.earlyInterval, l: o.lateInterval, c: o.collection, k: o.count }));
            await tx.execute(sql`
              INSERT INTO occurrences (study_id, upload_id, source_row, taxon, higher_taxon, max_ma, min_ma, early_interval, late_interval, collection, count)
              SELECT ${studyId}::uuid, ${uploadId}::uuid, u.r, u.t, u.h, u.x, u.n, u.e, u.l, u.c, u.k
              FROM jsonb_to_recordset(${JSON.stringify(records)}::jsonb) AS u(r int, t text, h text, x float8, n float8, e text, l text, c text, k int)`);
            await reportProgress((i + chunk.length) / read.rows.length);
          }
          await tx
            .update(imports)
            .set({
              status: "committed",
              progress: 1,
              mapping: { ...(row.mapping as unknown as StoredUploadInfo), mapping: input.mapping } as never,
              rowCount: read.rowCount,
              validCount: read.rows.length,
              errorCount: read.invalidRowCount,
              createdCount: read.rows.length,
              skippedInvalid: read.invalidRowCount,
              storedPath: null,
              committedAt: new Date(),
            })
            .where(eq(imports.id, uploadId));
          await recordActivity(tx, {
            studyId,
            userId: user.id,
            kind: "occurrences.committed",
            summary: `Uploaded ${read.rows.length} occurrences from ${row.fileName}${read.invalidRowCount ? `, ${read.invalidRowCount} invalid rows skipped` : ""}`,
            refType: "import",
            refId: uploadId,
          });
          return row;
        });
        if (claimed.storedPath) await rm(claimed.storedPath, { force: true });
        return summary(studyId, uploadId);
      } catch (err) {
        if (!claim.row) throw err;
        const message = err instanceof DomainError ? err.message : "The commit failed; nothing was written.";
        await db.update(imports).set({ status: "previewed", progress: 0, failureReason: message }).where(eq(imports.id, uploadId));
        throw err;
      }
    },

    /** Removes the upload's occurrences. Ranges applied from them stay until their batch is reverted. */
    async revert(studyId: string, uploadId: string, user: { id: string }): Promise<OccurrenceRevertResult> {
      const removed = await db.transaction(async (tx) => {
        const locked = await tx.execute(sql`SELECT status, file_name FROM imports WHERE id = ${uploadId} AND study_id = ${studyId} AND target = ${TARGET} FOR UPDATE`);
        const current = locked.rows[0] as { status: string; file_name: string } | undefined;
        if (!current) throw notFound("Occurrence upload not found in this study.");
        if (current.status !== "committed") throw new DomainError("conflict", "not_committed", current.status === "reverted" ? "This upload was already reverted." : "Only a committed upload can be reverted.");
        const deleted = await tx.execute(sql`DELETE FROM occurrences WHERE upload_id = ${uploadId}`);
        await tx.update(imports).set({ status: "reverted", revertedAt: new Date(), revertedBy: user.id }).where(eq(imports.id, uploadId));
        await recordActivity(tx, {
          studyId,
          userId: user.id,
          kind: "occurrences.reverted",
          summary: `Reverted the occurrence upload ${current.file_name}: ${deleted.rowCount ?? 0} occurrences removed`,
          refType: "import",
          refId: uploadId,
        });
        return deleted.rowCount ?? 0;
      });
      return { upload: await summary(studyId, uploadId), removed };
    },

    async discard(studyId: string, uploadId: string): Promise<void> {
      const row = await uploadRow(studyId, uploadId);
      if (row.status !== "previewed") throw closed(row);
      await db.update(imports).set({ status: "discarded", storedPath: null }).where(and(eq(imports.id, uploadId), eq(imports.status, "previewed")));
      if (row.storedPath) await rm(row.storedPath, { force: true });
    },

    /** One taxon's finds, oldest first, with the upload each came from. */
    async ofTaxon(studyId: string, taxon: string): Promise<OccurrenceList> {
      const res = await db.execute(sql`
        SELECT o.source_row, o.taxon, o.higher_taxon, o.max_ma, o.min_ma, o.early_interval, o.late_interval, o.collection, o.count, o.upload_id, i.file_name,
          count(*) OVER () AS total
        FROM occurrences o JOIN imports i ON i.id = o.upload_id
        WHERE o.study_id = ${studyId} AND o.taxon = ${taxon}
        ORDER BY o.max_ma DESC, o.min_ma DESC, o.id
        LIMIT ${TAXON_LIST_LIMIT}`);
      const rows = res.rows as Array<Record<string, unknown>>;
      const collections = await db.execute(
        sql`SELECT count(DISTINCT collection) AS n FROM occurrences WHERE study_id = ${studyId} AND taxon = ${taxon} AND collection IS NOT NULL AND collection <> ''`,
      );
      return {
        taxon,
        total: rows.length ? Number(rows[0]!.total) : 0,
        collections: Number((collections.rows[0] as { n: string | number }).n),
        occurrences: rows.map((r) => ({
          row: r.source_row as number,
          taxon: r.taxon as string,
          higherTaxon: r.higher_taxon as string | null,
          maxMa: r.max_ma as number,
          minMa: r.min_ma as number,
          earlyInterval: r.early_interval as string | null,
          lateInterval: r.late_interval as string | null,
          collection: r.collection as string | null,
          count: r.count as number | null,
          uploadId: r.upload_id as string,
          fileName: r.file_name as string,
        })),
      };
    },

    /** What applying derived ranges would change: old -> new per taxon, new names, table taxa without occurrences. */
    async previewRanges(studyId: string, opts: RangeDerivation): Promise<RangesPreview> {
      const plan = await planRanges(db, studyId, opts);
      const changes: RangesPreview["changes"] = [];
      const newTaxa: RangesPreview["newTaxa"] = [];
      let unchanged = 0;
      for (const range of plan.ranges) {
        const row = plan.table.get(range.taxon);
        if (!row) newTaxa.push(range);
        else if (row.fad_ma === range.fadMa && row.lad_ma === range.ladMa) unchanged++;
        else changes.push({ ...range, taxonId: row.id, oldFadMa: row.fad_ma, oldLadMa: row.lad_ma });
      }
      const withoutOccurrences = [...plan.table.values()]
        .filter((r) => !plan.derivedNames.has(r.name))
        .sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0))
        .map((r) => ({ taxonId: r.id, name: r.name, fadMa: r.fad_ma, ladMa: r.lad_ma }));
      return {
        changes,
        newTaxa,
        unchanged,
        withoutOccurrences,
        dropped: { count: plan.dropped.length, reasons: plan.dropped.slice(0, 20).map((d) => d.reason) },
        occurrenceCount: plan.occurrences.length,
        uploads: await committedUploads(db, studyId),
      };
    },

    /**
     * Applies the derived ranges of the chosen names in one transaction: a taxon of the table gets its first and
     * last appearance as update decisions, a new name becomes a taxon (a create decision). Every decision's
     * reason names the uploads; all share one batch id, so one batch revert undoes the lot.
     */
    async applyRanges(studyId: string, user: { id: string }, input: RangeDerivation & { taxa: string[]; reason: string }): Promise<RangesApplyResult> {
      try {
        return await db.transaction(async (tx) => {
          const plan = await planRanges(tx, studyId, input);
          const byName = new Map(plan.ranges.map((r) => [r.taxon, r]));
          const chosen = [...new Set(input.taxa.map((t) => t.trim()))];
          const unknown = chosen.filter((name) => !byName.has(name));
          if (unknown.length) {
            throw invalidInput(`No occurrences derive a range for ${unknown.length} chosen name(s), e.g. "${unknown[0]}"; preview again.`, { taxa: `Unknown: ${unknown.slice(0, 5).join(", ")}` });
          }
          const uploads = await committedUploads(tx, studyId);
          const settings = `${input.ageMode === "midpoint" ? "midpoints of the dates" : "widest range the dates allow"}${input.maxSpanMyr !== null ? `, finds dated more coarsely than ${input.maxSpanMyr} Myr left out` : ""}`;
          const reason =
            `Range derived from occurrences (${settings}) of ${uploads.map((u) => `upload "${u.fileName}" (${u.id})`).join(", ")}` + (input.reason ? `: ${input.reason}` : "");
          const batchId = newBatchId();
          const existing = new Map((await taxaByName(tx, studyId, chosen, true)).map((s) => [s.name, s]));
          const created: TaxonState[] = [];
          const updated: TaxonState[] = [];
          const decisions: NewDecision[] = [];
          let unchanged = 0;
          for (const name of chosen) {
            const range = byName.get(name)!;
            const fad = { ma: range.fadMa, interval: null };
            const lad = { ma: range.ladMa, interval: null };
            const state = existing.get(name);
            if (!state) {
              const s: TaxonState = {
                id: randomUUID(),
                name,
                higherTaxon: range.higherTaxon ?? "",
                fadMa: null,
                fadInterval: null,
                ladMa: null,
                ladInterval: null,
                notes: "",
                traitValues: {},
                version: 1,
                updatedAt: new Date(),
                deletedAt: null,
              };
              setField(s, "fad", fad);
              setField(s, "lad", lad);
              created.push(s);
              continue;
            }
            let changed = false;
            for (const [field, to] of [["fad", fad], ["lad", lad]] as const) {
              const from = fieldValue(state, field) as { ma: number; interval: string | null } | null;
              if (from && from.ma === to.ma && from.interval === null) continue;
              decisions.push({ taxonId: state.id, field, action: "update", oldValue: from, newValue: to, reason, batchId });
              setField(state, field, to);
              changed = true;
            }
            if (changed) updated.push(state);
            else unchanged++;
          }
          await insertTaxaWithDecisions(tx, studyId, created, user.id, { reason, importId: null, batchId });
          await writeTaxa(tx, updated, user.id);
          await insertDecisions(tx, studyId, user.id, decisions);
          await recordActivity(tx, {
            studyId,
            userId: user.id,
            kind: "ranges.derived",
            summary: `Ranges from occurrences: ${updated.length} taxa changed, ${created.length} added`,
            refType: "batch",
            refId: batchId,
          });
          return { batchId, changed: updated.length, created: created.length, unchanged, reason };
        });
      } catch (err) {
        if (isUniqueViolation(err)) throw new DomainError("conflict", "name_taken", "A taxon of the same name was added meanwhile; preview again.");
        throw err;
      }
    },

    /** Three-timer counts and rates per stage of the chart, and the stages on both sides of a boundary. */
    async threeTimer(studyId: string, boundaryMa: number | undefined): Promise<ThreeTimer> {
      const occurrences = await loadStudyOccurrences(db, studyId);
      const stages = STAGES_OLDEST_FIRST;
      let maxAge = -Infinity;
      let minAge = Infinity;
      for (const o of occurrences) {
        if (o.maxMa > maxAge) maxAge = o.maxMa;
        if (o.minMa < minAge) minAge = o.minMa;
      }
      // The stages from the oldest find to the youngest, with one more stage on each side for the neighbours.
      const oldestIndex = stages.findIndex((s) => s.top < maxAge);
      const youngestIndex = stages.findLastIndex((s) => s.base > minAge);
      const bins =
        occurrences.length && oldestIndex >= 0 && youngestIndex >= oldestIndex
          ? stages.slice(Math.max(0, oldestIndex - 1), Math.min(stages.length, youngestIndex + 2))
          : [];
      const rows = threeTimerRates(
        occurrences,
        bins.map((s) => ({ name: s.name, baseMa: s.base, topMa: s.top })),
      );
      const dto: ThreeTimerRowDto[] = rows.map((r, i) => ({ ...r, label: bins[i]!.label }));
      const straddling = occurrences.filter((o) => !bins.some((s) => s.top <= o.minMa + 1e-9 && o.maxMa <= s.base + 1e-9)).length;
      let boundary: ThreeTimer["boundary"] = null;
      if (boundaryMa !== undefined) {
        const below = dto.find((r) => r.topMa <= boundaryMa && boundaryMa < r.baseMa) ?? null;
        const above = dto.find((r) => r.topMa < boundaryMa && boundaryMa <= r.baseMa && r !== below) ?? dto.find((r) => r.baseMa === boundaryMa) ?? null;
        const warnings: string[] = [];
        for (const [side, row] of [["below", below], ["above", above]] as const) {
          if (!row) {
            warnings.push(`No occurrences reach the stage ${side} the boundary, so its sampling is unknown.`);
            continue;
          }
          if (row.samplingCompleteness === null) {
            warnings.push(`Sampling completeness of the ${row.label} cannot be computed: no taxon is found both before and after it.`);
          } else if (row.samplingCompleteness < LOW_SAMPLING_COMPLETENESS) {
            warnings.push(
              `Sampling completeness of the ${row.label} is low (${row.samplingCompleteness.toFixed(2)}, below ${LOW_SAMPLING_COMPLETENESS}): ` +
                "a poorly sampled stage inflates the apparent extinction in the stage before it, because taxa not found in it look extinct earlier.",
            );
          }
        }
        boundary = { boundaryMa, below, above, warnings };
      }
      return { method: THREE_TIMER_METHOD, stages: dto, occurrenceCount: occurrences.length, straddling, boundary };
    },
  };
}
export type OccurrenceService = ReturnType<typeof createOccurrenceService>;
