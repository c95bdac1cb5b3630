import { useId } from "react";
import type { BarCustomLayerProps, BarTooltipProps } from "@nivo/bar";
import { DeferredBar } from "../../components/deferredCharts";
import type { ThreeTimer, ThreeTimerRowDto } from "@shared/schemas/occurrences";
import type { RatesResult } from "@shared/schemas/outcomes";
import { ButtonLink } from "../../components/Button";
import { Card } from "../../components/Card";
import { Caution } from "../../components/Caution";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { formatAgeNumber, formatMa } from "../../components/timescale/ages";
import { cx } from "../../lib/cx";
import { formatCount, pluralize } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useRates, useThreeTimer } from "./api";
import { formatRate } from "./words";
import { CHART_FONT, CHART_THEME } from "../../components/chartTheme";

/** Below this sampling completeness a stage is called poorly sampled (common practice, no source; the same line as the boundary warning). */
const LOW_COMPLETENESS = 0.5;

// The app's chart palette (src/components/chartColours.ts): extinction in the clay red of "more extinction",
// origination in its own blue, the range-based rate in the reference grey, completeness in the neutral grey.
const COLOR = {
  extinction: "#b4441c",
  origination: "#3d5a99",
  crosser: "#a8a29e",
  completeness: "#78716c",
  low: "#8a5a12",
  boundary: "#292524",
  text: "#57534e",
};


type RateKey = "threeTimerExtinction" | "threeTimerOrigination" | "crosserExtinction";
type RateDatum = { stage: string } & Partial<Record<RateKey, number>>;
type CompletenessDatum = { stage: string; completeness?: number };

const SERIES: ReadonlyArray<{ key: RateKey; label: string; colour: string }> = [
  { key: "threeTimerExtinction", label: "Three-timer extinction (from the finds)", colour: COLOR.extinction },
  { key: "threeTimerOrigination", label: "Three-timer origination (from the finds)", colour: COLOR.origination },
  { key: "crosserExtinction", label: "Boundary-crosser extinction q (from the coded ranges)", colour: COLOR.crosser },
];

/**
 * Sampling through time from the study's finds: three-timer extinction and origination per stage (Alroy 2008) beside
 * the boundary-crosser extinction rate of the coded ranges, and each stage's sampling completeness, with the numbers
 * behind both charts. Stages come from the three-timer answer (the chart's stages the finds reach, one more each side).
 */
export function ThreeTimerChart({ studyId, boundary }: { studyId: string; boundary: number | null }) {
  const threeTimer = useThreeTimer(studyId, boundary);
  const rates = useRates(studyId);
  return (
    <Card
      title="Sampling and rates from the finds"
      description="Per stage, oldest at the left: three-timer extinction and origination (Alroy 2008) beside the boundary-crosser extinction of the coded ranges, and how completely each stage was sampled."
    >
      {threeTimer.isPending && <LoadingState label="Reading the finds stage by stage" lines={4} />}
      {threeTimer.isError && <ErrorState error={threeTimer.error} title="The three-timer rates could not be computed" onRetry={() => void threeTimer.refetch()} />}
      {threeTimer.isSuccess && threeTimer.data.occurrenceCount === 0 && (
        <EmptyState
          headingLevel={3}
          title="No finds to chart yet"
          description="Three-timer rates and sampling completeness come from dated finds (occurrences), not from first and last appearances. Upload an occurrence file on the Imports screen and this chart fills in."
          action={
            <ButtonLink to={`${paths.study(studyId)}/imports`} variant="secondary">
              Go to Imports
            </ButtonLink>
          }
        />
      )}
      {threeTimer.isSuccess && threeTimer.data.occurrenceCount > 0 && (
        <ThreeTimerBody data={threeTimer.data} rates={rates.data ?? null} ratesFailed={rates.isError} boundary={boundary} />
      )}
    </Card>
  );
}

