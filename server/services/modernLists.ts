// Modern species lists of a study: their uploads (modernListUploads.ts), the lists with their species per
// threat category, and the crosswalk that pairs a list's trait columns with the study's codebook (saved
// with the list; values it cannot read are listed).
import { and, count, desc, eq, inArray, sql } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import { activity, comparisons, imports, modernLists, modernSpecies, users } from "../../db/schema/index";
import { crosswalkCoverage, crosswalkProblems, listColumns, suggestCrosswalk, type Crosswalk, type CrosswalkTrait } from "../../shared/comparison/index";
import { IUCN_CATEGORIES, type IucnCategory } from "../../shared/iucn";
import type { CrosswalkSaved, ModernList, ModernListCommitInput, ModernListList, ModernListMapping, ModernListSummary } from "../../shared/schemas/modernLists";
import type { Trait } from "../../shared/schemas/traits";
import { invalidInput, notFound } from "../domain/errors";
import { createModernListUploadService, emptyCategoryCounts } from "./modernListUploads";
import { loadCodebook } from "./codebookStore";

type ListRow = typeof modernLists.$inferSelect;

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
      const counts = categories.get(r.listId) ?? emptyCategoryCounts();
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
      categories: categories.get(list.id) ?? emptyCategoryCounts(),
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

  const uploads = createModernListUploadService(db);

  return {
    upload: uploads.upload,
    preview: uploads.preview,
    /** Saves the list from the upload (modernListUploads.ts) and answers with the list. */
    commit: async (studyId: string, uploadId: string, user: { id: string }, input: ModernListCommitInput & { mapping: ModernListMapping }): Promise<ModernList> =>
      detail(studyId, await uploads.saveList(studyId, uploadId, user, input)),
    discard: uploads.discard,

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
