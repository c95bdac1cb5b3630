import { doublePrecision, index, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { studies } from "./studies";
import { users } from "./accounts";
import { taxa } from "./traits";

/**
 * A taxon's outcome across a boundary set by hand, with a reason (reworked material, a taxon
 * that reappears after a gap). `boundaryMa` null means it applies at any boundary. Revoking keeps
 * the row; each set and revoke is also a coding decision.
 */
export const outcomeOverrides = pgTable(
  "outcome_overrides",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    taxonId: uuid("taxon_id").notNull().references(() => taxa.id, { onDelete: "cascade" }),
    boundaryMa: doublePrecision("boundary_ma"),
    outcome: text("outcome").notNull(), // survivor | victim | excluded
    reason: text("reason").notNull(),
    source: text("source").notNull().default("manual"), // manual | import
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
    revokedBy: uuid("revoked_by").references(() => users.id, { onDelete: "set null" }),
  },
  (t) => [index("overrides_study_idx").on(t.studyId, t.taxonId)],
);
