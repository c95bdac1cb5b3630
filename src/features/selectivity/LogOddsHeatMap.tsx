import { ResponsiveHeatMap, type HeatMapSvgProps } from "@nivo/heatmap";
import { formatCompact } from "../../lib/format";
import type { HeatRow } from "./resultRows";

const FONT = '"Inter Tight", system-ui, sans-serif';
/** Lower odds of extinction (teal), none (paper), higher odds (clay red): centred on a log odds ratio of 0. */
const DIVERGING: [string, string, string] = ["#17695e", "#f7f5f2", "#b4441c"];
const ROW_HEIGHT = 38;
const MAX_LABEL_CHARS = 40;

type Cell = { x: string; y: number | null };

const THEME: NonNullable<HeatMapSvgProps<Cell, object>["theme"]> = {
  text: { fontFamily: FONT, fontSize: 12, fill: "#44403c" },
  axis: { ticks: { text: { fontFamily: FONT, fontSize: 12, fill: "#44403c" } }, legend: { text: { fontFamily: FONT, fontSize: 12, fill: "#44403c" } } },
  legends: { text: { fontFamily: FONT, fontSize: 11, fill: "#57534e" }, title: { text: { fontFamily: FONT, fontSize: 11, fill: "#57534e" } } },
  labels: { text: { fontFamily: FONT, fontSize: 12, fontWeight: 600 } },
  tooltip: { container: { fontFamily: FONT, fontSize: 13, borderRadius: 8 } },
};

const truncate = (text: string) => (text.length > MAX_LABEL_CHARS ? `${text.slice(0, MAX_LABEL_CHARS - 1)}…` : text);

/** The symmetric colour span: the largest |log odds ratio| shown, at least ln 2 so near-zero maps stay pale. */
export function colourSpan(rows: readonly HeatRow[]): number {
  const largest = Math.max(0, ...rows.flatMap((r) => r.cells.map((c) => (c.logOdds === null ? 0 : Math.abs(c.logOdds)))));
  return Math.max(Math.log(2), Math.min(largest, Math.log(1000)));
}

/** Log odds ratios, traits by boundary, on a diverging colour scale centred on 0 (no selectivity). */
export function LogOddsHeatMap({ rows, title }: { rows: readonly HeatRow[]; title: string }) {
  const span = colourSpan(rows);
  const data = rows.map((row) => ({ id: truncate(row.label), data: row.cells.map((c) => ({ x: c.boundary, y: c.logOdds })) }));
  const columns = rows[0]?.cells.length ?? 0;
  const tilted = columns > 3;
  const height = Math.max(160, rows.length * ROW_HEIGHT + (tilted ? 160 : 110));

  return (
    <div style={{ height }} className="min-w-[36rem]" data-testid="log-odds-heat-map">
      <ResponsiveHeatMap<Cell, object>
        data={data}
        // Tilted column names lean to the right of their column: room for them there.
        margin={{ top: tilted ? 110 : 44, right: tilted ? 150 : 24, bottom: 58, left: 290 }}
        valueFormat={(v: number) => (v > 0 ? `+${v.toFixed(2)}` : v.toFixed(2).replace("-", "−"))}
        axisTop={{ tickSize: 4, tickPadding: 6, tickRotation: tilted ? -25 : 0, format: (v: string) => (v.length > 30 ? `${v.slice(0, 29)}…` : v) }}
        axisLeft={{ tickSize: 4, tickPadding: 6 }}
        colors={{ type: "diverging", colors: DIVERGING, minValue: -span, maxValue: span, divergeAt: 0.5 }}
        emptyColor="#e7e5e4"
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
        ariaLabel={title}
      />
    </div>
  );
}
