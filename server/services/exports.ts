// CSV downloads: an import template from the codebook, the trait table in a wide form (one row
// per taxon) or a tidy long form (one row per taxon and trait), and the codebook as the
// companion file. Large tables are streamed page by page, never held whole in memory.
import { eq, sql } from "drizzle-orm";
import type { Database } from "../db";
import { studies } from "../../db/schema/index";
import { csvRow } from "../../shared/csv/write";
import { TAXON_CSV_COLUMNS, type TaxaExportQuery } from "../../shared/schemas/exports";
import type { Trait } from "../../shared/schemas/traits";
import { notFound } from "../domain/errors";
import type { TaxonState } from "./taxonModel";
import { loadCodebook } from "./codebookStore";
import { stateFromRow } from "./taxaStore";

/** Rows read per query while streaming. */
const PAGE = 5000;

/** A writable the export streams into (an Express response in the app). */
export interface CsvSink {
  write(chunk: string): boolean | void;
  /** Resolves when a sink that answered false to write can take more. */
  drained?(): Promise<void>;
}

const slug = (name: string) =>
  name
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-|-$/g, "")
    .slice(0, 60) || "study";

export function createExportService(db: Database) {
  async function studyName(studyId: string): Promise<string> {
    const [row] = await db.select({ name: studies.name }).from(studies).where(eq(studies.id, studyId));
    if (!row) throw notFound("Study not found.");
    return row.name;
  }

  /** Taxa in name order, PAGE at a time (keyset paging on name and id). */
  async function* taxaPages(studyId: string): AsyncGenerator<TaxonState[]> {
    let after: { name: string; id: string } | null = null;
    for (;;) {
      const res: { rows: Record<string, unknown>[] } = await db.execute(sql`
        SELECT t.id, t.name, t.higher_taxon, t.fad_ma, t.fad_interval, t.lad_ma, t.lad_interval, t.notes, t.trait_values, t.version, t.updated_at, t.deleted_at
        FROM taxa t WHERE t.study_id = ${studyId} AND t.deleted_at IS NULL
        ${after ? sql`AND (t.name, t.id) > (${after.name}, ${after.id}::uuid)` : sql``}
        ORDER BY t.name, t.id LIMIT ${PAGE}`);
      const page: TaxonState[] = res.rows.map(stateFromRow);
      if (page.length === 0) return;
      yield page;
      if (page.length < PAGE) return;
      const last: TaxonState = page[page.length - 1];
      after = { name: last.name, id: last.id };
    }
  }

  const exported = (codebook: Trait[], includeRetired: boolean) => codebook.filter((t) => includeRetired || !t.retired);

  return {
    /** The file name a download should get, e.g. "invented-basin-taxa-wide.csv". */
    async fileName(studyId: string, what: string): Promise<string> {
      return `${slug(await studyName(studyId))}-${what}.csv`;
    },

    /** A header row to fill in: the taxon columns, then one column per active trait (by key). */
    async template(studyId: string): Promise<string> {
      const codebook = exported(await loadCodebook(db, studyId), false);
      return csvRow([
        TAXON_CSV_COLUMNS.name,
        TAXON_CSV_COLUMNS.higherTaxon,
        TAXON_CSV_COLUMNS.firstAppearance,
        TAXON_CSV_COLUMNS.lastAppearance,
        TAXON_CSV_COLUMNS.notes,
        ...codebook.map((t) => t.key),
      ]);
    },

    async taxa(studyId: string, query: TaxaExportQuery, out: CsvSink): Promise<void> {
      await studyName(studyId);
      const traits = exported(await loadCodebook(db, studyId), query.includeRetired);
      if (query.form === "wide") {
        out.write(csvRow(["name", "higher_taxon", "fad_ma", "lad_ma", "fad_interval", "lad_interval", "notes", ...traits.map((t) => t.key)]));
        for await (const page of taxaPages(studyId)) {
          const text = page
            .map((s) => csvRow([s.name, s.higherTaxon, s.fadMa, s.ladMa, s.fadInterval, s.ladInterval, s.notes, ...traits.map((t) => s.traitValues[t.id] ?? null)]))
            .join("");
          if (out.write(text) === false) await out.drained?.();
        }
        return;
      }
      out.write(csvRow(["name", "higher_taxon", "fad_ma", "lad_ma", "trait", "kind", "value", "unit"]));
      for await (const page of taxaPages(studyId)) {
        const lines: string[] = [];
        for (const s of page) {
          for (const t of traits) lines.push(csvRow([s.name, s.higherTaxon, s.fadMa, s.ladMa, t.key, t.kind, s.traitValues[t.id] ?? null, t.unit]));
        }
        if (out.write(lines.join("")) === false) await out.drained?.();
      }
    },

    /** One row per state (a numeric trait: one row with its unit and bounds), in codebook order. */
    async codebook(studyId: string): Promise<string> {
      await studyName(studyId);
      const codebook = await loadCodebook(db, studyId);
      let text = csvRow([
        "trait_key",
        "trait_label",
        "kind",
        "aspect",
        "unit",
        "transform",
        "min_value",
        "max_value",
        "retired",
        "coding_rule",
        "state_code",
        "state_label",
        "state_order",
      ]);
      for (const t of codebook) {
        const head = [t.key, t.label, t.kind, t.aspect, t.unit, t.transform, t.minValue, t.maxValue, t.retired, t.codingRule];
        if (t.states.length === 0) text += csvRow([...head, null, null, null]);
        for (const s of t.states) text += csvRow([...head, s.code, s.label, s.order]);
      }
      return text;
    },
  };
}
export type ExportService = ReturnType<typeof createExportService>;
