import { relations } from "drizzle-orm";
import { doublePrecision, integer, pgTable, text, timestamp, unique, uuid } from "drizzle-orm/pg-core";
import { users } from "./accounts";
import { studies } from "./studies";

/**
 * A study's own time bin (a regional stage, a numbered slice): its place in the study's order (1 =
 * oldest), name, base and top in Ma, and the ICS chart unit it is tied to, if any. The set is saved
 * whole (shared/schemas/timeBins.ts checks names, order and overlaps), so rows change together.
 */
export const timeBins = pgTable(
  "time_bins",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "cascade" }),
    position: integer("position").notNull(),
    name: text("name").notNull(),
    baseMa: doublePrecision("base_ma").notNull(),
    topMa: doublePrecision("top_ma").notNull(),
    chartUnit: text("chart_unit"),
    updatedBy: uuid("updated_by").references(() => users.id, { onDelete: "set null" }),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [unique("time_bins_study_position_unique").on(t.studyId, t.position)],
);

export const timeBinsRelations = relations(timeBins, ({ one }) => ({
  study: one(studies, { fields: [timeBins.studyId], references: [studies.id] }),
}));
