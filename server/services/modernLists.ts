// Modern species lists. Upload: the file is parsed and kept outside the served folder. Preview: every
// problem by row and column. Commit: the list and all its valid species in one transaction, or
// nothing; leaving invalid rows out must be asked for. The crosswalk pairs the list's trait columns
// with the study's codebook and is saved with the list; values it cannot read are listed.
import { chmod, readFile, rm } from "node:fs/promises";
import { and, count, desc, eq, inArray, sql } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import { activity, comparisons, imports, modernLists, modernSpecies, users } from "../../db/schema/index";
import { parseCsv, type CsvDelimiter } from "../../shared/csv/parse";
import { csvTextProblem } from "../../shared/csv/textCheck";
import {
  crosswalkCoverage,
  crosswalkProblems,
  listColumns,
  modernMappingProblems,
  suggestCrosswalk,
  suggestModernListMapping,
  validateModernListRows,
  type Crosswalk,
  type CrosswalkTrait,
} from "../../shared/comparison/index";
import { IUCN_CATEGORIES, type IucnCategory } from "../../shared/iucn";
import { IMPORT_MAX_PROBLEMS_LISTED } from "../../shared/schemas/imports";
import {
  MODERN_LIST_MAX_BYTES,
  MODERN_LIST_MAX_LABEL,
  type CrosswalkSaved,
  type ModernList,
  type ModernListCommitInput,
  type ModernListList,
  type ModernListMapping,
  type ModernListPreview,
  type ModernListSummary,
  type ModernListUpload,
  type ModernUploadSummary,
} from "../../shared/schemas/modernLists";
import type { Trait } from "../../shared/schemas/traits";
import { detailedError, DomainError, invalidInput, notFound } from "../domain/errors";
import { removingOnFailure, type UploadedFile } from "../http/uploads";
import { loadCodebook } from "./taxonState";
import { readStoredUpload, refuseMappingProblems } from "./storedUploads";

const TARGET = "modern";
const SAMPLE_ROWS = 10;
const PREVIEW_SAMPLE = 50;
const INSERT_BATCH = 2000;

/** What imports.mapping holds for a modern list upload: the file's shape, and the mapping last previewed. */
interface StoredUploadInfo {
  columns: string[];
  delimiter: CsvDelimiter;
  mapping?: ModernListMapping;
}

type UploadRow = typeof imports.$inferSelect;
type ListRow = typeof modernLists.$inferSelect;

const NOTES = [
  "Each row is a species: its name (once per file), higher taxon, threat category and trait columns.",
  "Threat categories are read as IUCN Red List Categories and Criteria 3.1 codes or names, ignoring case.",
  "Trait cells are kept as written; the crosswalk decides which trait and state each value means.",
];

const emptyCounts = (): Record<IucnCategory, number> => Object.fromEntries(IUCN_CATEGORIES.map((c) => [c, 0])) as Record<IucnCategory, number>;

/** The codebook as the crosswalk reads it. */
export const crosswalkTraits = (codebook: Trait[]): CrosswalkTrait[] =>
  codebook.map((t) => ({ id: t.id, key: t.key, label: t.label, kind: t.kind, states: t.states.map((s) => ({ code: s.code, label: s.label })), unit: t.unit, retired: t.retired }));

/** A saved crosswalk, or null when the list has none yet (the column holds {} until one is saved). */
export const savedCrosswalk = (row: Pick<ListRow, "crosswalk">): Crosswalk | null => {
  const c = row.crosswalk as Partial<Crosswalk> | null;
  return c && Array.isArray(c.pairs) ? (c as Crosswalk) : null;
};

/** Lists read numbers with a decimal comma when their file was not comma separated. */
async function decimalCommaOf(db: DbOrTx, importId: string | null): Promise<boolean> {
  if (!importId) return false;
  const [row] = await db.select({ mapping: imports.mapping }).from(imports).where(eq(imports.id, importId));
  const delimiter = (row?.mapping as { delimiter?: string } | undefined)?.delimiter;
  return delimiter !== undefined && delimiter !== ",";
}

