import { useId } from "react";
import { BOUNDARY_MARK_COLOUR, REFERENCE_COLOUR, TURNOVER_SERIES_COLOUR } from "../../components/chartColours";
import type { LineCustomSvgLayerProps } from "@nivo/line";
import { DeferredLine } from "../../components/deferredCharts";
import type { TurnoverResult, TurnoverStage } from "@shared/schemas/turnover";
import { Card } from "../../components/Card";
import { textLinkClasses } from "../../components/TextLink";
import { Caution } from "../../components/Caution";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { Select } from "../../components/Select";
import { cx } from "../../lib/cx";
import { formatCount, pluralize } from "../../lib/format";
import { formatAgeNumber, formatMa } from "../../components/timescale/ages";
import type { useTurnover } from "./api";
import { formatRate } from "./words";
import { CHART_FONT, CHART_THEME } from "../../components/chartTheme";

// The Boundary screen's colours, from the app's one palette (components/chartColours): extinction in the red of
// "more extinction", origination in a blue of its own, the boundary in ink, background stages in the reference grey.
export const TURNOVER_COLOR = {
  extinction: TURNOVER_SERIES_COLOUR.extinction,
  origination: TURNOVER_SERIES_COLOUR.origination,
  boundary: BOUNDARY_MARK_COLOUR,
  diversity: TURNOVER_SERIES_COLOUR.diversity,
  background: REFERENCE_COLOUR,
  band: "#f5f5f4",
  text: "#57534e",
};

type Series = { id: string; data: Array<{ x: string; y: number | null }> };


type TurnoverQuery = ReturnType<typeof useTurnover>;

/**
 * Turnover through time: per-capita origination beside extinction on one time axis with the boundary marked,
 * how far the crisis stage departs from the other stages, and standing diversity overall or split.
 */
export function TurnoverSection({
  turnover,
  splitBy,
  onSplitBy,
  csvUrl,
  report = false,
}: {
  turnover: TurnoverQuery;
  splitBy: string;
  onSplitBy: (value: string) => void;
  csvUrl: string | null;
  /** In the printable report: no split control, the numbers behind the charts open. */
  report?: boolean;
}) {
  const data = turnover.data;
  return (
    <Card
      title="Turnover through time"
      description="Origination beside extinction per stage, how far the stage the boundary closes stands out from the others, and how many taxa stood in each stage. Ranges as coded; outcomes set by hand do not change these."
      actions={
        <>
          {turnover.isFetching && data && (
            <span className="text-sm text-stone-500" role="status">
              Updating…
            </span>
          )}
          {csvUrl && data && data.stages.length > 0 && (
            <a className={cx(textLinkClasses, "text-sm")} href={csvUrl} download>
              Download the numbers (CSV)
            </a>
          )}
        </>
      }
    >
      <div data-testid="turnover">
        {turnover.isPending && <LoadingState label="Working out origination, extinction and diversity per stage" lines={5} />}
        {turnover.isError && <ErrorState error={turnover.error} title="Turnover through time could not be worked out" onRetry={() => void turnover.refetch()} />}
        {data && data.stages.length === 0 && (
          <p className="rounded-lg border border-dashed border-stone-300 px-4 py-8 text-center text-[15px] text-stone-500">
            No taxon has a usable range yet, so there is no turnover to chart. Enter first and last appearances in the trait table.
          </p>
        )}
        {data && data.stages.length > 0 && (
          <div className="space-y-8">
            <RateLines data={data} />
            <BackgroundStrips data={data} />
            <Diversity data={data} splitBy={splitBy} onSplitBy={onSplitBy} report={report} />
          </div>
        )}
      </div>
    </Card>
  );
}