function ThreeTimerBody({ data, rates, ratesFailed, boundary }: { data: ThreeTimer; rates: RatesResult | null; ratesFailed: boolean; boundary: number | null }) {
  const helpId = useId();
  const stages = data.stages;
  const crosser = new Map((rates?.stages ?? []).map((s) => [s.name, s]));
  const rateData: RateDatum[] = stages.map((s) => {
    const d: RateDatum = { stage: s.label };
    if (s.extinction !== null) d.threeTimerExtinction = s.extinction;
    if (s.origination !== null) d.threeTimerOrigination = s.origination;
    const q = crosser.get(s.bin)?.q;
    if (q !== undefined && q !== null) d.crosserExtinction = q;
    return d;
  });
  const completenessData: CompletenessDatum[] = stages.map((s) => (s.samplingCompleteness === null ? { stage: s.label } : { stage: s.label, completeness: s.samplingCompleteness }));
  const values = rateData.flatMap((d) => SERIES.map((k) => d[k.key]).filter((v): v is number => v !== undefined));
  const anyRate = values.length > 0;
  const yMin = Math.min(0, ...values);
  const yMax = Math.max(0.1, ...values) * 1.1;
  const poorlySampled = stages.filter((s) => s.samplingCompleteness !== null && s.samplingCompleteness < LOW_COMPLETENESS);
  const boundaryIndex = boundary === null ? -1 : stages.findIndex((s) => Math.abs(s.topMa - boundary) < 1e-9);
  const rotate = stages.length > 8 ? -40 : 0;
  const boundaryLayer = (layer: BarCustomLayerProps<RateDatum> | BarCustomLayerProps<CompletenessDatum>) =>
    boundaryIndex >= 0 && boundaryIndex < stages.length - 1 ? (
      <BoundaryLine layer={layer} before={stages[boundaryIndex]!.label} after={stages[boundaryIndex + 1]!.label} boundary={boundary!} />
    ) : null;

  return (
    <div className="space-y-4">
      <div>
        <h3 className="text-sm font-semibold text-stone-800">Extinction and origination rates per stage</h3>
        {anyRate ? (
          <div className="mt-2 h-80" data-testid="three-timer-rates-chart">
            <DeferredBar<RateDatum>
              data={rateData}
              keys={SERIES.map((s) => s.key)}
              indexBy="stage"
              groupMode="grouped"
              margin={{ top: 24, right: 16, bottom: 72, left: 64 }}
              padding={0.2}
              innerPadding={1}
              valueScale={{ type: "linear", min: yMin, max: yMax }}
              colors={(bar) => SERIES.find((s) => s.key === bar.id)?.colour ?? COLOR.crosser}
              theme={CHART_THEME}
              enableLabel={false}
              animate={false}
              axisBottom={{ tickSize: 4, tickPadding: 6, tickRotation: rotate }}
              axisLeft={{ tickSize: 4, tickPadding: 6, format: (v: number) => formatRate(v), legend: "Per-capita rate per stage (ln units)", legendPosition: "middle", legendOffset: -54 }}
              layers={["grid", "axes", "bars", boundaryLayer as never]}
              tooltip={(props: BarTooltipProps<RateDatum>) => <StageTooltip stage={stages[props.index]!} series={SERIES.find((s) => s.key === props.id)!.label} value={props.value ?? null} />}
              role="img"
              ariaLabel={`Three-timer extinction and origination and boundary-crosser extinction per stage, ${stages[0]!.label} to ${stages[stages.length - 1]!.label}`}
              ariaDescribedBy={helpId}
            />
          </div>
        ) : (
          <p className="mt-2 rounded-lg border border-dashed border-stone-300 px-4 py-6 text-center text-[15px] text-stone-500">
            No stage has a three-timer rate yet: a rate needs taxa found in the stage and in both neighbouring stages.
          </p>
        )}
        <p className="mt-2 flex flex-wrap gap-x-5 gap-y-1 text-sm text-stone-600">
          {SERIES.map((s) => (
            <span key={s.key} className="inline-flex items-center gap-2">
              <span className="inline-block size-3 rounded-sm" style={{ background: s.colour }} aria-hidden="true" />
              {s.label}
            </span>
          ))}
          {boundaryIndex >= 0 && (
            <span className="inline-flex items-center gap-2">
              <span className="inline-block h-3 w-0.5" style={{ background: COLOR.boundary }} aria-hidden="true" />
              The chosen boundary
            </span>
          )}
        </p>
      </div>

      <div>
        <h3 className="text-sm font-semibold text-stone-800">Sampling completeness per stage</h3>
        <div className="mt-2 h-56" data-testid="three-timer-completeness-chart">
          <DeferredBar<CompletenessDatum>
            data={completenessData}
            keys={["completeness"]}
            indexBy="stage"
            margin={{ top: 16, right: 16, bottom: 72, left: 64 }}
            padding={0.25}
            valueScale={{ type: "linear", min: 0, max: 1 }}
            colors={(bar) => ((bar.value ?? 1) < LOW_COMPLETENESS ? COLOR.low : COLOR.completeness)}
            theme={CHART_THEME}
            enableLabel={false}
            animate={false}
            axisBottom={{ tickSize: 4, tickPadding: 6, tickRotation: rotate }}
            axisLeft={{ tickSize: 4, tickPadding: 6, tickValues: [0, 0.25, 0.5, 0.75, 1], legend: "Completeness (0 to 1)", legendPosition: "middle", legendOffset: -54 }}
            layers={["grid", "axes", "bars", (layer: BarCustomLayerProps<CompletenessDatum>) => <LowLine layer={layer} />, boundaryLayer as never]}
            tooltip={(props: BarTooltipProps<CompletenessDatum>) => <StageTooltip stage={stages[props.index]!} series="Sampling completeness" value={props.value ?? null} />}
            role="img"
            ariaLabel={`Sampling completeness per stage, ${stages[0]!.label} to ${stages[stages.length - 1]!.label}; ${poorlySampled.length} below ${LOW_COMPLETENESS}`}
            ariaDescribedBy={helpId}
          />
        </div>
      </div>

      <Caution title="A poorly sampled stage inflates the apparent extinction before it">
        Taxa that lived through a stage but were not found in it look as if they died out in the stage before, so low sampling completeness (below{" "}
        {LOW_COMPLETENESS}, drawn in ochre) makes the stage before it look like a crisis. Three-timer rates allow for this by the stage's completeness; the
        boundary-crosser rate of the coded ranges does not.
        {poorlySampled.length > 0 && ` Poorly sampled here: ${poorlySampled.map((s) => `${s.label} (${s.samplingCompleteness!.toFixed(2)})`).join(", ")}.`}
      </Caution>

      <div id={helpId} className="space-y-1 text-sm text-stone-600">
        <p>
          {data.method} Extinction = ln(two-timers below ÷ three-timers) + ln(completeness); origination the same with the two-timers above. Boundary-crosser q =
          −ln(through ÷ (through + lost)), from the coded first and last appearances.
        </p>
        <p>
          {pluralize(data.occurrenceCount, "find")}.
          {data.straddling > 0 && ` ${pluralize(data.straddling, "find")} dated across a stage limit count in no stage.`} A stage without a bar has no
          defined value (no taxon found on both sides of it, or none found in it and its neighbours).
          {ratesFailed && " The boundary-crosser rates could not be loaded, so they are left out."}
        </p>
      </div>

      <details>
        <summary className="cursor-pointer text-sm font-medium text-accent-700 hover:text-accent-900">Numbers behind the charts</summary>
        <NumbersTable stages={stages} crosserQ={(s) => crosser.get(s.bin)?.q ?? null} boundaryIndex={boundaryIndex} />
      </details>
    </div>
  );
}

