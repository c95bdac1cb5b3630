import { useId, useState } from "react";
import { formatMyr, pluralize } from "../../lib/format";
import { EMPHASIS_COLOUR, REFERENCE_COLOUR } from "../../components/chartColours";
import type { RobustnessPanel } from "@shared/selectivity/robustnessPanel";
import type { RunResults } from "@shared/schemas/runs";
import { Card } from "../../components/Card";
import { cx } from "../../lib/cx";
import { Body, ColHead, HeadRow, ResultTable, td } from "./ResultTable";
import { formatEstimate, formatInterval } from "./words";

type Measure = "adjusted" | "crude";
type Contrast = RobustnessPanel["contrasts"][number];
type Verdict = Contrast["verdict"]["crude"];

const STATUS_WORDS: Record<Verdict["status"], string> = {
  holds: "Holds",
  fragile: "Fragile",
  "never-there": "Never there",
  "not-estimated": "Not estimated",
};
const STATUS_STYLE: Record<Verdict["status"], string> = {
  holds: "bg-emerald-50 text-emerald-800 ring-emerald-200",
  fragile: "bg-amber-50 text-amber-900 ring-amber-200",
  "never-there": "bg-stone-100 text-stone-700 ring-stone-200",
  "not-estimated": "bg-white text-stone-500 ring-stone-200",
};

/** The robustness panel of one boundary of a run, when the run computed it. */
export function panelOf(results: RunResults, index: number): { panel: RobustnessPanel | null; reason: string | null } | null {
  const stored = results.robustness;
  if (!stored) return null;
  if (stored.status === "not-computed") return { panel: null, reason: stored.reason };
  const entry = stored.boundaries.find((b) => b.index === index);
  return entry ? { panel: entry.panel, reason: entry.reason } : null;
}

export function VerdictBadge({ verdict }: { verdict: Verdict }) {
  return (
    <span className={cx("inline-flex items-center rounded-full px-2 py-0.5 text-xs font-semibold ring-1 ring-inset", STATUS_STYLE[verdict.status])} data-verdict={verdict.status}>
      {STATUS_WORDS[verdict.status]}
    </span>
  );
}

/**
 * Does each finding survive other reasonable choices? A summary per contrast (holds, fragile and
 * under which variant, never there) and one compact chart per contrast: the estimate and interval
 * under each variant, the run's own choice marked.
 */
