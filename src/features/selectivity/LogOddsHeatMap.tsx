import { ResponsiveHeatMap, type HeatMapSvgProps } from "@nivo/heatmap";
import type { AxisTickProps } from "@nivo/axes";
import { MISSING_COLOUR, RISK_COLOUR } from "../../components/chartColours";
import { wrapLabel } from "../../components/wrapLabel";
import { formatCompact } from "../../lib/format";
import type { HeatRow } from "./resultRows";
import { CHART_FONT, CHART_THEME, CHART_TITLE_COLOUR } from "../../components/chartTheme";

/** Lower odds of extinction (teal), none (paper), higher odds (clay red): centred on a log odds ratio of 0; the app's one meaning of these colours. */
const DIVERGING: [string, string, string] = [RISK_COLOUR.lower, RISK_COLOUR.even, RISK_COLOUR.higher];
const MIN_ROW_HEIGHT = 38;
/** Room for the row labels: they wrap onto as many lines as they need within it (about 6.4 px a character at 12 px). */
const LABEL_WIDTH = 300;
const LABEL_CHARS = Math.floor((LABEL_WIDTH - 14) / 6.4);
const LINE_HEIGHT = 14;

type Cell = { x: string; y: number | null };

const THEME: NonNullable<HeatMapSvgProps<Cell, object>["theme"]> = {
  ...CHART_THEME,
  text: { fontFamily: CHART_FONT, fontSize: 12, fill: CHART_TITLE_COLOUR },
  axis: { ticks: { text: { fontFamily: CHART_FONT, fontSize: 12, fill: CHART_TITLE_COLOUR } }, legend: { text: { fontFamily: CHART_FONT, fontSize: 12, fill: CHART_TITLE_COLOUR } } },
  legends: { text: { fontFamily: CHART_FONT, fontSize: 11, fill: "#57534e" }, title: { text: { fontFamily: CHART_FONT, fontSize: 11, fill: "#57534e" } } },
  labels: { text: { fontFamily: CHART_FONT, fontSize: 12, fontWeight: 600 } },
};

/** A row label on as many lines as it needs, right-aligned against the map, with the whole label as its tooltip. */
function RowLabel({ value, x, y, textX }: AxisTickProps<string>) {
  const lines = wrapLabel(String(value), LABEL_CHARS);
  const first = -((lines.length - 1) * LINE_HEIGHT) / 2;
  return (
    <g transform={`translate(${x},${y})`} data-row-label={String(value)}>
      <title>{String(value)}</title>
      <line x1={0} x2={-4} y1={0} y2={0} stroke="#a8a29e" />
      <text textAnchor="end" dominantBaseline="central" style={{ fontFamily: CHART_FONT, fontSize: 12, fill: "#44403c" }}>
        {lines.map((line, i) => (
          <tspan key={i} x={textX} y={first + i * LINE_HEIGHT}>
            {line}
          </tspan>
        ))}
      </text>
    </g>
  );
}

const COLUMN_CHARS = 34;

/** A boundary's name over its column, shortened only when very long, with the whole name as its tooltip. */
function ColumnLabel({ value, x, y, textX, textY, textAnchor, rotate }: AxisTickProps<string>) {
  const full = String(value);
  const shown = full.length > COLUMN_CHARS ? `${full.slice(0, COLUMN_CHARS - 1)}…` : full;
  return (
    <g transform={`translate(${x},${y})`} data-column-label={full}>
      <title>{full}</title>
      <line x1={0} x2={0} y1={0} y2={-4} stroke="#a8a29e" />
      <text
        transform={`translate(${textX},${textY}) rotate(${rotate ?? 0})`}
        textAnchor={textAnchor as "start" | "middle" | "end"}
        dominantBaseline="central"
        style={{ fontFamily: CHART_FONT, fontSize: 12, fill: "#44403c" }}
      >
        {shown}
      </text>
    </g>
  );
}

/** The symmetric colour span: the largest |log odds ratio| shown, at least ln 2 so near-zero maps stay pale. */
export function colourSpan(rows: readonly HeatRow[]): number {
  const largest = Math.max(0, ...rows.flatMap((r) => r.cells.map((c) => (c.logOdds === null ? 0 : Math.abs(c.logOdds)))));
  return Math.max(Math.log(2), Math.min(largest, Math.log(1000)));
}

/** Log odds ratios, traits by boundary, on a diverging colour scale centred on 0 (no selectivity). */
export function LogOddsHeatMap({ rows, title }: { rows: readonly HeatRow[]; title: string }) {
  const span = colourSpan(rows);
  const data = rows.map((row) => ({ id: row.label, data: row.cells.map((c) => ({ x: c.boundary, y: c.logOdds })) }));
  const columns = rows[0]?.cells.length ?? 0;
  const tilted = columns > 3;
  // Every row tall enough for its longest label's lines, so no label is cut.
  const lines = Math.max(1, ...rows.map((row) => wrapLabel(row.label, LABEL_CHARS).length));
  const rowHeight = Math.max(MIN_ROW_HEIGHT, lines * LINE_HEIGHT + 10);
  const height = Math.max(160, rows.length * rowHeight + (tilted ? 160 : 110));

  return (
    <div style={{ height }} className="min-w-[38rem]" data-testid="log-odds-heat-map">
      <ResponsiveHeatMap<Cell, object>
        data={data}
        // Tilted column names lean to the right of their column: room for them there.
        margin={{ top: tilted ? 110 : 44, right: tilted ? 150 : 24, bottom: 58, left: LABEL_WIDTH }}
        valueFormat={(v: number) => (v > 0 ? `+${v.toFixed(2)}` : v.toFixed(2).replace("-", "−"))}
        axisTop={{ tickSize: 4, tickPadding: 6, tickRotation: tilted ? -25 : 0, renderTick: ColumnLabel }}
        axisLeft={{ tickSize: 4, tickPadding: 6, renderTick: RowLabel }}
        colors={{ type: "diverging", colors: DIVERGING, minValue: -span, maxValue: span, divergeAt: 0.5 }}
        emptyColor={MISSING_COLOUR}
        borderWidth={1}
        borderColor="#ffffff"
        labelTextColor={(cell) => (cell.value !== null && Math.abs(cell.value) > span * 0.55 ? "#ffffff" : "#1c1917")}
        theme={THEME}
        animate={false}
        isInteractive={false}
        legends={[
          {
            anchor: "bottom",
            translateX: 0,
            translateY: 34,
            length: 320,
            thickness: 9,
            direction: "row",
            tickPosition: "after",
            tickSize: 3,
            tickSpacing: 4,
            tickOverlap: false,
            // Five ticks, symmetric about 0, each read as the odds ratio it stands for.
            ticks: [-span, -span / 2, 0, span / 2, span],
            tickFormat: (v: number) => `OR ${formatCompact(Math.exp(v))}`,
            title: "ln odds ratio →",
            titleAlign: "start",
            titleOffset: 4,
          },
        ]}
        role="img"
        ariaLabel={`${title}. Rows: ${rows.map((row) => row.label).join("; ")}`}
      />
    </div>
  );
}
