import type { RunParams } from "@shared/schemas/runs";
import type { RobustnessPanel } from "@shared/selectivity/robustnessPanel";
import { Card } from "../../components/Card";
import { cx } from "../../lib/cx";
import { formatMa, formatMyr } from "../../components/timescale/ages";
import { formatCount, pluralize } from "../../lib/format";
import { ChartFigure } from "./ChartFigure";
import { ConfoundingCard } from "./ConfoundingCard";
import { ESTIMATE_KINDS, ESTIMATE_STYLE, ForestPlot } from "./ForestPlot";
import { ModelCard } from "./ModelCard";
import { forestRows, type BoundaryResult } from "./resultRows";
import { Body, ColHead, HeadRow, ResultTable, td, tdNum, thNum } from "./ResultTable";
import { TraitResultCard } from "./TraitResultCard";
import { VerdictBadge } from "./RobustnessCard";
import { fileSlug, formatEstimate, formatInterval, levelWords } from "./words";

export interface BoundaryResultsProps {
  boundary: BoundaryResult;
  params: RunParams;
  /** Names the downloads. */
  filePrefix: string;
  printable?: boolean;
  /** The boundary's robustness panel, when the run computed one: its verdicts join the odds-ratio table. */
  robustness?: RobustnessPanel | null;
  /** An earlier boundary of the same page already explained how the confounding flag is decided. */
  explainedAbove?: boolean;
}

/** Everything a run found at one boundary: who entered, the forest plot, the confounding check, each trait, the model. */
export function BoundaryResults({ boundary, params, filePrefix, printable = false, robustness = null, explainedAbove = false }: BoundaryResultsProps) {
  const { result } = boundary;
  const rows = forestRows(result);
  const verdictOf = new Map((robustness?.contrasts ?? []).map((c) => [`${c.traitKey}:${c.contrast}`, c.verdict.adjusted]));
  const percent = levelWords(params.level);
  const prefix = `${filePrefix}_${fileSlug(boundary.label)}`;

  return (
    <div className="space-y-6" data-boundary={boundary.boundaryMa}>
      <DesignLine boundary={boundary} />

      <Card
        title="Odds ratios of extinction"
        description="Each trait state against its reference: crude, adjusted for clade, and adjusted for the other traits, side by side."
        className="break-inside-avoid"
      >
        {rows.length === 0 ? (
          <p className="rounded-lg border border-dashed border-stone-300 px-4 py-8 text-center text-[15px] text-stone-500">
            No odds ratio could be estimated at this boundary: every trait lacked a second state with taxa at risk. The notes of each trait below say why.
          </p>
        ) : (
          <ChartFigure
            fileName={`${prefix}_forest-plot`}
            numbersOpen={printable}
            chart={<ForestPlot rows={rows} level={params.level} title={`Forest plot of odds ratios of extinction at ${boundary.label}: crude and adjusted, log scale`} />}
            caption={
              <>
                Forest plot: odds ratios of extinction with {percent} intervals on a log scale; the dashed line at 1 means no difference from the reference.
                Circles are crude odds ratios (Woolf), squares are adjusted for clade (Mantel-Haenszel over {params.stratifyBy === "higherTaxon" ? "higher taxa" : params.stratifyBy}),
                diamonds are adjusted for the other traits (the multiple regression). Arrows mark intervals that run off the scale.
              </>
            }
            numbers={
              <ResultTable caption={`Odds ratios behind the forest plot, with ${percent} intervals`} minWidth="44rem">
                <HeadRow>
                  <ColHead>Contrast</ColHead>
                  {ESTIMATE_KINDS.map((kind) => (
                    <th key={kind} scope="col" className={thNum}>
                      {ESTIMATE_STYLE[kind].label.split(" (")[0]}
                    </th>
                  ))}
                  {robustness && <ColHead>Robustness (adjusted)</ColHead>}
                </HeadRow>
                <Body>
                  {rows.map((row) => (
                    <tr key={row.id}>
                      <th scope="row" className={cx(td, "font-medium")}>
                        {row.label}: {row.detail}
                        {row.flagged && <span className="ml-1.5 text-xs font-semibold text-caution-700">flagged</span>}
                      </th>
                      {row.estimates.map((e, i) => (
                        <td key={ESTIMATE_KINDS[i]} className={tdNum}>
                          {e ? `${formatEstimate(e.estimate)} (${formatInterval(e.ci)})` : "—"}
                        </td>
                      ))}
                      {robustness && (
                        <td className={td} title={verdictOf.get(row.id)?.sentence} data-robustness={row.id}>
                          {verdictOf.get(row.id) ? <VerdictBadge verdict={verdictOf.get(row.id)!} /> : "—"}
                        </td>
                      )}
                    </tr>
                  ))}
                </Body>
              </ResultTable>
            }
          />
        )}
      </Card>

      <ConfoundingCard result={result} level={params.level} threshold={params.confoundingThreshold} explainedAbove={explainedAbove} />

      <section aria-label={`Each trait at ${boundary.label}`} className="space-y-6">
        {result.traits.map((trait) => (
          <TraitResultCard key={trait.key} trait={trait} level={params.level} correction={params.correction} filePrefix={prefix} printable={printable} />
        ))}
      </section>

      <ModelCard result={result} level={params.level} />
    </div>
  );
}

function DesignLine({ boundary }: { boundary: BoundaryResult }) {
  const { result } = boundary;
  const atRisk = boundary.victims + boundary.survivors;
  return (
    <div className="rounded-xl border border-stone-200 bg-white px-5 py-4 sm:px-6">
      <p className="text-[15px] text-stone-800">
        <span className="font-semibold text-stone-900">{boundary.label}</span> · {formatMa(boundary.boundaryMa)}, window {formatMyr(boundary.windowMyr)}
        {boundary.windowDefaultFrom && <span className="text-stone-600"> (the {boundary.windowDefaultFrom.label})</span>}
      </p>
      <dl className="mt-3 grid grid-cols-2 gap-x-6 gap-y-2 sm:grid-cols-5" aria-label="Taxa entering the analysis">
        <Count label="At risk" value={atRisk} />
        <Count label="Victims" value={result.design.victims} />
        <Count label="Survivors" value={result.design.survivors} />
        <Count label="Not at risk" value={boundary.notAtRisk} />
        <Count label="In the regression" value={result.design.completeCases} />
      </dl>
      {boundary.overridesApplied > 0 && (
        <p className="mt-2 text-sm text-stone-600">{pluralize(boundary.overridesApplied, "outcome")} set by hand on the Boundary screen applied.</p>
      )}
    </div>
  );
}

function Count({ label, value }: { label: string; value: number }) {
  return (
    <div>
      <dt className="text-xs font-semibold tracking-wide text-stone-500 uppercase">{label}</dt>
      <dd className="text-lg font-semibold text-stone-900 tabular-nums">{formatCount(value)}</dd>
    </div>
  );
}
