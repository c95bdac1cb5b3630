// CSV files of the turnover section: one row per stage (rates, counts, and the counts of each group when the
// diversity curve is split), and the scorecard (the crisis stage's contrasts, each criterion, and the groups
// each criterion read). Pure: the route hands over the turnover result.
import { csvRow } from "../../shared/csv/write";
import { formatMa, formatMyr } from "../../shared/format/ages";
import type { TurnoverResult } from "../../shared/schemas/turnover";

const groupColumn = (label: string) => `range_through_${label.toLowerCase().replace(/[^a-z0-9]+/g, "_").replace(/^_|_$/g, "") || "group"}`;

/** One row per stage, oldest first: limits, flags, boundary-crosser counts, q and p, diversity, and one column per group. */
export function turnoverStagesCsv(result: TurnoverResult): string {
  const groups = result.diversity.groups;
  let text = csvRow([
    "stage",
    "base_ma",
    "top_ma",
    "duration_myr",
    "crisis_stage",
    "edge_stage",
    "nbt",
    "nbL",
    "nFt",
    "nFL",
    "q_per_stage",
    "p_per_stage",
    "q_per_myr",
    "p_per_myr",
    "range_through",
    "crossing_base",
    "crossing_top",
    "first_seen",
    "last_seen",
    "single_stage",
    ...groups.map((g) => groupColumn(g.label)),
  ]);
  result.stages.forEach((s, k) => {
    text += csvRow([
      s.name,
      s.base,
      s.top,
      s.duration,
      s.crisis,
      s.edge,
      s.nbt,
      s.nbL,
      s.nFt,
      s.nFL,
      s.q,
      s.p,
      s.qPerMyr,
      s.pPerMyr,
      s.rangeThrough,
      s.crossingBase,
      s.crossingTop,
      s.firstSeen,
      s.lastSeen,
      s.singleStage,
      ...groups.map((g) => g.stages[k].rangeThrough),
    ]);
  });
  return text;
}

/**
 * The scorecard as a long table: the crisis stage's extinction and origination against background (robust z),
 * then one row per criterion, then one row per group a criterion read. The last rows carry the method, the
 * source of the criteria and the caution, so the file is not read without them.
 */
export function scorecardCsv(result: TurnoverResult): string {
  const { scorecard, contrast } = result;
  let text = csvRow(["row", "criterion", "status", "dimension", "group", "value", "ci_low", "ci_high", "victims", "at_risk", "z", "median", "mad", "n", "note"]);
  const crisis = result.crisisStage?.name ?? null;
  for (const [name, c] of [["extinction_q", contrast?.extinction], ["origination_p", contrast?.origination]] as const) {
    if (!c) continue;
    text += csvRow(["contrast", name, c.departs === null ? "not assessable" : c.departs ? "departs" : "within background", null, crisis, c.value, null, null, null, null, c.z, c.median, c.mad, c.n, c.reason]);
  }
  for (const item of scorecard.items) {
    text += csvRow(["criterion", item.criterion, item.status, null, null, item.value, item.ci?.[0] ?? null, item.ci?.[1] ?? null, null, null, null, null, null, null, item.summary]);
  }
  for (const item of scorecard.items) {
    for (const d of item.dimensions) {
      for (const g of d.groups) {
        text += csvRow([
          "group",
          item.criterion,
          g.over === null ? "too few at risk" : g.over ? "hit" : "spared",
          d.key,
          g.name,
          g.proportion,
          g.ci?.[0] ?? null,
          g.ci?.[1] ?? null,
          g.victims,
          g.atRisk,
          null,
          null,
          null,
          null,
          null,
        ]);
      }
    }
  }
  const note = (line: string) => csvRow(["note", null, null, null, null, null, null, null, null, null, null, null, null, null, line]);
  text += note(
    `Boundary ${formatMa(result.boundary)}, window ${formatMyr(result.window)}; a group is hit when it lost more than ${scorecard.breadthShare} of its taxa at risk (read with at least ${scorecard.minGroupAtRisk} at risk); magnitude against ${scorecard.threshold} with a ${scorecard.level} Wilson interval.`,
  );
  if (contrast) text += note(contrast.method);
  text += note(scorecard.source);
  text += note(scorecard.caution);
  return text;
}
