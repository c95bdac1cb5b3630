// The type and lines every chart shares. nivo takes its font only through its theme, so the one
// theme here is what gives each chart the app's font, axis text and tooltips.
import type { BarDatum, BarSvgProps } from "@nivo/bar";

export const CHART_FONT = '"Inter Tight", system-ui, sans-serif';
/** Tick labels and other small text of a chart. */
export const CHART_TEXT_COLOUR = "#57534e";
/** Axis titles, a shade darker than the ticks. */
export const CHART_TITLE_COLOUR = "#44403c";

type NivoTheme = NonNullable<BarSvgProps<BarDatum>["theme"]>;

/** The theme of every nivo chart (bar, line, heat map); a chart adds only what is its own. */
export const CHART_THEME: NivoTheme = {
  text: { fontFamily: CHART_FONT, fontSize: 12, fill: CHART_TEXT_COLOUR },
  axis: {
    legend: { text: { fontFamily: CHART_FONT, fontSize: 13, fontWeight: 500, fill: CHART_TITLE_COLOUR } },
    ticks: { line: { stroke: "#d6d3d1" }, text: { fontFamily: CHART_FONT, fontSize: 12, fill: CHART_TEXT_COLOUR } },
  },
  grid: { line: { stroke: "#e7e5e4" } },
  tooltip: { container: { fontFamily: CHART_FONT, fontSize: 13, borderRadius: 8 } },
};