export function RobustnessCard({ results, index, label, printable = false }: { results: RunResults; index: number; label: string; printable?: boolean }) {
  const found = panelOf(results, index);
  const hasAdjusted = found?.panel?.contrasts.some((c) => c.estimates.some((e) => e.adjusted !== null)) ?? false;
  const [measure, setMeasure] = useState<Measure>(hasAdjusted ? "adjusted" : "crude");
  const name = useId();
  // Runs saved before the panel existed have none: say so rather than leave the question open.
  const { panel, reason } = found ?? { panel: null, reason: "This run was saved before runs computed a robustness panel. Re-run it on today’s data to see whether each finding holds." };
  if (!panel) {
    return (
      <Card title={`Does it hold? Robustness at ${label}`} className="break-inside-avoid">
        <p className="text-[15px] text-stone-700">{reason ?? "The robustness panel was not computed for this boundary."}</p>
      </Card>
    );
  }
  const clades = panel.variants.filter((v) => v.kind === "clade").length;
  return (
    <Card
      title={`Does it hold? Robustness at ${label}`}
      description={`Each odds ratio re-estimated under other windows (${panel.variants
        .filter((v) => v.kind === "window")
        .map((v) => v.label.replace(/^Window /, ""))
        .join(", ")}), without each of ${pluralize(clades, "clade")} in turn, without single-stage taxa, and with last appearances within ${formatMyr(panel.truncationMyr)} of the boundary recoded.`}
      className="break-inside-avoid"
    >
      <div className="space-y-5" data-testid="robustness-panel">
        <ResultTable caption={`Robustness verdicts at ${label}`} minWidth="44rem">
          <HeadRow>
            <ColHead>Contrast</ColHead>
            <ColHead>Crude</ColHead>
            <ColHead>Adjusted for the other traits</ColHead>
          </HeadRow>
          <Body>
            {panel.contrasts.map((c) => (
              <tr key={`${c.traitKey}-${c.contrast}`} data-robustness-contrast={`${c.traitKey}:${c.contrast}`}>
                <th scope="row" className={cx(td, "align-top font-medium")}>
                  {c.traitLabel}: {c.contrast}
                </th>
                {(["crude", "adjusted"] as const).map((m) => (
                  <td key={m} className={cx(td, "align-top")}>
                    <VerdictBadge verdict={c.verdict[m]} />
                    {c.verdict[m].status === "fragile" && <p className="mt-1 text-xs text-stone-600">Changes under: {c.verdict[m].changedUnder.join("; ")}</p>}
                  </td>
                ))}
              </tr>
            ))}
          </Body>
        </ResultTable>

        <fieldset className="print:hidden">
          <legend className="mb-2 text-sm font-medium text-stone-800">Odds ratio in the charts</legend>
          <div className="inline-flex rounded-lg border border-stone-300 bg-stone-100 p-0.5">
            {(["adjusted", "crude"] as const).map((m) => (
              <label
                key={m}
                className={cx(
                  "cursor-pointer rounded-md px-3 py-1.5 text-sm font-medium has-[:focus-visible]:ring-2 has-[:focus-visible]:ring-accent-500",
                  measure === m ? "bg-white text-stone-900 shadow-sm" : "text-stone-600 hover:text-stone-900",
                )}
              >
                <input type="radio" name={name} value={m} checked={measure === m} onChange={() => setMeasure(m)} className="sr-only" />
                {m === "adjusted" ? "Adjusted for the other traits" : "Crude"}
              </label>
            ))}
          </div>
        </fieldset>

        <div className="grid gap-4 lg:grid-cols-2">
          {panel.contrasts.map((c) => (
            <VariantChart key={`${c.traitKey}-${c.contrast}`} panel={panel} contrast={c} measure={measure} />
          ))}
        </div>
        <p className="text-sm text-stone-600">
          Filled dot and bold label: the run’s own choice. Lines are intervals on a log scale; the dashed line is an odds ratio of 1. The clade row spans the
          estimates with each clade left out in turn; its dot is the estimate without the clade that moves it most.
        </p>
        <details open={printable || undefined} className="text-sm text-stone-600">
          <summary className="cursor-pointer font-medium text-stone-700">How this was computed</summary>
          <p className="mt-2">{panel.method}</p>
          {panel.notes.length > 0 && (
            <ul className="mt-2 list-disc pl-5">
              {panel.notes.map((n) => (
                <li key={n}>{n}</li>
              ))}
            </ul>
          )}
        </details>
      </div>
    </Card>
  );
}

const ROW = 18;
const LABEL_WIDTH = 230;
const PLOT_WIDTH = 220;
const BOUND = 1000;