/** The boundary as a vertical line between the stage it closes and the next, on a point scale of stage labels. */
function boundaryLayer(stages: TurnoverStage[], boundary: number, withLabel = true) {
  return function BoundaryLine(layer: LineCustomSvgLayerProps<Series>) {
    const crisisIndex = stages.findIndex((s) => s.crisis);
    if (crisisIndex < 0) return null;
    const x = layer.xScale as unknown as (label: string) => number;
    const crisis = stages[crisisIndex];
    const next = stages[crisisIndex + 1];
    const position = next ? (x(crisis.label) + x(next.label)) / 2 : x(crisis.label);
    const labelLeft = position > layer.innerWidth * 0.7;
    return (
      <g aria-hidden="true">
        <line x1={position} x2={position} y1={withLabel ? -8 : 0} y2={layer.innerHeight} stroke={TURNOVER_COLOR.boundary} strokeWidth={withLabel ? 2 : 1.5} />
        {withLabel && (
        <text
          x={labelLeft ? position - 4 : position + 4}
          y={-12}
          textAnchor={labelLeft ? "end" : "start"}
          fill={TURNOVER_COLOR.boundary}
          style={{ fontFamily: CHART_FONT, fontSize: 12, fontWeight: 600 }}
        >
          Boundary {formatMa(boundary)}
        </text>
        )}
      </g>
    );
  };
}

function RateLines({ data }: { data: TurnoverResult }) {
  const helpId = useId();
  const stages = data.stages;
  const series: Series[] = [
    { id: "Extinction q", data: stages.map((s) => ({ x: s.label, y: s.q })) },
    { id: "Origination p", data: stages.map((s) => ({ x: s.label, y: s.p })) },
  ];
  const max = Math.max(0.1, ...stages.flatMap((s) => [s.q ?? 0, s.p ?? 0]));
  return (
    <section aria-labelledby={`${helpId}-title`}>
      <h3 id={`${helpId}-title`} className="text-sm font-semibold text-stone-900">
        Origination beside extinction
      </h3>
      {data.contrast ? (
        <p className="mt-1 text-[15px] text-stone-800" data-testid="turnover-sentence">
          {data.contrast.sentence}
        </p>
      ) : (
        <p className="mt-1 text-[15px] text-stone-700" data-testid="turnover-sentence">
          The boundary at {formatMa(data.boundary)} closes no stage the study’s taxa reach, so there is no crisis stage to compare.
        </p>
      )}
      <div className="mt-3 h-72" data-testid="turnover-rates-chart">
        <DeferredLine<Series>
          data={series}
          margin={{ top: 28, right: 20, bottom: 64, left: 64 }}
          xScale={{ type: "point" }}
          yScale={{ type: "linear", min: 0, max: max * 1.15 }}
          colors={[TURNOVER_COLOR.extinction, TURNOVER_COLOR.origination]}
          theme={CHART_THEME}
          lineWidth={2.5}
          pointSize={7}
          pointBorderWidth={0}
          enableGridX={false}
          animate={false}
          useMesh
          axisBottom={{ tickSize: 4, tickPadding: 6, tickRotation: stages.length > 8 ? -40 : 0 }}
          axisLeft={{ tickSize: 4, tickPadding: 6, legend: "Rate per stage", legendPosition: "middle", legendOffset: -52, format: (v: number) => formatRate(v) }}
          layers={["grid", "axes", "lines", "points", "mesh", boundaryLayer(stages, data.boundary)]}
          role="img"
          ariaLabel={`Per-capita extinction and origination per stage, ${stages[0].label} to ${stages[stages.length - 1].label}${data.crisisStage ? `; boundary at ${formatMa(data.boundary)}, closing the ${data.crisisStage.label}` : ""}`}
          ariaDescribedBy={helpId}
        />
      </div>
      <div id={helpId} className="mt-2 space-y-1 text-sm text-stone-600">
        <p className="flex flex-wrap gap-x-5 gap-y-1">
          <Key color={TURNOVER_COLOR.extinction} label="Extinction, q = −ln(through ÷ (through + lost))" />
          <Key color={TURNOVER_COLOR.origination} label="Origination, p = −ln(through ÷ (through + new))" />
          <span className="inline-flex items-center gap-2">
            <span className="inline-block h-3 w-0.5" style={{ background: TURNOVER_COLOR.boundary }} aria-hidden="true" />
            The chosen boundary
          </span>
        </p>
        <p>
          A fall in diversity can come from losses (extinction above its background) or from too few newcomers (origination below it): read the two
          lines together. A gap in a line is a stage where the rate is undefined. {data.method}
        </p>
      </div>
    </section>
  );
}

function Key({ color, label }: { color: string; label: string }) {
  return (
    <span className="inline-flex items-center gap-2">
      <span className="inline-block h-0.5 w-5" style={{ background: color }} aria-hidden="true" />
      {label}
    </span>
  );
}

