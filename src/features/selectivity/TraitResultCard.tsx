import type { RunParams } from "@shared/schemas/runs";
import { Card } from "../../components/Card";
import { formatCount, pluralize } from "../../lib/format";
import { ChartFigure } from "./ChartFigure";
import { ProportionChart } from "./ProportionChart";
import { contrastWords, type TraitResultData } from "./resultRows";
import { Body, ColHead, HeadRow, ResultTable, td, tdNum } from "./ResultTable";
import { CORRECTION_SHORT, fileSlug, formatEstimate, formatInterval, formatP, formatPercent, KIND_LABEL, levelWords } from "./words";

export interface TraitResultCardProps {
  trait: TraitResultData;
  level: number;
  correction: RunParams["correction"];
  /** Names the downloads: run and boundary. */
  filePrefix: string;
  /** The report opens every table. */
  printable?: boolean;
}

/** One trait at one boundary: its table of states by outcome, the proportions charted, its test and odds ratios. */
export function TraitResultCard({ trait, level, correction, filePrefix, printable = false }: TraitResultCardProps) {
  const dropped = trait.droppedMissing + trait.droppedInvalid;
  const percent = levelWords(level);
  return (
    <Card
      headingLevel={3}
      title={trait.label}
      description={
        <>
          {KIND_LABEL[trait.kind]} · {pluralize(trait.used, "taxon", "taxa")} tested
          {dropped > 0 && <> · {formatCount(trait.droppedMissing)} left out for a missing value{trait.droppedInvalid > 0 && `, ${formatCount(trait.droppedInvalid)} for an unusable one`}</>}
        </>
      }
      className="break-inside-avoid"
    >
      <div data-trait={trait.key} className="space-y-5">
        <TestLine trait={trait} correction={correction} />

        <div className="space-y-5">
          <ResultTable caption={`${trait.label}: taxa by state and outcome, with the extinction proportion and its ${percent} Wilson interval`} minWidth="30rem">
            <HeadRow>
              <ColHead>{trait.kind === "numeric" ? "Quarter of values" : "State"}</ColHead>
              <ColHead numeric>Victims</ColHead>
              <ColHead numeric>Survivors</ColHead>
              <ColHead numeric>Extinct</ColHead>
              <ColHead numeric>{percent} interval</ColHead>
            </HeadRow>
            <Body>
              {trait.table.map((row) => (
                <tr key={row.state} data-state={row.state}>
                  <th scope="row" className={`${td} font-medium`}>
                    {row.label}
                    {row.state === trait.reference && (
                      <>
                        {" "}
                        <span className="ml-1 text-xs font-normal text-stone-500">reference</span>
                      </>
                    )}
                  </th>
                  <td className={tdNum}>{formatCount(row.victims)}</td>
                  <td className={tdNum}>{formatCount(row.survivors)}</td>
                  <td className={tdNum}>{formatPercent(row.proportion)}</td>
                  <td className={tdNum}>{row.ci ? `${formatPercent(row.ci[0])} to ${formatPercent(row.ci[1])}` : "—"}</td>
                </tr>
              ))}
            </Body>
          </ResultTable>

          <ChartFigure
            fileName={`${filePrefix}_${fileSlug(trait.key)}_proportions`}
            chart={<ProportionChart trait={trait} level={level} />}
            caption={
              <>
                Share of taxa lost in each {trait.kind === "numeric" ? "quarter of values" : "state"}, with {percent} Wilson score intervals (Wilson 1927); the dashed
                line is the share over all {pluralize(trait.used, "taxon", "taxa")}.{" "}
                {trait.kind === "numeric"
                  ? "The quarters have no reference, so their bars are neutral; the odds ratio per step below gives the direction."
                  : "The reference state is grey; a state that lost more than the reference is clay red, one that lost fewer is teal, as in the heat map."}{" "}
                The numbers are in the table above.
              </>
            }
          />
        </div>

        {trait.contrasts.length > 0 && (
          <ResultTable caption={`${trait.label}: odds ratios of extinction against the reference`} minWidth="34rem">
            <HeadRow>
              <ColHead>Odds ratio of</ColHead>
              <ColHead numeric>Odds ratio</ColHead>
              <ColHead numeric>{percent} interval</ColHead>
              <ColHead>How</ColHead>
            </HeadRow>
            <Body>
              {trait.contrasts.map((c) => (
                <tr key={c.contrast} data-contrast={c.contrast}>
                  <th scope="row" className={`${td} font-medium`}>
                    {contrastWords(trait, c)}
                  </th>
                  <td className={tdNum}>{formatEstimate(c.crude.estimate)}</td>
                  <td className={tdNum}>{formatInterval(c.crude.ci)}</td>
                  <td className={`${td} text-stone-600`}>{c.crude.method}</td>
                </tr>
              ))}
            </Body>
          </ResultTable>
        )}

        {trait.confoundingNote && (
          <p className="rounded-lg border border-caution-200 bg-caution-50 px-4 py-3 text-[15px] text-stone-800" data-testid={`confounding-note-${trait.key}`}>
            <span className="font-semibold text-caution-700">Flagged: </span>
            {trait.confoundingNote}
          </p>
        )}

        {trait.notes.length > 0 && (
          <details open={printable || undefined}>
            <summary className="cursor-pointer text-sm font-medium text-accent-700 hover:text-accent-900">Notes on this trait ({trait.notes.length})</summary>
            <ul className="mt-2 list-disc space-y-1 pl-5 text-sm text-stone-700">
              {trait.notes.map((note) => (
                <li key={note}>{note}</li>
              ))}
            </ul>
          </details>
        )}
      </div>
    </Card>
  );
}

function TestLine({ trait, correction }: { trait: TraitResultData; correction: RunParams["correction"] }) {
  const { test } = trait;
  return (
    <dl className="grid gap-x-8 gap-y-2 rounded-lg bg-stone-50 px-4 py-3 sm:grid-cols-[minmax(0,2fr)_auto_auto]">
      <div className="min-w-0">
        <dt className="text-xs font-semibold tracking-wide text-stone-500 uppercase">Test</dt>
        <dd className="text-[15px] text-stone-900">
          {test.method}
          {test.statistic !== undefined && (
            <span className="text-stone-600">
              {" "}
              (statistic {formatEstimate(test.statistic)}
              {test.df !== undefined && `, df ${test.df}`})
            </span>
          )}
        </dd>
      </div>
      <div>
        <dt className="text-xs font-semibold tracking-wide text-stone-500 uppercase">p</dt>
        <dd className="text-[15px] font-medium text-stone-900 tabular-nums" data-testid={`p-${trait.key}`}>
          {formatP(test.pValue)}
        </dd>
      </div>
      <div>
        <dt className="text-xs font-semibold tracking-wide text-stone-500 uppercase" title={`Adjusted across all tests of the run by ${CORRECTION_SHORT[correction]}`}>
          Adjusted p ({CORRECTION_SHORT[correction]})
        </dt>
        <dd className="text-[15px] font-medium text-stone-900 tabular-nums" data-testid={`adjusted-p-${trait.key}`}>
          {formatP(test.adjustedPValue)}
        </dd>
      </div>
    </dl>
  );
}