/** One contrast: estimate and interval per variant on a log scale, the run's own choice marked. */
function VariantChart({ panel, contrast, measure }: { panel: RobustnessPanel; contrast: Contrast; measure: Measure }) {
  const byId = new Map(panel.variants.map((v) => [v.id, v]));
  type Row = { label: string; own: boolean; estimate: number | null; ci: [number, number] | null; range?: [number, number] };
  const rows: Row[] = [];
  for (const e of contrast.estimates) {
    const v = byId.get(e.variant)!;
    if (v.kind === "clade") continue;
    const est = e[measure];
    rows.push({ label: v.label, own: v.kind === "run", estimate: est?.estimate ?? null, ci: est?.ci ?? null });
  }
  const jack = contrast.jackknife[measure];
  if (jack) {
    const influential = jack.mostInfluential ? contrast.estimates.find((e) => e.variant === `clade:${jack.mostInfluential!.clade}`)?.[measure] : null;
    rows.push({
      label: `Clades out (${jack.cladesLeftOut}); most: ${jack.mostInfluential?.clade ?? "—"}`,
      own: false,
      estimate: influential?.estimate ?? null,
      ci: influential?.ci ?? null,
      range: [jack.min, jack.max],
    });
  }
  const values = rows.flatMap((r) => [...(r.ci ?? []), ...(r.range ?? []), ...(r.estimate !== null ? [r.estimate] : [])]).filter((v) => v > 0 && Number.isFinite(v));
  const lo = Math.log(Math.max(1 / BOUND, Math.min(1, ...values)));
  const hi = Math.log(Math.min(BOUND, Math.max(1, ...values)));
  const span = hi - lo || 1;
  const x = (v: number) => LABEL_WIDTH + ((Math.log(Math.min(BOUND, Math.max(1 / BOUND, v))) - lo) / span) * PLOT_WIDTH;
  const height = rows.length * ROW + 24;
  const verdict = contrast.verdict[measure];
  const title = `${contrast.traitLabel}: ${contrast.contrast}`;
  return (
    <figure className="rounded-lg border border-stone-200 p-3 break-inside-avoid" data-testid="robustness-chart">
      <figcaption className="mb-1 flex flex-wrap items-center justify-between gap-2 text-sm font-medium text-stone-900">
        <span>{title}</span>
        <VerdictBadge verdict={verdict} />
      </figcaption>
      <svg
        viewBox={`0 0 ${LABEL_WIDTH + PLOT_WIDTH + 12} ${height}`}
        className="w-full"
        role="img"
        aria-label={`${title}: odds ratio (${measure}) under each variant. ${verdict.sentence}`}
        style={{ fontFamily: '"Inter Tight", system-ui, sans-serif' }}
      >
        <line x1={x(1)} x2={x(1)} y1={4} y2={height - 18} stroke={REFERENCE_COLOUR} strokeDasharray="3 3" />
        {rows.map((r, i) => {
          const y = 12 + i * ROW;
          return (
            <g key={r.label}>
              <text x={0} y={y + 4} fontSize={11} fill={r.own ? EMPHASIS_COLOUR : "#57534e"} fontWeight={r.own ? 700 : 400}>
                <title>{r.label}</title>
                {r.label.length > 40 ? `${r.label.slice(0, 39)}…` : r.label}
              </text>
              {r.range && <line x1={x(r.range[0])} x2={x(r.range[1])} y1={y} y2={y} stroke="#d6d3d1" strokeWidth={6} strokeLinecap="round" />}
              {r.ci && <line x1={x(r.ci[0])} x2={x(r.ci[1])} y1={y} y2={y} stroke={r.own ? EMPHASIS_COLOUR : "#78716c"} strokeWidth={r.own ? 2 : 1.5} />}
              {r.estimate !== null ? (
                <circle cx={x(r.estimate)} cy={y} r={r.own ? 4.5 : 3.5} fill={r.own ? EMPHASIS_COLOUR : "#ffffff"} stroke={r.own ? EMPHASIS_COLOUR : "#78716c"} strokeWidth={1.5} />
              ) : (
                <text x={LABEL_WIDTH} y={y + 4} fontSize={11} fill="#78716c">
                  not estimated
                </text>
              )}
            </g>
          );
        })}
        <text x={x(1)} y={height - 4} fontSize={10} fill="#57534e" textAnchor="middle">
          OR 1
        </text>
        <text x={LABEL_WIDTH} y={height - 4} fontSize={10} fill="#57534e">
          {formatEstimate(Math.exp(lo))}
        </text>
        <text x={LABEL_WIDTH + PLOT_WIDTH} y={height - 4} fontSize={10} fill="#57534e" textAnchor="end">
          {formatEstimate(Math.exp(hi))}
        </text>
      </svg>
      <p className="mt-1 text-xs text-stone-600">{verdict.sentence}</p>
      <details className="mt-1 text-xs text-stone-600 print:hidden">
        <summary className="cursor-pointer">Numbers</summary>
        <ul className="mt-1 space-y-0.5">
          {rows.map((r) => (
            <li key={r.label}>
              {r.label}: {r.estimate === null ? "not estimated" : `${formatEstimate(r.estimate)} (${formatInterval(r.ci)})`}
              {r.range && `; range ${formatInterval(r.range)}`}
            </li>
          ))}
        </ul>
      </details>
    </figure>
  );
}
