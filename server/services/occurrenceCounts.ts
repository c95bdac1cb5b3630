// How many finds (occurrences) and distinct collections stand behind each taxon of a grid page: read-only
// columns of the trait table, counted fresh for the page's rows by name (occurrences name their taxon).
import { sql } from "drizzle-orm";
import type { DbOrTx } from "../db";
import { anyUuid } from "./sqlHelpers";

export interface TaxonOccurrenceCounts {
  occurrences: number;
  collections: number;
}

/** Counts by taxon id for the given taxa of the study; every id asked for is in the answer (0 without finds). */
export async function occurrenceCountsOf(db: DbOrTx, studyId: string, taxonIds: string[]): Promise<Map<string, TaxonOccurrenceCounts>> {
  const counts = new Map<string, TaxonOccurrenceCounts>();
  if (taxonIds.length === 0) return counts;
  // One lateral count per taxon over the (study_id, taxon) index: a page of 200 rows costs 200 index scans.
  const res = await db.execute(sql`
    SELECT t.id, c.occurrences, c.collections
    FROM taxa t
    CROSS JOIN LATERAL (
      SELECT count(*)::int AS occurrences, count(DISTINCT o.collection) FILTER (WHERE o.collection <> '')::int AS collections
      FROM occurrences o WHERE o.study_id = t.study_id AND o.taxon = t.name
    ) c
    WHERE t.study_id = ${studyId} AND t.id = ${anyUuid(taxonIds)}`);
  for (const r of res.rows as Array<{ id: string; occurrences: number; collections: number }>) counts.set(r.id, { occurrences: r.occurrences, collections: r.collections });
  for (const id of taxonIds) if (!counts.has(id)) counts.set(id, { occurrences: 0, collections: 0 });
  return counts;
}