const STRIP = { width: 560, height: 64, left: 16, right: 16 };

/** The other stages' rates as dots on one axis, the band where |z| < 3.5, and the crisis stage marked. */
function BackgroundStrips({ data }: { data: TurnoverResult }) {
  const contrast = data.contrast;
  if (!contrast || !data.crisisStage) return null;
  const crisisLabel = data.crisisStage.label;
  return (
    <section aria-labelledby="turnover-background-title" data-testid="turnover-background">
      <h3 id="turnover-background-title" className="text-sm font-semibold text-stone-900">
        The {crisisLabel} against its background
      </h3>
      <p className="mt-1 text-sm text-stone-600">
        Each dot is another stage of the study; the shaded band is where a stage would not depart from them (robust z between −{contrast.departureZ} and{" "}
        {contrast.departureZ}).
      </p>
      <div className="mt-3 grid gap-4 lg:grid-cols-2">
        <Strip name="Extinction" rate="q" color={TURNOVER_COLOR.extinction} stages={data.stages} valueOf={(s) => s.q} contrast={contrast.extinction} departureZ={contrast.departureZ} crisisLabel={crisisLabel} />
        <Strip name="Origination" rate="p" color={TURNOVER_COLOR.origination} stages={data.stages} valueOf={(s) => s.p} contrast={contrast.origination} departureZ={contrast.departureZ} crisisLabel={crisisLabel} />
      </div>
      <p className="mt-2 text-xs text-stone-500">{contrast.method}</p>
    </section>
  );
}

type Contrast = NonNullable<TurnoverResult["contrast"]>["extinction"];

function Strip(props: {
  name: string;
  rate: string;
  color: string;
  stages: TurnoverStage[];
  valueOf: (s: TurnoverStage) => number | null;
  contrast: Contrast;
  departureZ: number;
  crisisLabel: string;
}) {
  const { name, rate, color, stages, valueOf, contrast, departureZ, crisisLabel } = props;
  const others = stages.filter((s) => !s.crisis && valueOf(s) !== null).map((s) => ({ label: s.label, value: valueOf(s)! }));
  const tooFew = contrast.z === null && contrast.n < 5;
  const band =
    contrast.median !== null && contrast.mad !== null && contrast.mad > 0
      ? [contrast.median - departureZ * 1.4826 * contrast.mad, contrast.median + departureZ * 1.4826 * contrast.mad]
      : null;
  const values = [...others.map((o) => o.value), ...(contrast.value !== null ? [contrast.value] : []), ...(band ? [Math.max(0, band[0]), band[1]] : [])];
  const lo = Math.min(0, ...values);
  const hi = Math.max(0.1, ...values) * 1.05;
  const x = (v: number) => STRIP.left + ((v - lo) / (hi - lo)) * (STRIP.width - STRIP.left - STRIP.right);
  const mid = 30;
  const verdict =
    contrast.z === null
      ? tooFew
        ? `Too few stages for the comparison: ${pluralize(contrast.n, "other stage has", "other stages have")} a rate, and at least 5 are needed.`
        : `No comparison: ${contrast.reason ?? "the rate cannot be compared"}.`
      : `${rate} = ${formatRate(contrast.value!)} in the ${crisisLabel}; median of ${pluralize(contrast.n, "other stage")} ${formatRate(contrast.median!)}, robust z ${contrast.z.toFixed(1)}: ${contrast.departs ? "departs from its background" : "within its background"}.`;
  return (
    <figure className="rounded-lg border border-stone-200 px-4 py-3" data-testid={`background-strip-${rate}`}>
      <figcaption className="text-sm font-medium text-stone-900">
        {name} ({rate})
      </figcaption>
      {others.length > 0 && (
        <svg viewBox={`0 0 ${STRIP.width} ${STRIP.height}`} className="mt-2 w-full" role="img" aria-label={`${name} of the other stages as dots, the ${crisisLabel} marked`}>
          {band && <rect x={x(Math.max(lo, band[0]))} width={Math.max(0, x(Math.min(hi, band[1])) - x(Math.max(lo, band[0])))} y={mid - 14} height={28} fill={TURNOVER_COLOR.band} />}
          <line x1={STRIP.left} x2={STRIP.width - STRIP.right} y1={mid} y2={mid} stroke="#d6d3d1" />
          {contrast.median !== null && <line x1={x(contrast.median)} x2={x(contrast.median)} y1={mid - 14} y2={mid + 14} stroke={TURNOVER_COLOR.text} strokeDasharray="3 2" />}
          {others.map((o) => (
            <circle key={o.label} cx={x(o.value)} cy={mid} r={5} fill={TURNOVER_COLOR.background} fillOpacity={0.8}>
              <title>{`${o.label}: ${formatRate(o.value)}`}</title>
            </circle>
          ))}
          {contrast.value !== null && (
            <g>
              <path d={`M ${x(contrast.value)} ${mid - 9} l 7 9 l -7 9 l -7 -9 z`} fill={color} />
              <text x={x(contrast.value)} y={mid + 26} textAnchor="middle" fontSize={11} fontWeight={600} fill={color} style={{ fontFamily: CHART_FONT }}>
                {crisisLabel}
              </text>
            </g>
          )}
          <text x={STRIP.left} y={STRIP.height - 2} fontSize={10} fill={TURNOVER_COLOR.text} style={{ fontFamily: CHART_FONT }}>
            {formatRate(lo)}
          </text>
          <text x={STRIP.width - STRIP.right} y={STRIP.height - 2} textAnchor="end" fontSize={10} fill={TURNOVER_COLOR.text} style={{ fontFamily: CHART_FONT }}>
            {formatRate(hi)}
          </text>
        </svg>
      )}
      <p className={cx("mt-2 text-sm", tooFew ? "font-medium text-amber-900" : "text-stone-700")}>{verdict}</p>
    </figure>
  );
}

