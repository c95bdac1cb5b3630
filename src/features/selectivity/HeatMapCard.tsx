import { useId, useState } from "react";
import { Card } from "../../components/Card";
import { MISSING_COLOUR, RISK_COLOUR } from "../../components/chartColours";
import { ColourLegend } from "../../components/ColourLegend";
import { cx } from "../../lib/cx";
import { ChartFigure } from "./ChartFigure";
import { ESTIMATE_KINDS, ESTIMATE_STYLE } from "./ForestPlot";
import { LogOddsHeatMap } from "./LogOddsHeatMap";
import { boundaryColumns, heatRows, type BoundaryResult, type HeatMeasure } from "./resultRows";
import { Body, ColHead, HeadRow, ResultTable, td, tdNum, thNum } from "./ResultTable";
import { formatEstimate } from "./words";
import { CRISIS_MARK } from "./CrisisCard";

/** Traits by boundary: does a trait's odds ratio at the crisis stand out against the background intervals? */
export function HeatMapCard({
  boundaries,
  filePrefix,
  printable = false,
  differing,
}: {
  boundaries: readonly BoundaryResult[];
  filePrefix: string;
  printable?: boolean;
  /** Trait keys whose crisis selectivity differs from background: their rows carry the crisis marker. */
  differing?: ReadonlySet<string>;
}) {
  const [measure, setMeasure] = useState<HeatMeasure>("crude");
  const name = useId();
  const marked = (id: string) => differing !== undefined && [...differing].some((key) => id.startsWith(`${key}:`));
  const rows = heatRows(boundaries, measure).map((row) => (marked(row.id) ? { ...row, label: `${CRISIS_MARK} ${row.label}` } : row));
  const columns = boundaryColumns(boundaries);
  const measureLabel = ESTIMATE_STYLE[measure].label.toLowerCase();

  return (
    <Card
      title="Traits across boundaries"
      description="Log odds ratios of extinction, traits by boundary, so a crisis can be set against background intervals."
      className="break-inside-avoid"
    >
      <fieldset className="print:hidden">
        <legend className="mb-2 text-sm font-medium text-stone-800">Odds ratio shown</legend>
        <div className="inline-flex flex-wrap rounded-lg border border-stone-300 bg-stone-100 p-0.5">
          {ESTIMATE_KINDS.map((kind) => (
            <label
              key={kind}
              className={cx(
                "cursor-pointer rounded-md px-3 py-1.5 text-sm font-medium transition-colors has-[:focus-visible]:ring-2 has-[:focus-visible]:ring-accent-500",
                measure === kind ? "bg-white text-stone-900 shadow-sm" : "text-stone-600 hover:text-stone-900",
              )}
            >
              <input type="radio" name={name} value={kind} checked={measure === kind} onChange={() => setMeasure(kind)} className="sr-only" />
              {ESTIMATE_STYLE[kind].label}
            </label>
          ))}
        </div>
      </fieldset>
      <ColourLegend
        label="Colours of the heat map"
        className="mt-4"
        entries={[
          { colour: RISK_COLOUR.higher, label: "Raised the odds of extinction (odds ratio above 1)" },
          { colour: RISK_COLOUR.lower, label: "Lowered them (below 1)" },
          { colour: RISK_COLOUR.even, label: "About even" },
          { colour: MISSING_COLOUR, label: "Not estimable" },
        ]}
      />
      <div className="mt-3 overflow-x-auto">
        <ChartFigure
          fileName={`${filePrefix}_heat-map_${measure}`}
          numbersOpen={printable}
          chart={<LogOddsHeatMap rows={rows} title={`Heat map of natural log odds ratios (${measureLabel}), traits by boundary`} />}
          caption={
            <>
              Heat map of natural log odds ratios ({measureLabel}) against each trait’s reference state, one column per boundary. The colour scale is centred on 0
              (an odds ratio of 1) and symmetric; grey cells could not be estimated. Numbers in the cells are ln odds ratios.
              {differing !== undefined && differing.size > 0 && ` ${CRISIS_MARK} marks traits whose selectivity at the crisis differs from background (crisis against background, adjusted test).`}
            </>
          }
          numbers={
            <ResultTable caption={`Odds ratios (${measureLabel}) by trait and boundary`} minWidth={`${16 + columns.length * 10}rem`}>
              <HeadRow>
                <ColHead>Contrast</ColHead>
                {columns.map((column) => (
                  <th key={column} scope="col" className={thNum}>
                    {column}
                  </th>
                ))}
              </HeadRow>
              <Body>
                {rows.map((row) => (
                  <tr key={row.id}>
                    <th scope="row" className={cx(td, "font-medium")}>
                      {row.label}
                    </th>
                    {row.cells.map((cell) => (
                      <td key={cell.boundary} className={tdNum}>
                        {cell.oddsRatio === null ? "—" : `OR ${formatEstimate(cell.oddsRatio)} (ln ${formatEstimate(cell.logOdds)})`}
                      </td>
                    ))}
                  </tr>
                ))}
              </Body>
            </ResultTable>
          }
        />
      </div>
    </Card>
  );
}