/** The boundary as a vertical line in the gap between the stage it closes and the next. */
function BoundaryLine({ layer, before, after, boundary }: { layer: { xScale: unknown; innerHeight: number }; before: string; after: string; boundary: number }) {
  const x = layer.xScale as { (stage: string): number; bandwidth(): number };
  const position = (x(before) + x.bandwidth() + x(after)) / 2;
  return (
    <g aria-hidden="true">
      <line x1={position} x2={position} y1={-8} y2={layer.innerHeight} stroke={COLOR.boundary} strokeWidth={2} />
      <text x={position + 4} y={-10} fill={COLOR.boundary} style={{ fontFamily: CHART_FONT, fontSize: 12, fontWeight: 600 }}>
        Boundary {formatMa(boundary)}
      </text>
    </g>
  );
}

function LowLine({ layer }: { layer: BarCustomLayerProps<CompletenessDatum> }) {
  const y = (layer.yScale as unknown as (v: number) => number)(LOW_COMPLETENESS);
  return (
    <g aria-hidden="true">
      <line x1={0} x2={layer.innerWidth} y1={y} y2={y} stroke={COLOR.low} strokeWidth={1.5} strokeDasharray="6 4" />
      <text x={4} y={y - 5} fill={COLOR.low} stroke="white" strokeWidth={3} paintOrder="stroke" style={{ fontFamily: CHART_FONT, fontSize: 12, fontWeight: 500 }}>
        {LOW_COMPLETENESS}: poorly sampled below
      </text>
    </g>
  );
}

