import { index, integer, jsonb, pgTable, real, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { studies } from "./studies";
import { users } from "./accounts";

/**
 * A saved selectivity analysis: its parameters, a hash of the exact data it read, its results,
 * who ran it and when. Computed as a job; `status` and `progress` follow the job.
 */
export const runs = pgTable(
  "runs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    status: text("status").notNull().default("queued"), // queued | running | succeeded | failed
    progress: real("progress").notNull().default(0),
    progressNote: text("progress_note"),
    params: jsonb("params").$type<Record<string, unknown>>().notNull(),
    dataHash: text("data_hash"),
    rowCount: integer("row_count"),
    results: jsonb("results").$type<Record<string, unknown>>(),
    error: text("error"),
    appVersion: text("app_version").notNull(),
    jobId: text("job_id"),
    /** 1, plus one for each retry; a job works the run only while the attempt it was sent for is current. */
    attempt: integer("attempt").notNull().default(1),
    /** Renewed every few seconds by the process computing the run; a stale one means that process stopped. */
    heartbeatAt: timestamp("heartbeat_at", { withTimezone: true }),
    rerunOf: uuid("rerun_of"),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { withTimezone: true }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
  },
  (t) => [index("runs_study_idx").on(t.studyId, t.createdAt), index("runs_status_idx").on(t.status)],
);

/** A modern species list with threat categories (IUCN Red List Categories and Criteria 3.1). */
export const modernLists = pgTable(
  "modern_lists",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    importId: uuid("import_id"),
    speciesCount: integer("species_count").notNull().default(0),
    /** The list's columns (trait columns and their distinct values), for the crosswalk screen. */
    columns: jsonb("columns").$type<Array<{ name: string; values: string[] }>>().notNull().default([]),
    /** Saved crosswalk: list column -> study trait, and list values -> trait states. */
    crosswalk: jsonb("crosswalk").$type<Record<string, unknown>>().notNull().default({}),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("modern_lists_study_idx").on(t.studyId)],
);

export const modernSpecies = pgTable(
  "modern_species",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    listId: uuid("list_id").notNull().references(() => modernLists.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    higherTaxon: text("higher_taxon").notNull().default(""),
    category: text("category").notNull(), // EX EW CR EN VU NT LC DD NE
    rawTraits: jsonb("raw_traits").$type<Record<string, string>>().notNull().default({}),
  },
  (t) => [index("modern_species_list_idx").on(t.listId)],
);

/** A saved modern comparison: a run's fitted model scored on a modern list. */
export const comparisons = pgTable(
  "comparisons",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    listId: uuid("list_id").notNull().references(() => modernLists.id, { onDelete: "cascade" }),
    runId: uuid("run_id").notNull().references(() => runs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    params: jsonb("params").$type<Record<string, unknown>>().notNull(),
    dataHash: text("data_hash").notNull(),
    results: jsonb("results").$type<Record<string, unknown>>().notNull(),
    appVersion: text("app_version").notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("comparisons_study_idx").on(t.studyId, t.createdAt)],
);
