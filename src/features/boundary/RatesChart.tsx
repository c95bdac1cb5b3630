import { useId, useState } from "react";
import { BOUNDARY_MARK_COLOUR, REFERENCE_COLOUR, RISK_COLOUR, SUMMARY_COLOUR } from "../../components/chartColours";
import type { BarCustomLayerProps, BarTooltipProps } from "@nivo/bar";
import { DeferredBar } from "../../components/deferredCharts";
import type { RatesResult, StageRates } from "@shared/schemas/outcomes";
import { Card } from "../../components/Card";
import { ErrorState } from "../../components/ErrorState";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { formatCount, pluralize } from "../../lib/format";
import { useRates } from "./api";
import { formatAgeNumber, formatMa } from "../../components/timescale/ages";
import { formatPercent, formatRate, formatWholePercent } from "./words";
import { CHART_FONT, CHART_THEME } from "../../components/chartTheme";

type Measure = "proportionalExtinction" | "q" | "qPerMyr";

const MEASURES: ReadonlyArray<{ value: Measure; label: string; axis: string }> = [
  { value: "proportionalExtinction", label: "Proportional extinction", axis: "Last seen in the stage" },
  { value: "q", label: "Per-capita rate, per stage", axis: "q per stage" },
  { value: "qPerMyr", label: "Per-capita rate, per Myr", axis: "q per Myr" },
];

// From the app's one palette: other stages in the reference grey, the crisis in the red of "more extinction".
const COLOR = { bar: REFERENCE_COLOUR, crisis: RISK_COLOUR.higher, boundary: BOUNDARY_MARK_COLOUR, threshold: SUMMARY_COLOUR, text: "#57534e" };


type StageDatum = { stage: string; value?: number };

function formatValue(measure: Measure, value: number): string {
  return measure === "proportionalExtinction" ? formatPercent(value) : formatRate(value);
}

/** The stage whose losses a boundary at `age` ends: the stage with top <= age < base, or the last one ending exactly there. */
function stageEndingAt(stages: StageRates[], age: number): StageRates | undefined {
  return stages.find((s) => s.top <= age + 1e-9 && age < s.base - 1e-9);
}

/**
 * Extinction through time: one bar per stage the study's taxa span, oldest at the left, the chosen
 * boundary drawn as a line and the stage it closes in red, so the crisis can be read against the background.
 */
export function RatesChart({ studyId, boundary }: { studyId: string; boundary: number | null }) {
  const rates = useRates(studyId);
  const [measure, setMeasure] = useState<Measure>("proportionalExtinction");

  return (
    <Card
      title="Extinction through time"
      description="Every stage the study’s taxa span, oldest at the left, with the chosen boundary marked. Ranges as coded; outcomes set by hand do not change these bars."
    >
      {rates.isPending && <LoadingState label="Loading the rates through time" lines={4} />}
      {rates.isError && <ErrorState error={rates.error} title="The rates through time could not be loaded" onRetry={() => void rates.refetch()} />}
      {rates.isSuccess && rates.data.stages.length === 0 && (
        <p className="rounded-lg border border-dashed border-stone-300 px-4 py-8 text-center text-[15px] text-stone-500">
          No taxon has a usable range yet, so there is nothing to chart. Enter first and last appearances in the trait table.
        </p>
      )}
      {rates.isSuccess && rates.data.stages.length > 0 && <RatesBody data={rates.data} boundary={boundary} measure={measure} onMeasure={setMeasure} />}
    </Card>
  );
}

