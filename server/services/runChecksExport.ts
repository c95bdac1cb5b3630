// The CSV tables of a run's checks (server/services/runExport.ts): `crisis`, crisis against
// background, one row per trait contrast (or per untested trait, or one row saying why there is
// no such test); `robustness`, one row per boundary, contrast and variant of the robustness panel.
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
  // A one-boundary run has no background: nothing to say in this table.
  if (stored.status === "not-computed") return (run.results?.boundaries.length ?? 0) > 1 ? [{ summary: stored.reason }] : [];
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

export const ROBUSTNESS_COLUMNS = [
  "boundary_ma",
  "boundary_label",
  "trait_key",
  "trait_label",
  "contrast",
  "variant",
  "variant_label",
  "run_choice",
  "victims",
  "survivors",
  "crude_or",
  "crude_ci_low",
  "crude_ci_high",
  "adjusted_or",
  "adjusted_ci_low",
  "adjusted_ci_high",
  "crude_verdict",
  "adjusted_verdict",
  "verdict_note",
];

/** The `robustness` table: one row per boundary, contrast and variant, with the contrast's verdicts. */
export function robustnessRows(run: Run): Array<Record<string, Cell>> {
  const stored = run.results?.robustness;
  if (!stored) return [];
  if (stored.status === "not-computed") return [{ verdict_note: stored.reason }];
  return stored.boundaries.flatMap((b) => {
    if (!b.panel) return [{ boundary_label: b.label, verdict_note: b.reason }];
    const panel = b.panel;
    const variants = new Map(panel.variants.map((v) => [v.id, v]));
    return panel.contrasts.flatMap((c) =>
      c.estimates.map((e) => {
        const v = variants.get(e.variant)!;
        return {
          boundary_ma: panel.boundaryMa,
          boundary_label: b.label,
          trait_key: c.traitKey,
          trait_label: c.traitLabel,
          contrast: c.contrast,
          variant: v.id,
          variant_label: v.label,
          run_choice: v.kind === "run",
          victims: v.victims,
          survivors: v.survivors,
          crude_or: e.crude?.estimate,
          crude_ci_low: e.crude?.ci[0],
          crude_ci_high: e.crude?.ci[1],
          adjusted_or: e.adjusted?.estimate,
          adjusted_ci_low: e.adjusted?.ci[0],
          adjusted_ci_high: e.adjusted?.ci[1],
          crude_verdict: c.verdict.crude.status,
          adjusted_verdict: c.verdict.adjusted.status,
          verdict_note: v.kind === "run" ? `${c.verdict.crude.sentence} Adjusted: ${c.verdict.adjusted.sentence}` : null,
        };
      }),
    );
  });
}
