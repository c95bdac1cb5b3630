import { ResponsiveBar, type BarCustomLayerProps } from "@nivo/bar";
import { directionOfShare, NEUTRAL_COLOUR, REFERENCE_COLOUR, RISK_COLOUR, SUMMARY_COLOUR } from "../../components/chartColours";
import { ColourLegend, type LegendEntry } from "../../components/ColourLegend";
import { formatCount } from "../../lib/format";
import type { TraitResultData } from "./resultRows";
import { formatPercent, levelWords } from "./words";
import { CHART_FONT, CHART_THEME } from "../../components/chartTheme";

const COLOR = { whisker: "#1c1917", overall: SUMMARY_COLOUR, text: "#57534e" };

type StateDatum = { state: string; proportion?: number };


/** "Deposit feeder (n = 120)": the axis names each state with its number of taxa. */
function axisName(row: TraitResultData["table"][number]): string {
  return `${row.label} (n = ${formatCount(row.victims + row.survivors)})`;
}

type TableRow = TraitResultData["table"][number];

/**
 * A bar's colour says what it does against the reference state, as the heat map does: clay red for a
 * larger share lost, teal for a smaller one, grey for the reference. Quarters of a numeric trait have
 * no reference, so they stay neutral (the slope's odds ratio carries the direction).
 */
export function proportionBarColour(trait: Pick<TraitResultData, "kind" | "reference" | "table">, row: TableRow): string {
  if (trait.kind === "numeric") return NEUTRAL_COLOUR;
  if (row.state === trait.reference) return REFERENCE_COLOUR;
  const reference = trait.table.find((r) => r.state === trait.reference);
  const direction = directionOfShare(row.proportion, reference?.proportion);
  return direction === "even" ? NEUTRAL_COLOUR : RISK_COLOUR[direction];
}

/** The legend of the bars: only the colours the chart uses. */
export function proportionLegend(trait: Pick<TraitResultData, "kind" | "reference" | "table">): LegendEntry[] {
  if (trait.kind === "numeric") return [{ colour: NEUTRAL_COLOUR, label: "Share lost in each quarter of values" }];
  const used = new Set(trait.table.map((row) => proportionBarColour(trait, row)));
  const entries: LegendEntry[] = [
    { colour: REFERENCE_COLOUR, label: "Reference state" },
    { colour: RISK_COLOUR.higher, label: "More lost than the reference" },
    { colour: RISK_COLOUR.lower, label: "Fewer lost than the reference" },
    { colour: NEUTRAL_COLOUR, label: "As many lost as the reference" },
  ];
  return entries.filter((e) => used.has(e.colour));
}

/** The extinction proportion of all taxa in the trait's table. */
export function overallProportion(trait: TraitResultData): number | null {
  const victims = trait.table.reduce((sum, r) => sum + r.victims, 0);
  const total = trait.table.reduce((sum, r) => sum + r.victims + r.survivors, 0);
  return total > 0 ? victims / total : null;
}

/**
 * Extinction proportion per state of one trait, as bars with Wilson interval whiskers (drawn by a
 * custom layer) and a dashed line at the proportion over all the trait's taxa.
 */
export function ProportionChart({ trait, level }: { trait: TraitResultData; level: number }) {
  const rows = trait.table;
  const data: StateDatum[] = rows.map((row) => (row.proportion === null ? { state: axisName(row) } : { state: axisName(row), proportion: row.proportion }));
  const overall = overallProportion(trait);
  const byName = new Map(rows.map((row) => [axisName(row), row]));
  // Tilt the state names when they would not fit side by side (about 7 px per character).
  const crowded = rows.reduce((sum, row) => sum + axisName(row).length * 7 + 16, 0) > 680;

  const Whiskers = (layer: BarCustomLayerProps<StateDatum>) => {
    const y = layer.yScale as unknown as (v: number) => number;
    return (
      <g aria-hidden="true">
        {layer.bars.map((bar) => {
          const row = byName.get(String(bar.data.indexValue));
          if (!row?.ci) return null;
          const cx = bar.x + bar.width / 2;
          const cap = Math.min(10, bar.width / 4);
          return (
            <g key={bar.key} stroke={COLOR.whisker} strokeWidth={1.5}>
              <line x1={cx} x2={cx} y1={y(row.ci[0])} y2={y(row.ci[1])} />
              <line x1={cx - cap} x2={cx + cap} y1={y(row.ci[0])} y2={y(row.ci[0])} />
              <line x1={cx - cap} x2={cx + cap} y1={y(row.ci[1])} y2={y(row.ci[1])} />
            </g>
          );
        })}
      </g>
    );
  };

  const Overall = (layer: BarCustomLayerProps<StateDatum>) => {
    if (overall === null) return null;
    const y = (layer.yScale as unknown as (v: number) => number)(overall);
    return (
      <g aria-hidden="true">
        <line x1={0} x2={layer.innerWidth} y1={y} y2={y} stroke={COLOR.overall} strokeWidth={1.5} strokeDasharray="6 4" />
        <text x={layer.innerWidth} y={y - 5} textAnchor="end" fill={COLOR.overall} stroke="white" strokeWidth={3} paintOrder="stroke" style={{ fontFamily: CHART_FONT, fontSize: 11.5, fontWeight: 500 }}>
          All {formatPercent(overall)}
        </text>
      </g>
    );
  };

  return (
    <div data-testid={`proportion-chart-${trait.key}`}>
      <ColourLegend entries={proportionLegend(trait)} label={`Colours of the bars of ${trait.label}`} className="mb-2" />
      <div className="h-64">
        <ResponsiveBar<StateDatum>
          data={data}
          keys={["proportion"]}
          indexBy="state"
          margin={{ top: 18, right: 12, bottom: crowded ? 86 : 44, left: 58 }}
          padding={0.35}
          valueScale={{ type: "linear", min: 0, max: 1 }}
          colors={(bar) => {
            const row = byName.get(String(bar.indexValue));
            return row ? proportionBarColour(trait, row) : NEUTRAL_COLOUR;
          }}
          theme={CHART_THEME}
          enableLabel={false}
          animate={false}
          isInteractive={false}
          axisBottom={{ tickSize: 4, tickPadding: 6, tickRotation: crowded ? -30 : 0 }}
          axisLeft={{
            tickSize: 4,
            tickPadding: 6,
            tickValues: [0, 0.25, 0.5, 0.75, 1],
            format: (v: number) => `${Math.round(v * 100)}%`,
            legend: "Extinct",
            legendPosition: "middle",
            legendOffset: -48,
          }}
          layers={["grid", "axes", "bars", Overall, Whiskers]}
          role="img"
          ariaLabel={`Extinction proportion per state of ${trait.label}, with ${levelWords(level)} Wilson intervals: ${rows
            .map((r) => `${r.label} ${formatPercent(r.proportion)}`)
            .join(", ")}`}
        />
      </div>
    </div>
  );
}
