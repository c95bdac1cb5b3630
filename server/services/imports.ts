// CSV imports of the trait table. Upload: the file is parsed and kept outside the served folder.
// Preview: every problem by row and column. Commit: the valid rows in one transaction, or nothing;
// leaving invalid rows out must be asked for. Progress is written outside that transaction so the
// client can poll it. Revert: the exact previous values come back, created taxa are removed, and
// every step is itself a coding decision. A commit holds an advisory lock for its whole
// transaction; PostgreSQL releases it when the transaction ends however it ends (a killed process
// included), so a "committing" import whose lock is free was interrupted: the sweep says so and
// the import can be committed again.
import { randomUUID } from "node:crypto";
import { chmod, readFile, rm } from "node:fs/promises";
import { and, count, desc, eq, inArray, lt, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type { Database } from "../db";
import { RepeatingTask } from "../jobs/repeatingTask";
import { codingDecisions, imports, studies, users } from "../../db/schema/index";
import { parseCsv, type CsvDelimiter, type ParsedCsv } from "../../shared/csv/parse";
import { csvTextProblem } from "../../shared/csv/textCheck";
import { mappingProblems, mappingToRemember, suggestMapping, type RememberedMapping } from "../../shared/csv/mapping";
import { validateImportRows, type ImportRowChanges, type ImportValidation } from "../../shared/csv/validate";
import { sameValue } from "../../shared/csv/values";
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
import type { Trait } from "../../shared/schemas/traits";
import type { TraitValue } from "../../shared/schemas/taxa";
import { detailedError, DomainError, invalidInput, notFound } from "../domain/errors";
import { removingOnFailure, type UploadedFile } from "../http/uploads";
import { revertDecisions } from "./decisions";
import {
  fieldValue,
  insertDecisions,
  insertTaxaWithDecisions,
  isUniqueViolation,
  loadCodebook,
  recordActivity,
  setField,
  taxaByName,
  writeTaxa,
  type NewDecision,
  type TaxonState,
} from "./taxonState";
import { readStoredUpload, refuseMappingProblems } from "./storedUploads";

type ImportRow = typeof imports.$inferSelect;

/** What the imports.mapping column holds: the file's shape, and the mapping last previewed. */
interface StoredImportInfo {
  columns: string[];
  delimiter: CsvDelimiter;
  mapping?: ImportMapping;
}

/** How often each process looks for interrupted commits. */
export const IMPORT_SWEEP_EVERY_MS = 30_000;
/** First half of the commit lock's key (the second is a hash of the import id), so it meets no other advisory lock. */
const COMMIT_LOCK_SPACE = 0x1a9c0e;
const commitLockKey = (importId: string) => sql`${COMMIT_LOCK_SPACE}::int4, hashtext(${importId}::text)`;
export const INTERRUPTED_COMMIT =
  "Interrupted: the process writing this import stopped before it finished, and nothing was written. Commit again to import the file.";

const SAMPLE_ROWS = 10;
/** An upload neither committed nor discarded within this time is discarded and its file deleted. */
export const STALE_UPLOAD_MS = 24 * 3600 * 1000;
const PREVIEW_SAMPLE = 50;

const creatorAlias = alias(users, "import_creator");
const reverterAlias = alias(users, "import_reverter");

function toSummary(r: { i: ImportRow; creatorName: string | null; reverterName: string | null }): ImportSummary {
  const { i } = r;
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
    createdBy: i.createdBy ? { id: i.createdBy, name: r.creatorName ?? "" } : null,
    createdAt: i.createdAt.toISOString(),
    committedAt: i.committedAt?.toISOString() ?? null,
    revertedAt: i.revertedAt?.toISOString() ?? null,
    revertedBy: i.revertedBy ? { id: i.revertedBy, name: r.reverterName ?? "" } : null,
  };
}

/** What committing one valid row changes: a new taxon, or the fields that differ from the taxon of that name. */
interface PlannedRow {
  row: ImportRowChanges;
  existing: TaxonState | null;
  changes: Array<{ field: string; traitId: string | null; from: unknown; to: unknown }>;
}

function planRow(row: ImportRowChanges, existing: TaxonState | null): PlannedRow {
  const changes: PlannedRow["changes"] = [];
  const consider = (field: string, traitId: string | null, to: unknown) => {
    const from = existing ? fieldValue(existing, field) : null;
    if (!existing || !sameValue(from, to)) changes.push({ field, traitId, from, to });
  };
  if (row.higherTaxon !== undefined) consider("higherTaxon", null, row.higherTaxon);
  if (row.notes !== undefined) consider("notes", null, row.notes);
  if (row.fad) consider("fad", null, row.fad);
  if (row.lad) consider("lad", null, row.lad);
  for (const [traitId, value] of Object.entries(row.values)) consider(traitId, traitId, value);
  return { row, existing, changes };
}

