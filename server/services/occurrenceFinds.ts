// The finds a study holds (rows of committed occurrence uploads; a revert removes its rows): all of
// them for ranges and sampling, or one taxon's for its row of the trait table.
import { sql } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import type { Occurrence } from "../../shared/occurrences/index";
import type { OccurrenceList } from "../../shared/schemas/occurrences";

/** Finds listed for one taxon. */
const TAXON_LIST_LIMIT = 5000;

/** Every occurrence of the study, in storage order. */
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

/** One taxon's finds, oldest first, with the upload each came from. */
export async function taxonFinds(db: Database, studyId: string, taxon: string): Promise<OccurrenceList> {
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
}