function RatesBody({ data, boundary, measure, onMeasure }: { data: RatesResult; boundary: number | null; measure: Measure; onMeasure: (m: Measure) => void }) {
  const helpId = useId();
  const measureName = useId();
  const stages = data.stages;
  const crisis = boundary === null ? undefined : stageEndingAt(stages, boundary);
  const spanOld = stages[0].base;
  const spanYoung = stages[stages.length - 1].top;
  const boundaryOutside = boundary !== null && !crisis;
  const chartData: StageDatum[] = stages.map((s) => (s[measure] === null ? { stage: s.label } : { stage: s.label, value: s[measure] as number }));
  const measureInfo = MEASURES.find((m) => m.value === measure)!;
  const missingBars = stages.filter((s) => s[measure] === null).length;

  const maxValue = Math.max(...chartData.map((d) => d.value ?? 0));
  const yMax = measure === "proportionalExtinction" ? 1 : maxValue > 0 ? maxValue * 1.15 : 1;

  return (
    <>
      <fieldset>
        <legend className="sr-only">Measure shown</legend>
        <div className="inline-flex flex-wrap rounded-lg border border-stone-300 bg-stone-100 p-0.5">
          {MEASURES.map((m) => (
            <label
              key={m.value}
              className={cx(
                "cursor-pointer rounded-md px-3 py-1.5 text-sm font-medium transition-colors has-[:focus-visible]:ring-2 has-[:focus-visible]:ring-accent-500",
                measure === m.value ? "bg-white text-stone-900 shadow-sm" : "text-stone-600 hover:text-stone-900",
              )}
            >
              <input type="radio" name={measureName} value={m.value} checked={measure === m.value} onChange={() => onMeasure(m.value)} className="sr-only" />
              {m.label}
            </label>
          ))}
        </div>
      </fieldset>

      <div className="mt-4 h-80" data-testid="rates-chart">
        <DeferredBar<StageDatum>
          data={chartData}
          keys={["value"]}
          indexBy="stage"
          margin={{ top: 28, right: 16, bottom: 72, left: 64 }}
          padding={0.25}
          valueScale={{ type: "linear", min: 0, max: yMax }}
          colors={(bar) => (crisis && bar.indexValue === crisis.label ? COLOR.crisis : COLOR.bar)}
          theme={CHART_THEME}
          enableLabel={false}
          animate={false}
          axisBottom={{ tickSize: 4, tickPadding: 6, tickRotation: stages.length > 8 ? -40 : 0 }}
          axisLeft={{
            tickSize: 4,
            tickPadding: 6,
            format: (v: number) => (measure === "proportionalExtinction" ? formatPercent(v).replace(".0%", "%") : formatRate(v)),
            legend: measureInfo.axis,
            legendPosition: "middle",
            legendOffset: -54,
          }}
          layers={[
            "grid",
            "axes",
            "bars",
            (layer: BarCustomLayerProps<StageDatum>) => (measure === "proportionalExtinction" ? <ThresholdMark layer={layer} proportion={data.threshold.proportion} /> : null),
            (layer: BarCustomLayerProps<StageDatum>) => (boundary !== null && crisis ? <BoundaryMark layer={layer} stages={stages} crisis={crisis} boundary={boundary} /> : null),
          ]}
          tooltip={(props: BarTooltipProps<StageDatum>) => <StageTooltip stage={stages[props.index]} measure={measure} />}
          role="img"
          ariaLabel={`${measureInfo.label} per stage, ${stages[0].label} to ${stages[stages.length - 1].label}${crisis ? `; boundary at ${formatMa(boundary!)}, closing the ${crisis.label}` : ""}`}
          ariaDescribedBy={helpId}
        />
      </div>

      <div id={helpId} className="mt-3 space-y-2 text-sm text-stone-600">
        <p className="flex flex-wrap gap-x-5 gap-y-1">
          <span className="inline-flex items-center gap-2">
            <span className="inline-block size-3 rounded-sm" style={{ background: COLOR.crisis }} aria-hidden="true" />
            {crisis ? `The ${crisis.label}, the stage the boundary closes` : "Stage the boundary closes"}
          </span>
          <span className="inline-flex items-center gap-2">
            <span className="inline-block h-3 w-0.5" style={{ background: COLOR.boundary }} aria-hidden="true" />
            The chosen boundary
          </span>
          {measure === "proportionalExtinction" && (
            <span className="inline-flex items-center gap-2">
              <span className="inline-block w-5 border-t-2 border-dashed" style={{ borderColor: COLOR.threshold }} aria-hidden="true" />
              {formatWholePercent(data.threshold.proportion)} line
            </span>
          )}
        </p>
        {boundary === null && <p>Choose a boundary above to mark it on the chart.</p>}
        {boundaryOutside && (
          <p>
            The boundary at {formatMa(boundary!)} lies outside the stages the study’s taxa span ({formatMa(spanOld)} to {formatMa(spanYoung)}).
          </p>
        )}
        <p>
          <span className="font-medium text-stone-800">Reading the bars.</span> {data.threshold.note} The oldest and youngest stages of the span
          show edge effects: there every taxon is first or last seen within the study’s own range of ages.
        </p>
        <p>
          {data.method} Chart v{data.timescaleVersion}. {pluralize(data.taxaUsed, "taxon", "taxa")} with a usable range.
          {data.leftOut.missingRange + data.leftOut.invalidRange > 0 &&
            ` Left out: ${formatCount(data.leftOut.missingRange)} with a missing range, ${formatCount(data.leftOut.invalidRange)} with an unusable one.`}
          {missingBars > 0 && ` ${pluralize(missingBars, "stage")} without a bar: the measure is undefined there (no taxon, or no taxon crossing both limits of the stage).`}
        </p>
      </div>

      <details className="mt-4">
        <summary className="cursor-pointer text-sm font-medium text-accent-700 hover:text-accent-900">Numbers per stage</summary>
        <StageTable stages={stages} crisis={crisis} />
      </details>
    </>
  );
}

