import type { Run, RunResults } from "@shared/schemas/runs";
import { Card } from "../../components/Card";
import { Caution } from "../../components/Caution";
import { cx } from "../../lib/cx";
import { Body, ColHead, HeadRow, ResultTable, td, tdNum } from "./ResultTable";
import { CORRECTION_SHORT, formatEstimate, formatInterval, formatP } from "./words";

/** The marker of a trait whose crisis selectivity differs from background, in this card and on the heat map. */
export const CRISIS_MARK = "◆";

/** Trait keys whose crisis selectivity differs from background by the adjusted test (empty when not tested). */
export function differingTraits(results: RunResults): Set<string> {
  const stored = results.crisisVersusBackground;
  if (!stored || stored.status !== "computed") return new Set();
  return new Set(stored.result.traits.filter((t) => t.differs).map((t) => t.key));
}

/**
 * Crisis against background: per trait, the odds ratio of extinction in background and at the
 * crisis, their ratio with its interval and the adjusted likelihood-ratio test; a plain sentence
 * only where the test says the crisis differed.
 */
export function CrisisCard({ run, printable = false }: { run: Run & { results: RunResults }; printable?: boolean }) {
  const stored = run.results.crisisVersusBackground;
  if (!stored) return null;
  if (stored.status === "not-computed") {
    if (run.results.boundaries.length < 2) return null;
    return (
      <Card title="Crisis against background" className="break-inside-avoid">
        <p className="text-[15px] text-stone-700" data-testid="crisis-not-computed">
          {stored.reason} Name one boundary as the crisis when starting a run to test whether its selectivity differs from the others’.
        </p>
      </Card>
    );
  }
  const { result } = stored;
  const differing = result.traits.filter((t) => t.differs);
  return (
    <Card
      title="Crisis against background"
      description={`Did ${result.crisis.label} sort survivors from victims differently from ${result.background.length === 1 ? result.background[0] : `the ${result.background.length} background boundaries`}? Odds ratios of extinction against each trait’s reference state; the ratio is crisis over background.`}
      className="break-inside-avoid"
    >
      <div className="space-y-4" data-testid="crisis-card">
        {differing.length > 0 ? (
          <ul className="space-y-2" aria-label="What differs at the crisis">
            {differing.map((t) => (
              <li key={t.key} className="rounded-lg border border-accent-200 bg-accent-50/60 px-4 py-2 text-[15px] text-stone-900" data-testid="crisis-sentence">
                <span aria-hidden="true" className="mr-1 text-accent-700">
                  {CRISIS_MARK}
                </span>
                {t.summary}
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-[15px] text-stone-700">No trait’s selectivity at the crisis differs from background after adjusting for {result.traits.length} tests ({CORRECTION_SHORT[result.correction]}).</p>
        )}
        <ResultTable caption={`Crisis against background, ${result.crisis.label}`} minWidth="58rem">
          <HeadRow>
            <ColHead>Trait</ColHead>
            <ColHead>Contrast</ColHead>
            <ColHead numeric>Background OR</ColHead>
            <ColHead numeric>Crisis OR</ColHead>
            <ColHead numeric>Ratio (interval)</ColHead>
            <ColHead numeric>LR χ² (df)</ColHead>
            <ColHead numeric>p</ColHead>
            <ColHead numeric>Adjusted p</ColHead>
          </HeadRow>
          <Body>
            {result.traits.flatMap((t) => {
              const rows = t.contrasts.length ? t.contrasts : [null];
              return rows.map((c, k) => (
                <tr key={`${t.key}-${c?.contrast ?? "none"}`} className={cx(t.differs && "bg-accent-50/40")} data-crisis-trait={t.key}>
                  {k === 0 && (
                    <th scope="row" rowSpan={rows.length} className={cx(td, "align-top font-medium")}>
                      {t.differs && (
                        <span className="mr-1 text-accent-700" title="Crisis selectivity differs from background (adjusted test)">
                          {CRISIS_MARK}
                        </span>
                      )}
                      {t.label}
                    </th>
                  )}
                  {c ? (
                    <>
                      <td className={td}>{c.contrast}</td>
                      <td className={tdNum}>
                        {formatEstimate(c.backgroundOddsRatio)} <span className="text-stone-500">({formatInterval(c.backgroundCi)})</span>
                      </td>
                      <td className={tdNum}>
                        {formatEstimate(c.crisisOddsRatio)} <span className="text-stone-500">({formatInterval(c.crisisCi)})</span>
                      </td>
                      <td className={tdNum}>
                        {formatEstimate(c.ratio.estimate)} <span className="text-stone-500">({formatInterval(c.ratio.ci)})</span>
                      </td>
                    </>
                  ) : (
                    <td className={cx(td, "text-stone-600")} colSpan={4}>
                      {t.summary}
                    </td>
                  )}
                  {k === 0 && (
                    <>
                      <td rowSpan={rows.length} className={cx(tdNum, "align-top")}>
                        {t.test ? `${formatEstimate(t.test.statistic)} (${t.test.df})` : "—"}
                      </td>
                      <td rowSpan={rows.length} className={cx(tdNum, "align-top")}>
                        {formatP(t.test?.pValue)}
                      </td>
                      <td rowSpan={rows.length} className={cx(tdNum, "align-top font-medium")}>
                        {formatP(t.test?.adjustedPValue)}
                      </td>
                    </>
                  )}
                </tr>
              ));
            })}
          </Body>
        </ResultTable>
        <Caution title="One trait at a time">
          Each trait’s model holds that trait alone, with no adjustment for clade or for the other traits. A trait shared by a clade hit hard at the crisis can
          look different at the crisis because of the clade; read this beside the confounding check of the crisis boundary.
        </Caution>
        <details open={printable || undefined} className="text-sm text-stone-600">
          <summary className="cursor-pointer font-medium text-stone-700">How this was tested</summary>
          <p className="mt-2">{result.method}</p>
          <ul className="mt-2 list-disc space-y-1 pl-5">
            {result.traits.flatMap((t) => [...(t.method && t.method.startsWith("Firth") ? [`${t.label}: ${t.method}`] : []), ...t.notes.map((n) => `${t.label}: ${n}`)]).map((line) => (
              <li key={line}>{line}</li>
            ))}
          </ul>
        </details>
      </div>
    </Card>
  );
}