function StageTooltip({ stage, series, value }: { stage: ThreeTimerRowDto; series: string; value: number | null }) {
  return (
    <div className="rounded-lg border border-stone-200 bg-white px-3 py-2 text-sm shadow-md">
      <p className="font-semibold text-stone-900">{stage.label}</p>
      <p className="text-stone-600 tabular-nums">
        {formatAgeNumber(stage.baseMa)}–{formatMa(stage.topMa)} · {pluralize(stage.occurrences, "find")}
      </p>
      <p className="mt-1 text-stone-900 tabular-nums">
        {series}: {value === null ? "undefined" : formatRate(value)}
      </p>
    </div>
  );
}

function NumbersTable({ stages, crosserQ, boundaryIndex }: { stages: ThreeTimerRowDto[]; crosserQ: (s: ThreeTimerRowDto) => number | null; boundaryIndex: number }) {
  const cell = "px-3 py-1.5 text-right tabular-nums";
  const show = (v: number | null, digits = 3) => (v === null ? "—" : v.toFixed(digits));
  const headings: Array<[string, string]> = [
    ["Ma", "Base to top of the stage"],
    ["Finds", "Finds dated wholly inside the stage"],
    ["Taxa", "Taxa found in the stage"],
    ["Three-timers", "Found in the stage before, this one and the next"],
    ["Part-timers", "Found before and after, not in this stage"],
    ["Two-timers below", "Found in the stage before and this one"],
    ["Two-timers above", "Found in this stage and the next"],
    ["Completeness", "Three-timers ÷ (three-timers + part-timers)"],
    ["Extinction", "Three-timer extinction rate"],
    ["Origination", "Three-timer origination rate"],
    ["Crosser q", "Boundary-crosser extinction rate from the coded ranges"],
  ];
  return (
    <div className="mt-3 overflow-x-auto" tabIndex={0} role="region" aria-label="Numbers behind the three-timer charts">
      <table className="w-full min-w-[56rem] text-sm">
        <caption className="sr-only">Three-timer counts, sampling completeness and rates per stage, oldest first</caption>
        <thead className="border-b border-stone-200 text-stone-500">
          <tr>
            <th scope="col" className="px-3 py-1.5 text-left font-medium">
              Stage
            </th>
            {headings.map(([h, title]) => (
              <th key={h} scope="col" className={cx(cell, "font-medium")} title={title}>
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody className="divide-y divide-stone-100">
          {stages.map((s, i) => (
            <tr key={s.bin} data-stage={s.bin} className={cx(s.samplingCompleteness !== null && s.samplingCompleteness < LOW_COMPLETENESS && "bg-caution-50", i === boundaryIndex && "border-b-2 border-b-stone-800")}>
              <th scope="row" className="px-3 py-1.5 text-left font-medium text-stone-900">
                {s.label}
              </th>
              <td className={cx(cell, "whitespace-nowrap")}>
                {formatAgeNumber(s.baseMa)}–{formatAgeNumber(s.topMa)}
              </td>
              <td className={cell}>{formatCount(s.occurrences)}</td>
              <td className={cell}>{formatCount(s.sampled)}</td>
              <td className={cell}>{formatCount(s.t3)}</td>
              <td className={cell}>{formatCount(s.partTimers)}</td>
              <td className={cell}>{formatCount(s.t2Below)}</td>
              <td className={cell}>{formatCount(s.t2Above)}</td>
              <td className={cell}>{show(s.samplingCompleteness, 2)}</td>
              <td className={cell}>{show(s.extinction)}</td>
              <td className={cell}>{show(s.origination)}</td>
              <td className={cell}>{show(crosserQ(s))}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-2 text-xs text-stone-500">Rates are per stage in natural-log units, as the formulas give them; a thick line under a stage marks the chosen boundary.</p>
    </div>
  );
}
