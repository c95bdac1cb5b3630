import { z } from "zod";
import type { TimescaleRank } from "../timescale/units";

// Same ranks, broadest first, as RANK_ORDER in shared/timescale (a tuple here, as z.enum needs one).
const RANKS = ["Eon", "Era", "Period", "Subperiod", "Epoch", "Age"] as const satisfies readonly TimescaleRank[];

export const timescaleRankSchema = z.enum(RANKS).meta({
  id: "TimescaleRank",
  description: "Eon, Era, Period (system), Subperiod, Epoch (series) or Age (stage, as the chart's data name it)",
});
export type TimescaleRankName = z.infer<typeof timescaleRankSchema>;

export const timescaleUnitSchema = z
  .object({
    name: z.string().meta({ description: 'Identifier as written in the chart data, e.g. "UpperCretaceous"' }),
    label: z.string().meta({ description: 'Readable name, e.g. "Upper Cretaceous"' }),
    rank: timescaleRankSchema,
    parent: z.string().nullable().meta({ description: "Name of the next broader unit; null for the Phanerozoic" }),
    base: z.number().meta({ description: "Base (older limit) in Ma" }),
    top: z.number().meta({ description: "Top (younger limit) in Ma: the base of the next younger unit of the same rank" }),
    uncertainty: z.number().nullable().meta({ description: "Stated uncertainty of the base in Myr (+/-); null when the chart gives none" }),
    duration: z.number().meta({ description: "base - top in Myr" }),
    gsspRatified: z.boolean(),
    source: z.enum(["chart", "derived", "recalled"]).meta({
      description: "chart: a row of the chart data; derived: named only as a parent, base from its oldest member; recalled: missing from the data, entered from memory",
    }),
  })
  .meta({ id: "TimescaleUnit" });
export type TimescaleUnitDto = z.infer<typeof timescaleUnitSchema>;

export const timescaleSchema = z
  .object({
    version: z.string().meta({ description: 'Chart version, e.g. "2024/12"' }),
    citation: z.string(),
    units: z.array(timescaleUnitSchema).meta({ description: "Youngest first; at an equal base the broader unit first" }),
  })
  .meta({ id: "Timescale" });
export type Timescale = z.infer<typeof timescaleSchema>;
