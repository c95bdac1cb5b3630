import { useId } from "react";
import { ESTIMATE_COLOUR } from "../../components/chartColours";
import { formatCompact } from "../../lib/format";
import { formatEstimate } from "./words";
import { CHART_FONT } from "../../components/chartTheme";

export type EstimateKind = "crude" | "clade" | "model";

export interface ForestEstimate {
  kind: EstimateKind;
  estimate: number;
  ci: [number, number];
}

export interface ForestRow {
  id: string;
  /** The trait, e.g. "Feeding mode". */
  label: string;
  /** The contrast, e.g. "Suspension feeder vs Deposit feeder". */
  detail: string;
  flagged: boolean;
  /** One per kind shown, in the order of ESTIMATE_KINDS; null where that odds ratio could not be estimated. */
  estimates: Array<ForestEstimate | null>;
}

// Series colours from the one palette (components/chartColours): none of them is the red or teal of a direction.
export const ESTIMATE_STYLE: Record<EstimateKind, { label: string; color: string }> = {
  crude: { label: "Crude", color: ESTIMATE_COLOUR.crude },
  clade: { label: "Adjusted for clade (Mantel-Haenszel)", color: ESTIMATE_COLOUR.clade },
  model: { label: "Adjusted for the other traits (regression)", color: ESTIMATE_COLOUR.model },
};
export const ESTIMATE_KINDS: readonly EstimateKind[] = ["crude", "clade", "model"];

const WIDTH = 800;
const PLOT_LEFT = 262;
const PLOT_RIGHT = WIDTH - 176;
const NUMBERS_X = WIDTH - 164;
const TOP = 58;
const SUB_ROW = 17;
const GROUP_GAP = 12;
const AXIS_SPACE = 62;
/** Odds ratios further out than this are drawn at the edge with an arrow. */
const LIMIT = 1000;
const NICE_STEPS = [1, 2, 5];
const MAX_LABEL_CHARS = 36;

function niceTicks(): number[] {
  const ticks: number[] = [];
  for (let exponent = -3; exponent <= 3; exponent++) for (const step of NICE_STEPS) ticks.push(Number((step * 10 ** exponent).toPrecision(1)));
  return ticks.filter((t) => t <= LIMIT);
}
const ALL_TICKS = niceTicks();

/** The plotted span: nice values around every finite estimate and interval end, always holding 1. */
export function logDomain(rows: readonly ForestRow[]): { low: number; high: number; ticks: number[] } {
  const values = [1];
  for (const row of rows)
    for (const e of row.estimates) {
      if (!e) continue;
      for (const v of [e.estimate, e.ci[0], e.ci[1]]) if (v > 0 && Number.isFinite(v)) values.push(Math.min(LIMIT, Math.max(1 / LIMIT, v)));
    }
  const min = Math.min(...values);
  const max = Math.max(...values);
  const low = [...ALL_TICKS].reverse().find((t) => t <= min * 1.0000001) ?? ALL_TICKS[0];
  const high = ALL_TICKS.find((t) => t >= max / 1.0000001) ?? ALL_TICKS[ALL_TICKS.length - 1];
  let ticks = ALL_TICKS.filter((t) => t >= low && t <= high);
  // Over a wide span, powers of ten only (1-2-5 would crowd the axis), plus the ends where they have room.
  if (ticks.length > 9) {
    const decades = ticks.filter((t) => Number.isInteger(Math.log10(t)));
    const roomy = (t: number) => decades.every((d) => Math.abs(Math.log10(t) - Math.log10(d)) >= 0.45);
    ticks = [...(roomy(low) ? [low] : []), ...decades, ...(roomy(high) ? [high] : [])];
  }
  return { low, high, ticks };
}

function truncate(text: string, max = MAX_LABEL_CHARS): string {
  return text.length > max ? `${text.slice(0, max - 1)}…` : text;
}

function Marker({ kind, x, y }: { kind: EstimateKind; x: number; y: number }) {
  const color = ESTIMATE_STYLE[kind].color;
  if (kind === "crude") return <circle cx={x} cy={y} r={4.5} fill={color} />;
  if (kind === "clade") return <rect x={x - 4.25} y={y - 4.25} width={8.5} height={8.5} fill={color} />;
  return <polygon points={`${x},${y - 5.5} ${x + 5.5},${y} ${x},${y + 5.5} ${x - 5.5},${y}`} fill={color} />;
}

function Arrow({ x, y, pointing, color }: { x: number; y: number; pointing: "left" | "right"; color: string }) {
  const d = pointing === "right" ? 1 : -1;
  return <polygon points={`${x},${y} ${x - d * 6},${y - 4} ${x - d * 6},${y + 4}`} fill={color} />;
}

export interface ForestPlotProps {
  rows: readonly ForestRow[];
  /** Which estimates each row carries, in order. */
  kinds?: readonly EstimateKind[];
  level: number;
  title: string;
}

/**
 * Odds ratios with their intervals on a log scale, one group of rows per contrast: crude and adjusted
 * side by side, a vertical line at an odds ratio of 1 (no selectivity), numbers at the right.
 */
