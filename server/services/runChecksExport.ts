// The CSV table of a run's crisis-against-background results (the `crisis` table of the run
// export, server/services/runExport.ts): one row per trait contrast, or one row per trait that
// could not be tested, or one row saying why the run has no such test.
import type { Run } from "../../shared/schemas/runs";

type Cell = string | number | boolean | null | undefined;

export const CRISIS_COLUMNS = [
  "crisis_boundary",
  "background_boundaries",
  "trait_key",
  "trait_label",
  "contrast",
  "state",
  "reference",
  "background_or",
  "background_ci_low",
  "background_ci_high",
  "crisis_or",
  "crisis_ci_low",
  "crisis_ci_high",
  "ratio",
  "ratio_ci_low",
  "ratio_ci_high",
  "lr_statistic",
  "df",
  "p_value",
  "adjusted_p_value",
  "differs",
  "sentence",
  "summary",
  "method",
];

export function crisisRows(run: Run): Array<Record<string, Cell>> {
  const stored = run.results?.crisisVersusBackground;
  if (!stored) return [];
  if (stored.status === "not-computed") return [{ summary: stored.reason }];
  const { result } = stored;
  const where = { crisis_boundary: result.crisis.label, background_boundaries: result.background.join("; ") };
  return result.traits.flatMap((t) => {
    const trait = {
      ...where,
      trait_key: t.key,
      trait_label: t.label,
      reference: t.reference,
      lr_statistic: t.test?.statistic,
      df: t.test?.df,
      p_value: t.test?.pValue,
      adjusted_p_value: t.test?.adjustedPValue,
      differs: t.differs,
      summary: t.summary,
      method: t.method,
    };
    if (t.contrasts.length === 0) return [trait];
    return t.contrasts.map((c) => ({
      ...trait,
      contrast: c.contrast,
      state: c.state,
      background_or: c.backgroundOddsRatio,
      background_ci_low: c.backgroundCi[0],
      background_ci_high: c.backgroundCi[1],
      crisis_or: c.crisisOddsRatio,
      crisis_ci_low: c.crisisCi[0],
      crisis_ci_high: c.crisisCi[1],
      ratio: c.ratio.estimate,
      ratio_ci_low: c.ratio.ci[0],
      ratio_ci_high: c.ratio.ci[1],
      sentence: c.sentence,
    }));
  });
}
