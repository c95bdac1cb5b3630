import { relations } from "drizzle-orm";
import { bigint, doublePrecision, index, integer, pgTable, text, uuid } from "drizzle-orm/pg-core";
import { studies } from "./studies";
import { imports } from "./traits";

/**
 * One dated find of a taxon, from an occurrence upload (an `imports` row with target "occurrences"):
 * ages in Ma as resolved at upload (interval names kept beside them), optional collection and count.
 * Rows of one upload are written in one transaction and removed together when the upload is reverted.
 */
export const occurrences = pgTable(
  "occurrences",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "cascade" }),
    uploadId: uuid("upload_id")
      .notNull()
      .references(() => imports.id, { onDelete: "cascade" }),
    /** The file's row as a spreadsheet numbers it (header = row 1), to trace a find back to its line. */
    sourceRow: integer("source_row").notNull(),
    taxon: text("taxon").notNull(),
    higherTaxon: text("higher_taxon"),
    maxMa: doublePrecision("max_ma").notNull(),
    minMa: doublePrecision("min_ma").notNull(),
    /** The interval names the ages were resolved from, when given that way. */
    earlyInterval: text("early_interval"),
    lateInterval: text("late_interval"),
    collection: text("collection"),
    /** Specimens or records the row stands for, when the file says. */
    count: integer("count"),
  },
  (t) => [index("occurrences_study_taxon_idx").on(t.studyId, t.taxon), index("occurrences_upload_idx").on(t.uploadId)],
);

export const occurrencesRelations = relations(occurrences, ({ one }) => ({
  study: one(studies, { fields: [occurrences.studyId], references: [studies.id] }),
  upload: one(imports, { fields: [occurrences.uploadId], references: [imports.id] }),
}));