/** The chosen boundary as a vertical line: in the gap after the stage it closes, or inside a stage, to scale, for a custom age. */
function BoundaryMark({ layer, stages, crisis, boundary }: { layer: BarCustomLayerProps<StageDatum>; stages: StageRates[]; crisis: StageRates; boundary: number }) {
  const x = layer.xScale as unknown as { (stage: string): number; bandwidth(): number };
  const band = x.bandwidth();
  const next = stages[stages.indexOf(crisis) + 1];
  const atTop = Math.abs(crisis.top - boundary) < 1e-9;
  const position = atTop && next ? (x(crisis.label) + band + x(next.label)) / 2 : x(crisis.label) + band * ((crisis.base - boundary) / (crisis.base - crisis.top));
  const labelLeft = position > layer.innerWidth * 0.7;
  return (
    <g aria-hidden="true">
      <line x1={position} x2={position} y1={-8} y2={layer.innerHeight} stroke={COLOR.boundary} strokeWidth={2} />
      <text
        x={labelLeft ? position - 4 : position + 4}
        y={-12}
        textAnchor={labelLeft ? "end" : "start"}
        fill={COLOR.boundary}
        style={{ fontFamily: CHART_FONT, fontSize: 12, fontWeight: 600 }}
      >
        Boundary {formatMa(boundary)}
      </text>
    </g>
  );
}

/** The teaching threshold as a dashed line across the proportional-extinction bars. */
function ThresholdMark({ layer, proportion }: { layer: BarCustomLayerProps<StageDatum>; proportion: number }) {
  const y = (layer.yScale as unknown as (v: number) => number)(proportion);
  return (
    <g aria-hidden="true">
      <line x1={0} x2={layer.innerWidth} y1={y} y2={y} stroke={COLOR.threshold} strokeWidth={1.5} strokeDasharray="6 4" />
      <text
        x={4}
        y={y - 5}
        fill={COLOR.threshold}
        stroke="white"
        strokeWidth={3}
        paintOrder="stroke"
        style={{ fontFamily: CHART_FONT, fontSize: 12, fontWeight: 500 }}
      >
        {formatWholePercent(proportion)}: a convention, see below
      </text>
    </g>
  );
}

function StageTooltip({ stage, measure }: { stage: StageRates; measure: Measure }) {
  const value = stage[measure];
  return (
    <div className="rounded-lg border border-stone-200 bg-white px-3 py-2 text-sm shadow-md">
      <p className="font-semibold text-stone-900">{stage.label}</p>
      <p className="text-stone-600 tabular-nums">
        {formatAgeNumber(stage.base)}–{formatMa(stage.top)} · {pluralize(stage.taxonCount, "taxon", "taxa")}
      </p>
      <p className="mt-1 text-stone-900 tabular-nums">{value === null ? "Undefined" : formatValue(measure, value)}</p>
    </div>
  );
}

function StageTable({ stages, crisis }: { stages: StageRates[]; crisis: StageRates | undefined }) {
  const cell = "px-3 py-1.5 text-right tabular-nums";
  const show = (v: number | null, f: (n: number) => string) => (v === null ? "—" : f(v));
  return (
    <div className="mt-3 overflow-x-auto">
      <table className="w-full min-w-[44rem] text-sm">
        <caption className="sr-only">Boundary-crosser counts and extinction per stage, oldest first</caption>
        <thead className="border-b border-stone-200 text-stone-500">
          <tr>
            <th scope="col" className="px-3 py-1.5 text-left font-medium">
              Stage
            </th>
            <th scope="col" className={cx(cell, "font-medium")}>
              Ma
            </th>
            <th scope="col" className={cx(cell, "font-medium")} title="Taxa present in the stage">
              Taxa
            </th>
            <th scope="col" className={cx(cell, "font-medium")} title="Crossing both the base and the top">
              Through
            </th>
            <th scope="col" className={cx(cell, "font-medium")} title="Crossing the base, last seen in the stage">
              Lost
            </th>
            <th scope="col" className={cx(cell, "font-medium")} title="First and last seen in the stage">
              Only here
            </th>
            <th scope="col" className={cx(cell, "font-medium")}>
              q per stage
            </th>
            <th scope="col" className={cx(cell, "font-medium")}>
              q per Myr
            </th>
            <th scope="col" className={cx(cell, "font-medium")}>
              Proportional extinction
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-stone-100">
          {stages.map((s) => (
            <tr key={s.name} data-stage={s.name} className={s === crisis ? "bg-red-50/70" : undefined}>
              <th scope="row" className="px-3 py-1.5 text-left font-medium text-stone-900">
                {s.label}
              </th>
              <td className={cell}>
                {formatAgeNumber(s.base)}–{formatAgeNumber(s.top)}
              </td>
              <td className={cell}>{formatCount(s.taxonCount)}</td>
              <td className={cell}>{formatCount(s.nbt)}</td>
              <td className={cell}>{formatCount(s.nbL)}</td>
              <td className={cell}>{formatCount(s.nFL)}</td>
              <td className={cell}>{show(s.q, formatRate)}</td>
              <td className={cell}>{show(s.qPerMyr, formatRate)}</td>
              <td className={cell}>{show(s.proportionalExtinction, formatPercent)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-2 text-xs text-stone-500">
        Through: crosses the stage’s base and top. Lost: crosses the base and is last seen in the stage. Only here: first and last seen in the stage. q =
        −ln(through ÷ (through + lost)).
      </p>
    </div>
  );
}
