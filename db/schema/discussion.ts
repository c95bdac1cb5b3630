import { index, pgTable, primaryKey, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { studies } from "./studies";
import { users } from "./accounts";

/**
 * A discussion attached to a trait, a taxon, a single trait value (taxon + trait), an outcome
 * override, a run or a comparison.
 */
export const threads = pgTable(
  "threads",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    targetType: text("target_type").notNull(), // trait | taxon | value | override | run | comparison
    targetId: uuid("target_id").notNull(),
    /** For a value thread: the trait of the value (targetId is then the taxon). */
    traitId: uuid("trait_id"),
    title: text("title").notNull(),
    status: text("status").notNull().default("open"), // open | resolved
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    resolvedAt: timestamp("resolved_at", { withTimezone: true }),
    resolvedBy: uuid("resolved_by").references(() => users.id, { onDelete: "set null" }),
    resolutionDecisionId: uuid("resolution_decision_id"),
  },
  (t) => [index("threads_study_idx").on(t.studyId, t.status), index("threads_target_idx").on(t.studyId, t.targetType, t.targetId)],
);

export const threadPosts = pgTable(
  "thread_posts",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    threadId: uuid("thread_id").notNull().references(() => threads.id, { onDelete: "cascade" }),
    authorId: uuid("author_id").references(() => users.id, { onDelete: "set null" }),
    body: text("body").notNull(),
    mentions: uuid("mentions").array().notNull().default([]),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("posts_thread_idx").on(t.threadId, t.createdAt)],
);

export const notifications = pgTable(
  "notifications",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: uuid("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    threadId: uuid("thread_id").references(() => threads.id, { onDelete: "cascade" }),
    postId: uuid("post_id").references(() => threadPosts.id, { onDelete: "cascade" }),
    kind: text("kind").notNull(), // mention
    summary: text("summary").notNull(),
    readAt: timestamp("read_at", { withTimezone: true }),
    emailedAt: timestamp("emailed_at", { withTimezone: true }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("notifications_user_idx").on(t.userId, t.createdAt)],
);

/** How a person hears of mentions in one study: at once, in a daily digest, or not by e-mail. */
export const notificationPreferences = pgTable(
  "notification_preferences",
  {
    userId: uuid("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    mode: text("mode").notNull().default("immediate"), // immediate | digest | none
  },
  (t) => [primaryKey({ columns: [t.userId, t.studyId] })],
);

/** The study's activity feed: imports, bulk decisions, runs, comparisons, threads, membership. */
export const activity = pgTable(
  "activity",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    userId: uuid("user_id").references(() => users.id, { onDelete: "set null" }),
    kind: text("kind").notNull(),
    summary: text("summary").notNull(),
    refType: text("ref_type"),
    refId: uuid("ref_id"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("activity_study_idx").on(t.studyId, t.createdAt)],
);