function Diversity({ data, splitBy, onSplitBy, report }: { data: TurnoverResult; splitBy: string; onSplitBy: (value: string) => void; report: boolean }) {
  const stages = data.stages;
  const { diversity } = data;
  const options = [{ value: "", label: "All taxa together" }, ...diversity.splitOptions];
  const groups =
    diversity.splitBy.kind === "none"
      ? [{ key: "all", label: "All taxa", taxa: data.taxaUsed, stages: stages.map((s) => ({ name: s.name, rangeThrough: s.rangeThrough, crossingBase: s.crossingBase, crossingTop: s.crossingTop })) }]
      : diversity.groups.map((g) => ({ ...g, key: g.key ?? "not-coded" }));
  const small = groups.length > 1;
  return (
    <section aria-labelledby="turnover-diversity-title" data-testid="turnover-diversity">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h3 id="turnover-diversity-title" className="text-sm font-semibold text-stone-900">
            Diversity through time
          </h3>
          <p className="mt-1 text-sm text-stone-600">
            Taxa whose range reaches into each stage (range-through), {diversity.splitBy.kind === "none" ? "all together" : `by ${diversity.splitBy.label.toLowerCase()}, each panel on its own scale`};
            the number at each point is the count, and the green line is the boundary.
          </p>
        </div>
        {!report && <Select label="Split by" value={splitBy} options={options} onChange={(e) => onSplitBy(e.target.value)} className="w-60" />}
      </div>
      <div className={cx("mt-3 grid gap-4", small && "sm:grid-cols-2 xl:grid-cols-3")}>
        {groups.map((g) => (
          <figure key={g.key} className="rounded-lg border border-stone-200 px-3 py-2" data-testid="diversity-panel" data-group={g.key}>
            <figcaption className="text-sm font-medium text-stone-900">
              {g.label} <span className="font-normal text-stone-500">· {pluralize(g.taxa, "taxon", "taxa")}</span>
            </figcaption>
            <div className={small ? "h-44" : "h-64"}>
              <DeferredLine<Series>
                data={[{ id: g.label, data: g.stages.map((s, k) => ({ x: stages[k].label, y: s.rangeThrough })) }]}
                margin={{ top: 22, right: 14, bottom: small ? 44 : 60, left: 44 }}
                xScale={{ type: "point" }}
                // Each panel on its own scale, so a small group's recovery can be read; the counts give the sizes.
                yScale={{ type: "linear", min: 0, max: Math.max(1, ...g.stages.map((s) => s.rangeThrough)) * 1.25 }}
                colors={[TURNOVER_COLOR.diversity]}
                theme={CHART_THEME}
                lineWidth={2}
                pointSize={6}
                enablePointLabel
                pointLabel={(p) => formatCount(Number(p.data.y))}
                pointLabelYOffset={-10}
                enableGridX={false}
                animate={false}
                isInteractive={false}
                axisBottom={small ? { tickSize: 3, tickPadding: 4, tickRotation: -45, format: (v: string) => v.slice(0, 4) } : { tickSize: 4, tickPadding: 6, tickRotation: stages.length > 8 ? -40 : 0 }}
                axisLeft={{ tickSize: 3, tickPadding: 4, tickValues: 4 }}
                layers={["grid", "axes", "lines", "points", boundaryLayer(stages, data.boundary, !small)]}
                role="img"
                ariaLabel={`${g.label}: taxa per stage, ${g.stages.map((s, k) => `${stages[k].label} ${s.rangeThrough}`).join(", ")}`}
              />
            </div>
          </figure>
        ))}
      </div>
      <div className="mt-3 space-y-2">
        <Caution title="Range-through counts and edge stages">
          {diversity.cautions.join(" ")}
        </Caution>
      </div>
      <details className="mt-4" open={report || undefined}>
        <summary className="cursor-pointer text-sm font-medium text-accent-700 hover:text-accent-900">Numbers behind the charts</summary>
        <TurnoverTable data={data} groups={diversity.splitBy.kind === "none" ? [] : groups} />
      </details>
    </section>
  );
}