export function ForestPlot({ rows, kinds = ESTIMATE_KINDS, level, title }: ForestPlotProps) {
  const titleId = useId();
  const { low, high, ticks } = logDomain(rows);
  const span = Math.log(high) - Math.log(low);
  const x = (v: number) => PLOT_LEFT + ((Math.log(v) - Math.log(low)) / span) * (PLOT_RIGHT - PLOT_LEFT);
  const clampX = (v: number) => (v <= low ? PLOT_LEFT : v >= high ? PLOT_RIGHT : x(v));

  const groups: Array<{ row: ForestRow; top: number; height: number }> = [];
  let y = TOP;
  for (const row of rows) {
    const labelLines = row.flagged ? 3 : 2;
    const height = Math.max(kinds.length * SUB_ROW, labelLines * 15) + GROUP_GAP;
    groups.push({ row, top: y, height });
    y += height;
  }
  const axisY = y + 4;
  const height = axisY + AXIS_SPACE;
  const percent = `${Math.round(level * 1000) / 10}%`;

  return (
    <svg
      role="img"
      aria-labelledby={titleId}
      width={WIDTH}
      height={height}
      viewBox={`0 0 ${WIDTH} ${height}`}
      className="h-auto w-full max-w-full"
      style={{ fontFamily: CHART_FONT }}
      data-testid="forest-plot"
    >
      <title id={titleId}>{title}</title>
      {/* Legend */}
      <g fontSize={12} fill="#44403c">
        {kinds.map((kind, i) => {
          // Each entry starts after the ones before it (about 6 px per character at this size).
          const lx = 8 + kinds.slice(0, i).reduce((sum, k) => sum + ESTIMATE_STYLE[k].label.length * 6 + 40, 0);
          return (
            <g key={kind}>
              <Marker kind={kind} x={lx + 6} y={16} />
              <text x={lx + 16} y={20}>
                {ESTIMATE_STYLE[kind].label}
              </text>
            </g>
          );
        })}
      </g>
      <g fontSize={11} fontWeight={600} fill="#78716c">
        <text x={8} y={TOP - 10}>
          CONTRAST
        </text>
        <text x={NUMBERS_X} y={TOP - 10}>
          ODDS RATIO ({percent} INTERVAL)
        </text>
      </g>

      {groups.map(({ row, top, height: h }, gi) => (
        <g key={row.id} data-contrast={row.id} data-flagged={row.flagged || undefined}>
          {gi % 2 === 0 && <rect x={0} y={top - 3} width={WIDTH} height={h} fill="#f5f5f4" opacity={0.7} />}
          <text x={8} y={top + 11} fontSize={13} fontWeight={600} fill="#1c1917">
            <title>{row.label}</title>
            {truncate(row.label)}
          </text>
          <text x={8} y={top + 26} fontSize={12} fill="#57534e">
            <title>{row.detail}</title>
            {truncate(row.detail, 40)}
          </text>
          {row.flagged && (
            <text x={8} y={top + 41} fontSize={12} fontWeight={600} fill="#8a5a12">
              ⚑ Moves on adjustment: possible confounding
            </text>
          )}
          {kinds.map((kind, i) => {
            const e = row.estimates[i];
            const cy = top + 8 + i * SUB_ROW;
            const color = ESTIMATE_STYLE[kind].color;
            if (!e || !(e.estimate > 0) || !Number.isFinite(e.estimate)) {
              return (
                <text key={kind} x={NUMBERS_X} y={cy + 4} fontSize={11.5} fill="#a8a29e">
                  {ESTIMATE_STYLE[kind].label.split(" (")[0]}: not estimable
                </text>
              );
            }
            const [lo, hi] = e.ci;
            const x1 = clampX(lo > 0 ? lo : low);
            const x2 = clampX(hi);
            return (
              <g key={kind}>
                <line x1={x1} x2={x2} y1={cy} y2={cy} stroke={color} strokeWidth={1.75} />
                {!(lo > low) && <Arrow x={PLOT_LEFT - 1} y={cy} pointing="left" color={color} />}
                {!(hi < high) && <Arrow x={PLOT_RIGHT + 1} y={cy} pointing="right" color={color} />}
                <Marker kind={kind} x={clampX(e.estimate)} y={cy} />
                <text x={NUMBERS_X} y={cy + 4} fontSize={11.5} fill="#292524" style={{ fontVariantNumeric: "tabular-nums" }}>
                  {formatEstimate(e.estimate)} ({formatEstimate(lo)} to {formatEstimate(hi)})
                </text>
              </g>
            );
          })}
        </g>
      ))}

      {/* No selectivity: an odds ratio of 1 */}
      <line x1={x(1)} x2={x(1)} y1={TOP - 4} y2={axisY} stroke="#78716c" strokeWidth={1.25} strokeDasharray="4 3" />
      {/* Axis */}
      <g fontSize={11.5} fill="#57534e">
        <line x1={PLOT_LEFT} x2={PLOT_RIGHT} y1={axisY} y2={axisY} stroke="#a8a29e" />
        {ticks.map((t) => (
          <g key={t}>
            <line x1={x(t)} x2={x(t)} y1={axisY} y2={axisY + 5} stroke="#a8a29e" />
            <text x={x(t)} y={axisY + 18} textAnchor="middle">
              {formatCompact(t)}
            </text>
          </g>
        ))}
        <text x={(PLOT_LEFT + PLOT_RIGHT) / 2} y={axisY + 36} textAnchor="middle" fontSize={12} fontWeight={500} fill="#44403c">
          Odds ratio of extinction (log scale)
        </text>
        <text x={PLOT_LEFT} y={axisY + 52} fontSize={11}>
          ← lower odds than the reference
        </text>
        <text x={PLOT_RIGHT} y={axisY + 52} textAnchor="end" fontSize={11}>
          higher odds →
        </text>
      </g>
    </svg>
  );
}