const NOTES = [
  "Rows are matched to taxa by exact name; a new name adds a taxon.",
  "An empty cell (or NA) keeps what the taxon already holds; it never clears a value.",
  "Range columns take ages in Ma or interval names: a first appearance reads an interval's base, a last appearance its top.",
  "States are read by code or label, ignoring case; numbers may use a decimal comma unless the file is comma separated.",
];

export function createImportService(db: Database) {
  async function summary(studyId: string, importId: string): Promise<ImportSummary> {
    const [row] = await db
      .select({ i: imports, creatorName: creatorAlias.name, reverterName: reverterAlias.name })
      .from(imports)
      .leftJoin(creatorAlias, eq(creatorAlias.id, imports.createdBy))
      .leftJoin(reverterAlias, eq(reverterAlias.id, imports.revertedBy))
      .where(and(eq(imports.id, importId), eq(imports.studyId, studyId), eq(imports.target, "taxa")));
    if (!row) throw notFound("Import not found in this study.");
    return toSummary(row);
  }

  async function importRow(studyId: string, importId: string): Promise<ImportRow> {
    const [row] = await db.select().from(imports).where(and(eq(imports.id, importId), eq(imports.studyId, studyId), eq(imports.target, "taxa")));
    if (!row) throw notFound("Import not found in this study.");
    return row;
  }

  const notPreviewable = (row: ImportRow) =>
    new DomainError("conflict",
      "import_closed",
      row.status === "committing"
        ? "This import is being committed right now."
        : row.status === "discarded"
          ? "This upload was discarded; upload the file again."
          : `This import was already ${row.status}; upload the file again to import it anew.`,
    );

  /** Validates against the codebook and, for ranges, the stored taxa of the same names. */
  function validate(parsed: ParsedCsv, mapping: ImportMapping, codebook: Trait[], existing: Map<string, TaxonState>): ImportValidation {
    return validateImportRows(parsed, mapping, codebook, {
      existing: (name) => {
        const s = existing.get(name);
        return s ? { fad: fieldValue(s, "fad") as never, lad: fieldValue(s, "lad") as never } : undefined;
      },
    });
  }

  const namesIn = (parsed: ParsedCsv, mapping: ImportMapping) => {
    const index = parsed.header.indexOf(mapping.name);
    return [...new Set(parsed.rows.map((r) => r.cells[index]?.trim() ?? "").filter(Boolean))];
  };

  async function remember(studyId: string, mapping: ImportMapping): Promise<void> {
    const remembered = mappingToRemember(mapping);
    // Merged into what the study remembered before, so columns of other files keep their targets.
    await db.execute(sql`
      UPDATE studies SET settings = jsonb_set(settings, '{importMapping}', COALESCE(settings -> 'importMapping', '{}'::jsonb) || ${JSON.stringify(remembered)}::jsonb)
      WHERE id = ${studyId}`);
  }

  /**
   * Puts back imports left "committing" by a process that stopped mid-commit (their commit lock is
   * free), with the reason, so they can be committed again; returns their ids. Their transaction
   * was rolled back by PostgreSQL, so nothing of them was written.
   */
  async function sweepInterrupted(): Promise<string[]> {
    const committing = await db.select({ id: imports.id }).from(imports).where(eq(imports.status, "committing"));
    const swept: string[] = [];
    for (const { id } of committing) {
      const put = await db.transaction(async (tx) => {
        const lock = await tx.execute(sql`SELECT pg_try_advisory_xact_lock(${commitLockKey(id)}) AS free`);
        if (!(lock.rows[0] as { free: boolean }).free) return false; // still being committed
        const back = await tx
          .update(imports)
          .set({ status: "previewed", progress: 0, failureReason: INTERRUPTED_COMMIT })
          .where(and(eq(imports.id, id), eq(imports.status, "committing")))
          .returning({ id: imports.id });
        return back.length > 0;
      });
      if (put) swept.push(id);
    }
    return swept;
  }

  const sweeper = new RepeatingTask("import sweep", sweepInterrupted, IMPORT_SWEEP_EVERY_MS);

  /** Discards uploads left uncommitted for a day, so stored files do not pile up. */
  async function sweepStaleUploads(): Promise<void> {
    const stale = await db
      .select({ id: imports.id, storedPath: imports.storedPath })
      .from(imports)
      .where(and(eq(imports.status, "previewed"), lt(imports.createdAt, new Date(Date.now() - STALE_UPLOAD_MS))));
    for (const row of stale) {
      const [discarded] = await db
        .update(imports)
        .set({ status: "discarded", storedPath: null, failureReason: "Not committed within a day; the upload was discarded." })
        .where(and(eq(imports.id, row.id), eq(imports.status, "previewed")))
        .returning({ id: imports.id });
      if (discarded && row.storedPath) await rm(row.storedPath, { force: true });
    }
  }

  return {
    /** Reads the file multer stored in UPLOAD_DIR and keeps it as the upload's file; removes it when anything fails (no file without its import row). */
    upload(studyId: string, user: { id: string }, file: UploadedFile): Promise<ImportUpload> {
      return removingOnFailure(file, async () => {
        if (file.size > IMPORT_MAX_BYTES) throw new DomainError("too_large", "too_large", "The file is larger than the upload limit of 50 MB.");
        const content = await readFile(file.path);
        const bytes = new Uint8Array(content.buffer, content.byteOffset, content.byteLength);
        const notText = csvTextProblem(bytes);
        if (notText) throw new DomainError("unsupported_media", "not_csv_text", notText, { file: notText });
        const parsed = parseCsv(bytes);
        if (parsed.header.length === 0) throw invalidInput("The file is empty: it needs a header row and at least one row of data.", { file: "The file is empty" });
        if (parsed.rows.length === 0) throw invalidInput("The file has a header row but no data rows.", { file: "No data rows" });
        await sweepStaleUploads();
        const codebook = await loadCodebook(db, studyId);
        const [study] = await db.select({ settings: studies.settings }).from(studies).where(eq(studies.id, studyId));
        const remembered = ((study?.settings as { importMapping?: RememberedMapping } | undefined)?.importMapping ?? {}) as RememberedMapping;
        const suggestion = suggestMapping(parsed.header, codebook, remembered);

        const storedPath = file.path;
        await chmod(storedPath, 0o600);
        const info: StoredImportInfo = { columns: parsed.header, delimiter: parsed.delimiter };
        const fileName = file.originalname.replace(/[\\/]/g, "_").slice(0, 255) || "upload.csv";
        const [row] = await db
          .insert(imports)
          .values({ studyId, target: "taxa", fileName, storedPath, status: "previewed", mapping: info as never, rowCount: parsed.rows.length, createdBy: user.id })
          .returning({ id: imports.id });
        return {
          import: await summary(studyId, row.id),
          columns: parsed.header,
          delimiter: parsed.delimiter,
          encoding: parsed.encoding,
          hadBom: parsed.hadBom,
          rowCount: parsed.rows.length,
          sampleRows: parsed.rows.slice(0, SAMPLE_ROWS).map((r) => r.cells),
          suggestedMapping: suggestion.mapping,
          rememberedColumns: suggestion.rememberedColumns,
          maxBytes: IMPORT_MAX_BYTES,
        };
      });
    },

    get: summary,

    async list(studyId: string, q: { page: number; pageSize: number }): Promise<ImportList> {
      const where = and(eq(imports.studyId, studyId), eq(imports.target, "taxa"));
      const [rows, [{ total }]] = await Promise.all([
        db
          .select({ i: imports, creatorName: creatorAlias.name, reverterName: reverterAlias.name })
          .from(imports)
          .leftJoin(creatorAlias, eq(creatorAlias.id, imports.createdBy))
          .leftJoin(reverterAlias, eq(reverterAlias.id, imports.revertedBy))
          .where(where)
          .orderBy(desc(imports.createdAt))
          .limit(q.pageSize)
          .offset((q.page - 1) * q.pageSize),
        db.select({ total: count() }).from(imports).where(where),
      ]);
      return { rows: rows.map(toSummary), total, page: q.page, pageSize: q.pageSize };
    },

    async preview(studyId: string, importId: string, mapping: ImportMapping): Promise<ImportPreview> {
      const row = await importRow(studyId, importId);
      if (row.status !== "previewed") throw notPreviewable(row);
      const parsed = await readStoredUpload(row);
      const codebook = await loadCodebook(db, studyId);
      refuseMappingProblems(mappingProblems(mapping, parsed.header, codebook));
      const existing = new Map((await taxaByName(db, studyId, namesIn(parsed, mapping), false)).map((s) => [s.name, s]));
      const result = validate(parsed, mapping, codebook, existing);
      const plans = result.rows.map((r) => planRow(r, existing.get(r.name) ?? null));
      const counts = {
        rows: result.rowCount,
        valid: result.rows.length,
        invalid: result.invalidRowCount,
        create: plans.filter((p) => !p.existing).length,
        update: plans.filter((p) => p.existing && p.changes.length).length,
        unchanged: plans.filter((p) => p.existing && !p.changes.length).length,
      };
      const info = { ...(row.mapping as unknown as StoredImportInfo), mapping };
      await db
        .update(imports)
        .set({ mapping: info as never, rowCount: counts.rows, validCount: counts.valid, errorCount: counts.invalid })
        .where(eq(imports.id, importId));
      await remember(studyId, mapping);
      return {
        import: await summary(studyId, importId),
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
      };
    },

    /**
     * Writes the valid rows in one transaction. With invalid rows and skipInvalid false nothing is
     * written and the problems are listed (400). Progress (0..1) is stored on the import row from
     * outside the transaction, for the client to poll.
     */
    async commit(studyId: string, importId: string, user: { id: string }, input: ImportCommitInput & { mapping: ImportMapping }): Promise<ImportSummary> {
      // Set by the claim below: only a claimed import is put back when the commit fails.
      const claim: { row?: ImportRow } = {};
      let lastReported = 0;
      const reportProgress = async (fraction: number) => {
        if (fraction - lastReported < 0.01 && fraction < 1) return;
        lastReported = fraction;
        await db.update(imports).set({ progress: Math.min(0.99, fraction) }).where(eq(imports.id, importId));
      };
      try {
        const claimed = await db.transaction(async (tx) => {
          // The lock comes before the claim, so a claimed import's lock is held until this transaction ends.
          await tx.execute(sql`SELECT pg_advisory_xact_lock(${commitLockKey(importId)})`);
          // Claim the import (outside this transaction, so pollers see it), so two commits of one import cannot both run.
          const [row] = await db
            .update(imports)
            .set({ status: "committing", progress: 0, failureReason: null })
            .where(and(eq(imports.id, importId), eq(imports.studyId, studyId), eq(imports.target, "taxa"), eq(imports.status, "previewed")))
            .returning();
          if (!row) throw notPreviewable(await importRow(studyId, importId));
          claim.row = row;
          const parsed = await readStoredUpload(row);
          const codebook = await loadCodebook(db, studyId);
          refuseMappingProblems(mappingProblems(input.mapping, parsed.header, codebook));
          const names = namesIn(parsed, input.mapping);
          const reason = input.reason || `Imported from ${row.fileName}`;
          // The taxa this file names, locked: an edit in the grid meanwhile waits for the commit.
          const existing = new Map((await taxaByName(tx, studyId, names, true)).map((s) => [s.name, s]));
          const checked = validate(parsed, input.mapping, codebook, existing);
          if (checked.problems.length && !input.skipInvalid) {
            throw detailedError("invalid",
              "import_has_problems",
              `Nothing was imported: ${checked.invalidRowCount} of ${checked.rowCount} rows have problems. Correct them, or choose to skip invalid rows.`,
              { problems: checked.problems.slice(0, IMPORT_MAX_PROBLEMS_LISTED), problemCount: checked.problems.length },
            );
          }
          if (checked.rows.length === 0) throw invalidInput("No valid rows to import.", { file: "No valid rows" });
          const plans = checked.rows.map((r) => planRow(r, existing.get(r.name) ?? null));
          const created: TaxonState[] = [];
          const updated: TaxonState[] = [];
          const decisions: NewDecision[] = [];
          for (const p of plans) {
            if (!p.existing) {
              const s: TaxonState = {
                id: randomUUID(),
                name: p.row.name,
                higherTaxon: "",
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
              // Trait values go straight into the new taxon's one object: setField copies the
              // values for every field, which over 100,000 new taxa of ten traits costs a second.
              for (const c of p.changes) {
                if (c.traitId === null) setField(s, c.field, c.to);
                else if (c.to !== null && c.to !== undefined) s.traitValues[c.traitId] = c.to as TraitValue;
              }
              created.push(s);
            } else if (p.changes.length) {
              for (const c of p.changes) {
                setField(p.existing, c.field, c.to);
                decisions.push({ taxonId: p.existing.id, traitId: c.traitId, field: c.field, action: "update", oldValue: c.from, newValue: c.to, reason, importId, batchId: importId });
              }
              updated.push(p.existing);
            }
          }
          // Progress counts written rows: new taxa with their decisions, changed taxa, their decisions.
          const total = 2 * created.length + updated.length + decisions.length || 1;
          let done = 0;
          const step = async (n: number) => {
            done += n;
            await reportProgress(done / total);
          };
          await insertTaxaWithDecisions(tx, studyId, created, user.id, { reason, importId, batchId: importId }, step);
          await writeTaxa(tx, updated, user.id, step);
          await insertDecisions(tx, studyId, user.id, decisions, step);
          await tx
            .update(imports)
            .set({
              status: "committed",
              progress: 1,
              mapping: { ...(row.mapping as unknown as StoredImportInfo), mapping: input.mapping } as never,
              rowCount: checked.rowCount,
              validCount: checked.rows.length,
              errorCount: checked.invalidRowCount,
              createdCount: created.length,
              updatedCount: updated.length,
              skippedInvalid: checked.invalidRowCount,
              storedPath: null,
              committedAt: new Date(),
            })
            .where(eq(imports.id, importId));
          await recordActivity(tx, {
            studyId,
            userId: user.id,
            kind: "import.committed",
            summary: `Imported ${row.fileName}: ${created.length} taxa added, ${updated.length} changed${checked.invalidRowCount ? `, ${checked.invalidRowCount} invalid rows skipped` : ""}`,
            refType: "import",
            refId: importId,
          });
          return row;
        });
        await remember(studyId, input.mapping);
        await rm(claimed.storedPath!, { force: true });
        return summary(studyId, importId);
      } catch (err) {
        if (!claim.row) throw err;
        const message =
          err instanceof DomainError ? err.message : isUniqueViolation(err) ? "A taxon of the same name was added meanwhile; preview again." : "The commit failed; nothing was written.";
        await db.update(imports).set({ status: "previewed", progress: 0, failureReason: message }).where(eq(imports.id, importId));
        if (isUniqueViolation(err)) throw new DomainError("conflict", "name_taken", message);
        throw err;
      }
    },

    /** Restores the values the import replaced and removes the taxa it added, refusing (409) where values changed since unless skipChanged. */
    async revert(studyId: string, importId: string, user: { id: string }, input: { reason: string; skipChanged: boolean }): Promise<ImportRevertResult> {
      const outcome = await db.transaction(async (tx) => {
        const locked = await tx.execute(sql`SELECT status, file_name FROM imports WHERE id = ${importId} AND study_id = ${studyId} AND target = 'taxa' FOR UPDATE`);
        const current = locked.rows[0] as { status: string; file_name: string } | undefined;
        if (!current) throw notFound("Import not found in this study.");
        if (current.status !== "committed") throw new DomainError("conflict", "not_committed", current.status === "reverted" ? "This import was already reverted." : "Only a committed import can be reverted.");
        const decisions = await tx
          .select()
          .from(codingDecisions)
          .where(and(eq(codingDecisions.studyId, studyId), eq(codingDecisions.importId, importId), inArray(codingDecisions.action, ["create", "update"])));
        const reason = input.reason || `Revert of the import of ${current.file_name}`;
        const result = await revertDecisions(tx, studyId, decisions, { userId: user.id, reason, importId, skipChanged: input.skipChanged, skipUndone: true });
        await tx.update(imports).set({ status: "reverted", revertedAt: new Date(), revertedBy: user.id }).where(eq(imports.id, importId));
        await recordActivity(tx, {
          studyId,
          userId: user.id,
          kind: "import.reverted",
          summary: `Reverted the import of ${current.file_name}: ${result.reverted} decisions undone${result.skipped ? `, ${result.skipped} left as they are` : ""}`,
          refType: "import",
          refId: importId,
        });
        return result;
      });
      return { import: await summary(studyId, importId), ...outcome };
    },

    sweepInterrupted,
    /** Sweeps now and every IMPORT_SWEEP_EVERY_MS until stopSweeping. */
    startSweeping: () => sweeper.start({ now: true }),
    stopSweeping: () => sweeper.stop(),

    /** Drops an upload that was never committed, and its stored file. */
    async discard(studyId: string, importId: string): Promise<void> {
      const row = await importRow(studyId, importId);
      if (row.status !== "previewed") throw notPreviewable(row);
      await db.update(imports).set({ status: "discarded", storedPath: null }).where(and(eq(imports.id, importId), eq(imports.status, "previewed")));
      if (row.storedPath) await rm(row.storedPath, { force: true });
    },
  };
}
export type ImportService = ReturnType<typeof createImportService>;