/** A list of the study, or a 404. */
export async function listRow(db: DbOrTx, studyId: string, listId: string): Promise<ListRow> {
  const [row] = await db.select().from(modernLists).where(and(eq(modernLists.id, listId), eq(modernLists.studyId, studyId)));
  if (!row) throw notFound("This study has no such modern list (it may have been deleted).");
  return row;
}

/** Everything a comparison reads of a list: its species and how to read their numbers. */
export async function listForComparison(db: DbOrTx, studyId: string, listId: string) {
  const row = await listRow(db, studyId, listId);
  const species = await db
    .select({ name: modernSpecies.name, higherTaxon: modernSpecies.higherTaxon, category: modernSpecies.category, rawTraits: modernSpecies.rawTraits })
    .from(modernSpecies)
    .where(eq(modernSpecies.listId, listId))
    .orderBy(modernSpecies.name);
  return { row, species: species.map((s) => ({ ...s, category: s.category as IucnCategory })), decimalComma: await decimalCommaOf(db, row.importId) };
}

export function createModernListService(db: Database) {
  const creator = (id: string | null, name: string | null) => (id ? { id, name: name ?? "" } : null);

  function uploadSummary(row: UploadRow, creatorName: string | null): ModernUploadSummary {
    return {
      id: row.id,
      fileName: row.fileName,
      status: row.status as ModernUploadSummary["status"],
      rowCount: row.rowCount,
      validCount: row.validCount,
      errorCount: row.errorCount,
      failureReason: row.failureReason,
      createdBy: creator(row.createdBy, creatorName),
      createdAt: row.createdAt.toISOString(),
    };
  }

  async function uploadRow(studyId: string, uploadId: string): Promise<{ row: UploadRow; creatorName: string | null }> {
    const [found] = await db
      .select({ row: imports, creatorName: users.name })
      .from(imports)
      .leftJoin(users, eq(users.id, imports.createdBy))
      .where(and(eq(imports.id, uploadId), eq(imports.studyId, studyId), eq(imports.target, TARGET)));
    if (!found) throw notFound("This study has no such upload of a modern list.");
    return found;
  }

  const closed = (row: UploadRow) =>
    new DomainError("conflict",
      "upload_closed",
      row.status === "committing"
        ? "This list is being saved right now."
        : row.status === "discarded"
          ? "This upload was discarded; upload the file again."
          : "This upload was already saved as a list; upload the file again to add it anew.",
    );

  /** Species per category and comparisons per list, for the lists given. */
  async function listCounts(listIds: string[]) {
    if (listIds.length === 0) return { categories: new Map<string, Record<IucnCategory, number>>(), comparisonCounts: new Map<string, number>() };
    const [byCategory, byComparison] = await Promise.all([
      db
        .select({ listId: modernSpecies.listId, category: modernSpecies.category, n: count() })
        .from(modernSpecies)
        .where(inArray(modernSpecies.listId, listIds))
        .groupBy(modernSpecies.listId, modernSpecies.category),
      db.select({ listId: comparisons.listId, n: count() }).from(comparisons).where(inArray(comparisons.listId, listIds)).groupBy(comparisons.listId),
    ]);
    const categories = new Map<string, Record<IucnCategory, number>>();
    for (const r of byCategory) {
      const counts = categories.get(r.listId) ?? emptyCounts();
      if ((IUCN_CATEGORIES as readonly string[]).includes(r.category)) counts[r.category as IucnCategory] = r.n;
      categories.set(r.listId, counts);
    }
    return { categories, comparisonCounts: new Map(byComparison.map((r) => [r.listId, r.n])) };
  }

  async function summaries(where: ReturnType<typeof eq>): Promise<ModernListSummary[]> {
    const rows = await db
      .select({ list: modernLists, creatorName: users.name, fileName: imports.fileName })
      .from(modernLists)
      .leftJoin(users, eq(users.id, modernLists.createdBy))
      .leftJoin(imports, eq(imports.id, modernLists.importId))
      .where(where)
      .orderBy(desc(modernLists.createdAt), desc(modernLists.id));
    const { categories, comparisonCounts } = await listCounts(rows.map((r) => r.list.id));
    return rows.map(({ list, creatorName, fileName }) => ({
      id: list.id,
      name: list.name,
      speciesCount: list.speciesCount,
      categories: categories.get(list.id) ?? emptyCounts(),
      fileName,
      crosswalkSaved: savedCrosswalk(list) !== null,
      comparisonCount: comparisonCounts.get(list.id) ?? 0,
      createdBy: creator(list.createdBy, creatorName),
      createdAt: list.createdAt.toISOString(),
      updatedAt: list.updatedAt.toISOString(),
    }));
  }

  async function detail(studyId: string, listId: string): Promise<ModernList> {
    const row = await listRow(db, studyId, listId);
    const [summary] = await summaries(eq(modernLists.id, listId));
    const [species, codebook, others, decimalComma] = await Promise.all([
      db.select({ rawTraits: modernSpecies.rawTraits }).from(modernSpecies).where(eq(modernSpecies.listId, listId)),
      loadCodebook(db, studyId),
      db
        .select({ crosswalk: modernLists.crosswalk })
        .from(modernLists)
        .where(and(eq(modernLists.studyId, studyId), sql`${modernLists.id} <> ${listId}`))
        .orderBy(desc(modernLists.updatedAt)),
      decimalCommaOf(db, row.importId),
    ]);
    const columns = listColumns(
      species.map((s) => s.rawTraits),
      row.columns.map((c) => c.name),
    );
    const traits = crosswalkTraits(codebook);
    const saved = savedCrosswalk(row);
    const earlier = others.map(savedCrosswalk).filter((c): c is Crosswalk => c !== null);
    const suggested = suggestCrosswalk(columns, traits, earlier);
    return {
      ...summary,
      columns,
      decimalComma,
      crosswalk: saved,
      suggestedCrosswalk: suggested,
      coverage: crosswalkCoverage(columns, saved ?? suggested, traits, { decimalComma }),
    };
  }

  return {
    /** Reads the file multer stored in UPLOAD_DIR and keeps it as the upload's file; removes it when anything fails. */
    upload(studyId: string, user: { id: string }, file: UploadedFile): Promise<ModernListUpload> {
      return removingOnFailure(file, async () => {
        if (file.size > MODERN_LIST_MAX_BYTES) throw new DomainError("too_large", "too_large", `The file is larger than the upload limit of ${MODERN_LIST_MAX_LABEL}.`);
        const content = await readFile(file.path);
        const bytes = new Uint8Array(content.buffer, content.byteOffset, content.byteLength);
        const notText = csvTextProblem(bytes);
        if (notText) throw new DomainError("unsupported_media", "not_csv_text", notText, { file: notText });
        const parsed = parseCsv(bytes);
        if (parsed.header.length === 0) throw invalidInput("The file is empty: it needs a header row and at least one species.", { file: "The file is empty" });
        if (parsed.rows.length === 0) throw invalidInput("The file has a header row but no species rows.", { file: "No data rows" });
        const storedPath = file.path;
        await chmod(storedPath, 0o600);
        const fileName = file.originalname.replace(/[\\/]/g, "_").slice(0, 255) || "modern-list.csv";
        const info: StoredUploadInfo = { columns: parsed.header, delimiter: parsed.delimiter };
        const [row] = await db
          .insert(imports)
          .values({ studyId, target: TARGET, fileName, storedPath, status: "previewed", mapping: info as never, rowCount: parsed.rows.length, createdBy: user.id })
          .returning({ id: imports.id });
        const { row: stored, creatorName } = await uploadRow(studyId, row.id);
        return {
          upload: uploadSummary(stored, creatorName),
          columns: parsed.header,
          delimiter: parsed.delimiter,
          encoding: parsed.encoding,
          hadBom: parsed.hadBom,
          rowCount: parsed.rows.length,
          sampleRows: parsed.rows.slice(0, SAMPLE_ROWS).map((r) => r.cells),
          suggestedMapping: suggestModernListMapping(parsed.header),
          suggestedName: fileName.replace(/\.(csv|tsv|txt)$/i, "").replace(/[-_]+/g, " ").trim().slice(0, 120) || "Modern list",
          maxBytes: MODERN_LIST_MAX_BYTES,
        };
      });
    },

    async preview(studyId: string, uploadId: string, mapping: ModernListMapping): Promise<ModernListPreview> {
      const { row } = await uploadRow(studyId, uploadId);
      if (row.status !== "previewed") throw closed(row);
      const parsed = await readStoredUpload(row);
      refuseMappingProblems(modernMappingProblems(mapping, parsed.header));
      const result = validateModernListRows(parsed, mapping);
      const categories = emptyCounts();
      for (const r of result.rows) categories[r.category]++;
      await db
        .update(imports)
        .set({ mapping: { ...(row.mapping as unknown as StoredUploadInfo), mapping } as never, rowCount: result.rowCount, validCount: result.rows.length, errorCount: result.invalidRowCount })
        .where(eq(imports.id, uploadId));
      const { row: updated, creatorName } = await uploadRow(studyId, uploadId);
      return {
        upload: uploadSummary(updated, creatorName),
        counts: { rows: result.rowCount, valid: result.rows.length, invalid: result.invalidRowCount },
        categories,
        problems: result.problems.slice(0, IMPORT_MAX_PROBLEMS_LISTED),
        problemCount: result.problems.length,
        sample: result.rows.slice(0, PREVIEW_SAMPLE).map(({ row: r, name, higherTaxon, category, traits }) => ({ row: r, name, higherTaxon, category, traits })),
        notes: NOTES,
      };
    },

    /**
     * Saves the list with its valid species in one transaction. With invalid rows and skipInvalid
     * false nothing is written and the problems are listed (400).
     */
    async commit(studyId: string, uploadId: string, user: { id: string }, input: ModernListCommitInput & { mapping: ModernListMapping }): Promise<ModernList> {
      const claimed = await db
        .update(imports)
        .set({ status: "committing", failureReason: null })
        .where(and(eq(imports.id, uploadId), eq(imports.studyId, studyId), eq(imports.target, TARGET), eq(imports.status, "previewed")))
        .returning();
      if (claimed.length === 0) throw closed((await uploadRow(studyId, uploadId)).row);
      const row = claimed[0];
      try {
        const parsed = await readStoredUpload(row);
        refuseMappingProblems(modernMappingProblems(input.mapping, parsed.header));
        const checked = validateModernListRows(parsed, input.mapping);
        if (checked.problems.length && !input.skipInvalid) {
          throw detailedError("invalid",
            "list_has_problems",
            `Nothing was saved: ${checked.invalidRowCount} of ${checked.rowCount} rows have problems. Correct them, or choose to leave the invalid rows out.`,
            { problems: checked.problems.slice(0, IMPORT_MAX_PROBLEMS_LISTED), problemCount: checked.problems.length },
          );
        }
        if (checked.rows.length === 0) throw invalidInput("No valid rows to save.", { file: "No valid rows" });
        const columnNames = input.mapping.traitColumns;
        const columns = listColumns(
          checked.rows.map((r) => r.traits),
          columnNames,
        ).map((c) => ({ name: c.name, values: c.values.map((v) => v.value).sort((a, b) => a.localeCompare(b, "en", { numeric: true })) }));
        const name = input.name.trim();
        const listId = await db.transaction(async (tx) => {
          const [list] = await tx
            .insert(modernLists)
            .values({ studyId, name, importId: uploadId, speciesCount: checked.rows.length, columns, crosswalk: {}, createdBy: user.id })
            .returning({ id: modernLists.id });
          for (let i = 0; i < checked.rows.length; i += INSERT_BATCH) {
            await tx.insert(modernSpecies).values(
              checked.rows.slice(i, i + INSERT_BATCH).map((r) => ({ listId: list.id, name: r.name, higherTaxon: r.higherTaxon, category: r.category, rawTraits: r.traits })),
            );
          }
          await tx
            .update(imports)
            .set({
              status: "committed",
              progress: 1,
              mapping: { ...(row.mapping as unknown as StoredUploadInfo), mapping: input.mapping } as never,
              rowCount: checked.rowCount,
              validCount: checked.rows.length,
              errorCount: checked.invalidRowCount,
              createdCount: checked.rows.length,
              skippedInvalid: checked.invalidRowCount,
              storedPath: null,
              committedAt: new Date(),
            })
            .where(eq(imports.id, uploadId));
          await tx.insert(activity).values({
            studyId,
            userId: user.id,
            kind: "modern_list.added",
            summary: `Added the modern list "${name}" from ${row.fileName}: ${checked.rows.length} species${checked.invalidRowCount ? `, ${checked.invalidRowCount} invalid rows left out` : ""}`,
            refType: "modern_list",
            refId: list.id,
          });
          return list.id;
        });
        await rm(row.storedPath!, { force: true });
        return detail(studyId, listId);
      } catch (err) {
        const message = err instanceof DomainError ? err.message : "Saving the list failed; nothing was written.";
        await db.update(imports).set({ status: "previewed", failureReason: message }).where(eq(imports.id, uploadId));
        throw err;
      }
    },

    /** Drops an upload that was never saved, and its stored file. */
    async discard(studyId: string, uploadId: string): Promise<void> {
      const { row } = await uploadRow(studyId, uploadId);
      if (row.status !== "previewed") throw closed(row);
      await db.update(imports).set({ status: "discarded", storedPath: null }).where(and(eq(imports.id, uploadId), eq(imports.status, "previewed")));
      if (row.storedPath) await rm(row.storedPath, { force: true });
    },

    list: async (studyId: string): Promise<ModernListList> => ({ lists: await summaries(eq(modernLists.studyId, studyId)) }),

    get: detail,

    /** Saves the crosswalk after checking it against the codebook and the list's columns (400 naming each pair at fault). */
    async saveCrosswalk(studyId: string, listId: string, user: { id: string }, crosswalk: Crosswalk): Promise<CrosswalkSaved> {
      const row = await listRow(db, studyId, listId);
      const traits = crosswalkTraits(await loadCodebook(db, studyId));
      const problems = crosswalkProblems(
        crosswalk,
        traits,
        row.columns.map((c) => c.name),
      );
      if (Object.keys(problems).length) throw invalidInput(`The crosswalk does not fit: ${Object.values(problems).join("; ")}.`, problems);
      const [updated] = await db.transaction(async (tx) => {
        const result = await tx
          .update(modernLists)
          .set({ crosswalk: crosswalk as unknown as Record<string, unknown>, updatedAt: new Date() })
          .where(eq(modernLists.id, listId))
          .returning({ updatedAt: modernLists.updatedAt });
        await tx.insert(activity).values({
          studyId,
          userId: user.id,
          kind: "modern_list.crosswalk_saved",
          summary: `Saved the crosswalk of the modern list "${row.name}": ${crosswalk.pairs.length} trait${crosswalk.pairs.length === 1 ? "" : "s"} paired`,
          refType: "modern_list",
          refId: listId,
        });
        return result;
      });
      const species = await db.select({ rawTraits: modernSpecies.rawTraits }).from(modernSpecies).where(eq(modernSpecies.listId, listId));
      const columns = listColumns(
        species.map((s) => s.rawTraits),
        row.columns.map((c) => c.name),
      );
      return { crosswalk, coverage: crosswalkCoverage(columns, crosswalk, traits, { decimalComma: await decimalCommaOf(db, row.importId) }), updatedAt: updated.updatedAt.toISOString() };
    },

    /** Deletes a list, its species and the comparisons made with it. */
    async remove(studyId: string, listId: string, user: { id: string }): Promise<void> {
      const row = await listRow(db, studyId, listId);
      await db.transaction(async (tx) => {
        await tx.delete(modernLists).where(eq(modernLists.id, listId));
        await tx.insert(activity).values({ studyId, userId: user.id, kind: "modern_list.deleted", summary: `Deleted the modern list "${row.name}" and its comparisons`, refType: "modern_list", refId: listId });
      });
    },
  };
}
export type ModernListService = ReturnType<typeof createModernListService>;
