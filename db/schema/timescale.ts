import { boolean, doublePrecision, integer, pgTable, primaryKey, text } from "drizzle-orm/pg-core";

/** Reference data: the International Chronostratigraphic Chart, one row per unit and chart version. */
export const timescaleUnits = pgTable(
  "timescale_units",
  {
    version: text("version").notNull(),
    name: text("name").notNull(),
    label: text("label").notNull(),
    rank: text("rank").notNull(),
    parent: text("parent"),
    baseMa: doublePrecision("base_ma").notNull(),
    topMa: doublePrecision("top_ma").notNull(),
    uncertaintyMa: doublePrecision("uncertainty_ma"),
    gsspRatified: boolean("gssp_ratified").notNull(),
    source: text("source").notNull(), // chart | derived | recalled
    sortOrder: integer("sort_order").notNull(),
  },
  (t) => [primaryKey({ columns: [t.version, t.rank, t.name] })],
);
