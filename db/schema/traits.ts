import { relations, sql } from "drizzle-orm";
import { bigint, doublePrecision, index, integer, jsonb, pgEnum, pgTable, real, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { studies } from "./studies";
import { users } from "./accounts";
import { TRAIT_KINDS, TRAIT_ASPECTS, NUMERIC_TRANSFORMS, type TraitState } from "../../shared/codebook";

export const traitKind = pgEnum("trait_kind", TRAIT_KINDS);
export const traitAspect = pgEnum("trait_aspect", TRAIT_ASPECTS);
export const numericTransform = pgEnum("numeric_transform", NUMERIC_TRANSFORMS);

/** The codebook: one row per trait definition of a study. */
export const traits = pgTable(
  "traits",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    key: text("key").notNull(),
    label: text("label").notNull(),
    kind: traitKind("kind").notNull(),
    aspect: traitAspect("aspect").notNull().default("ecology"),
    /** For binary, categorical and ordinal traits: the allowed codes in order. */
    states: jsonb("states").$type<TraitState[]>().notNull().default([]),
    unit: text("unit"),
    transform: numericTransform("transform").notNull().default("none"),
    minValue: doublePrecision("min_value"),
    maxValue: doublePrecision("max_value"),
    codingRule: text("coding_rule").notNull().default(""),
    sortOrder: integer("sort_order").notNull().default(0),
    retiredAt: timestamp("retired_at", { withTimezone: true }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("traits_study_key_idx").on(t.studyId, t.key)],
);

/**
 * A row of the trait table. Trait values live in one JSON object keyed by trait id, so a grid
 * page is one row read; `version` guards against lost updates between concurrent editors.
 */
export const taxa = pgTable(
  "taxa",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    higherTaxon: text("higher_taxon").notNull().default(""),
    /** First and last appearance in Ma (older is larger); null when unknown. */
    fadMa: doublePrecision("fad_ma"),
    ladMa: doublePrecision("lad_ma"),
    /** The named intervals the ages were resolved from, when given that way. */
    fadInterval: text("fad_interval"),
    ladInterval: text("lad_interval"),
    notes: text("notes").notNull().default(""),
    traitValues: jsonb("trait_values").$type<Record<string, string | number>>().notNull().default({}),
    version: integer("version").notNull().default(1),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    updatedBy: uuid("updated_by").references(() => users.id, { onDelete: "set null" }),
    deletedAt: timestamp("deleted_at", { withTimezone: true }),
  },
  (t) => [
    // Unique among live taxa only: a taxon removed by a revert keeps its history and its name is free again.
    uniqueIndex("taxa_study_live_name_idx").on(t.studyId, t.name).where(sql`deleted_at IS NULL`),
    // No indexes for filters or sorts (trait values, name fragments, higher taxa, ages): the grid
    // filters and sorts its in-memory copy of the study (server/services/taxaGrid.ts), and such
    // indexes would only slow every import and edit down.
  ],
);

/**
 * Which taxa each transaction changed, written by statement triggers on `taxa` (migration 0008) in
 * the changing transaction itself, so a change and its log entry commit together. A process that
 * keeps a copy of a study's grid columns asks this log which taxa changed in transactions its
 * copy's snapshot cannot see. No foreign keys: a deleted study's entries age out with the rest.
 */
export const taxaChanges = pgTable(
  "taxa_changes",
  {
    studyId: uuid("study_id").notNull(),
    taxonId: uuid("taxon_id").notNull(),
    /** The writing transaction's id (xid8 as a number), compared with snapshots by pg_visible_in_snapshot. */
    txid: bigint("txid", { mode: "bigint" })
      .notNull()
      .default(sql`(pg_current_xact_id()::text)::bigint`),
    changedAt: timestamp("changed_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("taxa_changes_study_txid_idx").on(t.studyId, t.txid), index("taxa_changes_changed_at_idx").on(t.changedAt)],
);

/** An uploaded CSV: previewed, then committed in one transaction (or not at all), revertible. */
export const imports = pgTable(
  "imports",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    /** taxa: the trait table; modern: a modern species list. */
    target: text("target").notNull().default("taxa"),
    fileName: text("file_name").notNull(),
    /** Where the upload is kept (outside the served folder) until it is committed or discarded. */
    storedPath: text("stored_path"),
    status: text("status").notNull().default("previewed"), // previewed | committing | committed | reverted | discarded
    mapping: jsonb("mapping").$type<Record<string, unknown>>().notNull().default({}),
    rowCount: integer("row_count").notNull().default(0),
    validCount: integer("valid_count").notNull().default(0),
    errorCount: integer("error_count").notNull().default(0),
    createdCount: integer("created_count").notNull().default(0),
    updatedCount: integer("updated_count").notNull().default(0),
    skippedInvalid: integer("skipped_invalid").notNull().default(0),
    failureReason: text("failure_reason"),
    /** 0..1 while a commit runs, written outside the commit's transaction so pollers can see it. */
    progress: real("progress").notNull().default(0),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    committedAt: timestamp("committed_at", { withTimezone: true }),
    revertedAt: timestamp("reverted_at", { withTimezone: true }),
    revertedBy: uuid("reverted_by").references(() => users.id, { onDelete: "set null" }),
  },
  (t) => [index("imports_study_idx").on(t.studyId, t.createdAt)],
);

/**
 * The audit trail: every change of a trait value, a range, a taxon or an outcome is one row.
 * `field` names what changed: a trait id for values, or name | higherTaxon | notes | fad | lad
 * (a range end, valued { ma, interval }) | taxon (created, deleted or restored; valued by a
 * snapshot of the taxon) | outcome (an override).
 */
export const codingDecisions = pgTable(
  "coding_decisions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    taxonId: uuid("taxon_id").references(() => taxa.id, { onDelete: "cascade" }),
    traitId: uuid("trait_id").references(() => traits.id, { onDelete: "set null" }),
    field: text("field").notNull(),
    action: text("action").notNull(), // create | update | delete | revert | override
    oldValue: jsonb("old_value").$type<unknown>(),
    newValue: jsonb("new_value").$type<unknown>(),
    reason: text("reason").notNull().default(""),
    userId: uuid("user_id").references(() => users.id, { onDelete: "set null" }),
    importId: uuid("import_id").references(() => imports.id, { onDelete: "set null" }),
    revertsId: uuid("reverts_id"),
    batchId: uuid("batch_id"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("decisions_study_idx").on(t.studyId, t.createdAt),
    index("decisions_taxon_idx").on(t.taxonId, t.createdAt),
    index("decisions_import_idx").on(t.importId),
    index("decisions_reverts_idx").on(t.revertsId),
    index("decisions_batch_idx").on(t.batchId),
  ],
);

export const traitsRelations = relations(traits, ({ one }) => ({ study: one(studies, { fields: [traits.studyId], references: [studies.id] }) }));
export const taxaRelations = relations(taxa, ({ one, many }) => ({
  study: one(studies, { fields: [taxa.studyId], references: [studies.id] }),
  decisions: many(codingDecisions),
}));
export const codingDecisionsRelations = relations(codingDecisions, ({ one }) => ({
  taxon: one(taxa, { fields: [codingDecisions.taxonId], references: [taxa.id] }),
  user: one(users, { fields: [codingDecisions.userId], references: [users.id] }),
  import: one(imports, { fields: [codingDecisions.importId], references: [imports.id] }),
}));