function TurnoverTable({ data, groups }: { data: TurnoverResult; groups: Array<{ key: string; label: string; stages: Array<{ rangeThrough: number }> }> }) {
  const cell = "px-3 py-1.5 text-right tabular-nums";
  const head = cx(cell, "font-medium");
  const show = (v: number | null) => (v === null ? "—" : formatRate(v));
  return (
    <div className="mt-3 overflow-x-auto">
      <table className="w-full min-w-[52rem] text-sm" data-testid="turnover-table">
        <caption className="sr-only">Origination, extinction and diversity per stage, oldest first</caption>
        <thead className="border-b border-stone-200 text-stone-500">
          <tr>
            <th scope="col" className="px-3 py-1.5 text-left font-medium">
              Stage
            </th>
            <th scope="col" className={head}>
              Ma
            </th>
            <th scope="col" className={head} title="Taxa whose range reaches into the stage">
              Range-through
            </th>
            <th scope="col" className={head} title="Taxa crossing the stage's base">
              At base
            </th>
            <th scope="col" className={head} title="Taxa crossing the stage's top">
              At top
            </th>
            <th scope="col" className={head}>
              q
            </th>
            <th scope="col" className={head}>
              p
            </th>
            {groups.map((g) => (
              <th key={g.key} scope="col" className={head}>
                {g.label}
              </th>
            ))}
          </tr>
        </thead>
        <tbody className="divide-y divide-stone-100">
          {data.stages.map((s, k) => (
            <tr key={s.name} data-stage={s.name} className={s.crisis ? "bg-red-50/70" : undefined}>
              <th scope="row" className="px-3 py-1.5 text-left font-medium text-stone-900">
                {s.label}
                {s.edge && <span className="ml-1 text-xs font-normal text-stone-500">(edge)</span>}
              </th>
              <td className={cell}>
                {formatAgeNumber(s.base)}–{formatAgeNumber(s.top)}
              </td>
              <td className={cell}>{formatCount(s.rangeThrough)}</td>
              <td className={cell}>{formatCount(s.crossingBase)}</td>
              <td className={cell}>{formatCount(s.crossingTop)}</td>
              <td className={cell}>{show(s.q)}</td>
              <td className={cell}>{show(s.p)}</td>
              {groups.map((g) => (
                <td key={g.key} className={cell}>
                  {formatCount(g.stages[k].rangeThrough)}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-2 text-xs text-stone-500">
        Range-through: every taxon whose range reaches into the stage. At base, at top: taxa crossing the stage’s lower and upper limit (standing
        diversity at those instants). {pluralize(data.taxaUsed, "taxon", "taxa")} with a usable range
        {data.leftOut.missingRange + data.leftOut.invalidRange > 0 &&
          `; left out: ${formatCount(data.leftOut.missingRange)} with a missing range, ${formatCount(data.leftOut.invalidRange)} with an unusable one`}
        .
      </p>
    </div>
  );
}
