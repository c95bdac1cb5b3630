import { useId } from "react";
import { COMPARISON_COLOUR, REFERENCE_COLOUR } from "../../components/chartColours";
import { Line, ResponsiveLine, type LineCustomSvgLayerProps, type LineSvgProps, type PointTooltipProps } from "@nivo/line";
import type { ComparisonResults } from "@shared/schemas/comparisons";
import { formatProbability, formatTwo } from "./words";
import { CHART_THEME } from "../../components/chartTheme";

// Today's listing ranked by the past crisis's scores: the "today" colour of the comparison; chance in the reference grey.
const COLOR = { curve: COMPARISON_COLOUR.today, chance: REFERENCE_COLOUR, text: "#57534e" };

type RocSeries = { id: string; data: Array<{ x: number; y: number; threshold: number | null }> };


/** The line of no discrimination, from (0, 0) to (1, 1), dashed. */
function ChanceLine({ xScale, yScale }: LineCustomSvgLayerProps<RocSeries>) {
  const x = xScale as unknown as (v: number) => number;
  const y = yScale as unknown as (v: number) => number;
  return <line x1={x(0)} y1={y(0)} x2={x(1)} y2={y(1)} stroke={COLOR.chance} strokeWidth={1.5} strokeDasharray="5 5" />;
}

function PointTooltip({ point }: PointTooltipProps<RocSeries>) {
  const d = point.data as RocSeries["data"][number];
  return (
    <div className="rounded-lg bg-white px-3 py-2 text-sm shadow-md ring-1 ring-stone-200">
      <p className="font-medium text-stone-900">{d.threshold === null ? "Nothing called threatened" : `Calling scores ≥ ${formatProbability(d.threshold)} threatened`}</p>
      <p className="text-stone-600">
        {Math.round(d.y * 100)}% of threatened species caught, {Math.round(d.x * 100)}% of not-threatened ones too
      </p>
    </div>
  );
}

/**
 * The ROC curve of the predicted probabilities for telling species listed threatened from those
 * not threatened, against the dashed line of chance. `fixedWidth` draws at a fixed size (for print).
 */
export function RocChart({ roc, fixedWidth }: { roc: NonNullable<ComparisonResults["roc"]>; fixedWidth?: number }) {
  const descriptionId = useId();
  const data: RocSeries[] = [{ id: "ROC curve", data: roc.points.map((p) => ({ x: p.falsePositiveRate, y: p.truePositiveRate, threshold: p.threshold })) }];
  const props: Omit<LineSvgProps<RocSeries>, "width" | "height"> = {
    data,
    margin: { top: 12, right: 16, bottom: 52, left: 60 },
    xScale: { type: "linear", min: 0, max: 1 },
    yScale: { type: "linear", min: 0, max: 1 },
    curve: "linear",
    colors: [COLOR.curve],
    lineWidth: 2.5,
    enablePoints: roc.points.length <= 60,
    pointSize: 6,
    pointColor: COLOR.curve,
    enableArea: true,
    areaOpacity: 0.08,
    theme: CHART_THEME,
    axisBottom: { tickValues: [0, 0.25, 0.5, 0.75, 1], legend: "Not-threatened species above the cut", legendPosition: "middle", legendOffset: 40 },
    axisLeft: { tickValues: [0, 0.25, 0.5, 0.75, 1], legend: "Threatened species caught", legendPosition: "middle", legendOffset: -46 },
    gridXValues: [0, 0.25, 0.5, 0.75, 1],
    gridYValues: [0, 0.25, 0.5, 0.75, 1],
    layers: ["grid", "axes", ChanceLine, "areas", "lines", "points", "mesh"],
    useMesh: fixedWidth === undefined,
    isInteractive: fixedWidth === undefined,
    tooltip: PointTooltip,
    animate: false,
    role: "img",
    ariaLabel: `ROC curve: area under the curve ${formatTwo(roc.auc)}, ${roc.cases} threatened and ${roc.controls} not-threatened species scored`,
    ariaDescribedBy: descriptionId,
  };
  return (
    <figure className="w-full max-w-md shrink-0" style={fixedWidth ? { width: fixedWidth } : undefined}>
      <div className="aspect-square w-full" data-testid="roc-chart">
        {fixedWidth === undefined ? <ResponsiveLine {...props} /> : <Line {...props} width={fixedWidth} height={fixedWidth} />}
      </div>
      <figcaption id={descriptionId} className="mt-2 text-sm text-stone-600">
        Each point calls every species scoring at or above a cut threatened. The dashed diagonal is what scores unrelated to today’s listing would give; the farther the curve
        bows above it, the better the past crisis’s selectivity ranks threatened species first.
      </figcaption>
    </figure>
  );
}
