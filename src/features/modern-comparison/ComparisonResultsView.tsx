import type { ReactNode } from "react";
import { IUCN_CATEGORY_NAMES, IUCN_SOURCE } from "@shared/iucn";
import type { Comparison } from "@shared/schemas/comparisons";
import { Caution } from "../../components/Caution";
import { COMPARISON_COLOUR, REFERENCE_COLOUR } from "../../components/chartColours";
import { cx } from "../../lib/cx";
import { clause, formatCount, formatDateTime, pluralize } from "../../lib/format";
import { CategoryBadge } from "./CategoryBadge";
import { RocChart } from "./RocChart";
import { aucReading, formatInterval, formatOdds, formatP, formatProbability, formatTwo, spearmanMethodWords } from "./words";

type Results = Comparison["results"];
type Contrast = Results["traits"][number]["contrasts"][number];

/** Species rows shown on screen; the CSV holds every one. */
const SPECIES_SHOWN = 300;

function Section({ title, children, description, id }: { title: string; description?: ReactNode; children: ReactNode; id: string }) {
  return (
    <section aria-labelledby={id} className="report-section rounded-xl border border-stone-200 bg-white px-5 py-5 sm:px-6">
      <h2 id={id} className="text-base font-semibold tracking-tight text-stone-900">
        {title}
      </h2>
      {description && <p className="mt-1 text-sm text-stone-600">{description}</p>}
      <div className="mt-4">{children}</div>
    </section>
  );
}

function Figure({ label, value, detail }: { label: string; value: string; detail?: ReactNode }) {
  return (
    <div className="rounded-lg border border-stone-200 bg-stone-50 px-4 py-3">
      <dt className="text-xs font-semibold tracking-wide text-stone-500 uppercase">{label}</dt>
      <dd className="mt-1 text-2xl font-semibold tabular-nums text-stone-900">{value}</dd>
      {detail && <dd className="mt-0.5 text-sm text-stone-600">{detail}</dd>}
    </div>
  );
}

const MINI = { width: 220, left: 12, right: 12, today: 10, past: 24, axis: 34, height: 50 };

/** Tick values of a side-by-side plot: the powers of ten inside the span, with 0.2, 0.5, 2, 5 when those are too few. */
export function miniTicks(domain: [number, number]): number[] {
  const inside = (v: number) => v >= domain[0] * 0.999 && v <= domain[1] * 1.001;
  const decades = [0.01, 0.1, 1, 10, 100].filter(inside);
  if (decades.length >= 3) return decades;
  return [...new Set([...decades, ...[0.2, 0.5, 2, 5, 20, 50].filter(inside)])].sort((a, b) => a - b);
}

/** An arrowhead at the end of an interval that runs past the plotted span. */
function Arrow({ x, y, pointing, color }: { x: number; y: number; pointing: "left" | "right"; color: string }) {
  const d = pointing === "left" ? `M ${x} ${y} l 6 -4 l 0 8 z` : `M ${x} ${y} l -6 -4 l 0 8 z`;
  return <path d={d} fill={color} data-arrow={pointing} />;
}

/** Two odds ratios with intervals on one log scale: today's above, the past crisis's below; ticks under them, arrows where an interval runs off the scale. */
function SideBySide({ contrast, domain }: { contrast: Contrast; domain: [number, number] }) {
  const { width, left, right } = MINI;
  const [lo, hi] = domain.map(Math.log) as [number, number];
  const x = (v: number) => left + ((Math.log(Math.min(Math.max(v, domain[0]), domain[1])) - lo) / (hi - lo)) * (width - left - right);
  const row = (y: number, interval: { estimate: number; ci: [number, number] } | null, color: string) =>
    interval && (
      <g>
        <line x1={x(interval.ci[0])} x2={x(interval.ci[1])} y1={y} y2={y} stroke={color} strokeWidth={2} />
        {interval.ci[0] < domain[0] && <Arrow x={x(domain[0]) - 6} y={y} pointing="left" color={color} />}
        {interval.ci[1] > domain[1] && <Arrow x={x(domain[1]) + 6} y={y} pointing="right" color={color} />}
        <circle cx={x(interval.estimate)} cy={y} r={4} fill={color} />
      </g>
    );
  const words = (name: string, interval: { estimate: number; ci: [number, number] } | null) =>
    interval
      ? `${name} ${formatOdds(interval.estimate)} (${formatInterval(interval.ci)})${interval.ci[0] < domain[0] || interval.ci[1] > domain[1] ? ", the interval running off the scale" : ""}`
      : `${name} not estimated`;
  return (
    <svg
      width={width}
      height={MINI.height}
      role="img"
      data-testid="side-by-side"
      aria-label={`Odds ratio ${words("today", contrast.today)}; ${words("in the past crisis", contrast.pastCrude)}`}
    >
      <line x1={x(1)} x2={x(1)} y1={2} y2={MINI.axis} stroke={REFERENCE_COLOUR} strokeDasharray="3 3" />
      {row(MINI.today, contrast.today, COMPARISON_COLOUR.today)}
      {row(MINI.past, contrast.pastCrude, COMPARISON_COLOUR.past)}
      <g fontSize={10} fill="#57534e" style={{ fontVariantNumeric: "tabular-nums" }}>
        <line x1={left} x2={width - right} y1={MINI.axis} y2={MINI.axis} stroke="#d6d3d1" />
        {miniTicks(domain).map((t) => (
          <g key={t}>
            <line x1={x(t)} x2={x(t)} y1={MINI.axis} y2={MINI.axis + 3} stroke="#a8a29e" />
            <text x={x(t)} y={MINI.axis + 13} textAnchor="middle" data-tick={t}>
              {formatOdds(t)}
            </text>
          </g>
        ))}
      </g>
    </svg>
  );
}

/** The results of a saved comparison, caution first; `print` lays them out for paper. */
export function ComparisonResultsView({ comparison, print = false }: { comparison: Comparison; print?: boolean }) {
  const r = comparison.results;
  const c = r.counts;
  const unscored = c.unscored.threatened + c.unscored.notThreatened + c.unscored.excluded;
  const intervals = r.traits.flatMap((t) => t.contrasts.flatMap((k) => [k.today?.ci, k.pastCrude?.ci].filter((ci): ci is [number, number] => Boolean(ci))));
  const domain: [number, number] = [
    Math.max(0.01, Math.min(0.5, ...intervals.map((ci) => ci[0]))),
    Math.min(100, Math.max(2, ...intervals.map((ci) => ci[1]))),
  ];
  const levelPercent = `${Math.round(comparison.params.level * 100)}%`;

  return (
    <div className="space-y-6">
      <div className="report-section space-y-3">
        <Caution title="A screening aid, not an assessment">{r.cautions[0]}</Caution>
        {r.cautions.length > 1 && (
          <Caution title="Carried over from the run">
            <ul className="list-disc space-y-1 pl-5">
              {r.cautions.slice(1).map((text, i) => (
                <li key={i}>{text}</li>
              ))}
            </ul>
          </Caution>
        )}
      </div>

      <Section id="headline" title="How today’s listing lines up with the past crisis" description={`${r.run.boundaryLabel}, run “${r.run.name}”, held against “${r.list.name}”.`}>
        <dl className="grid gap-3 sm:grid-cols-3">
          {r.roc ? (
            <Figure label="Area under the ROC curve" value={formatTwo(r.roc.auc)} detail={`${levelPercent} interval ${formatInterval(r.roc.ci, formatTwo)} (${r.roc.ciMethod ? "score interval" : "DeLong"})`} />
          ) : (
            <Figure label="Area under the ROC curve" value="—" detail={r.rocNote} />
          )}
          {r.spearman ? (
            <Figure label="Spearman’s rho with the category" value={formatTwo(r.spearman.rho)} detail={`${formatP(r.spearman.pValue)} ${spearmanMethodWords(r.spearman)}, ${pluralize(r.spearman.n, "species", "species")}`} />
          ) : (
            <Figure label="Spearman’s rho with the category" value="—" detail={r.spearmanNote} />
          )}
          <Figure label="Worth a look" value={formatCount(r.worthALook.length)} detail={`listed LC or DD, predicted at least ${formatProbability(comparison.params.worthALookMin)}`} />
        </dl>
        {r.roc && (
          <p className={r.roc.smallSample ? "mt-4 rounded-lg border border-caution-200 bg-caution-50 px-4 py-3 text-[15px] text-stone-800" : "mt-4 text-[15px] text-stone-700"} data-testid="auc-reading">
            {aucReading(r.roc)}
          </p>
        )}
      </Section>

      <Section
        id="who-counts"
        title="Who is compared"
        description={`Threatened means CR, EN or VU, against NT and LC, as defined in ${IUCN_SOURCE}. Other categories are kept out of the comparison and counted.`}
      >
        <div className="grid gap-6 sm:grid-cols-2">
          <table className="text-sm">
            <caption className="sr-only">Species by group, scored or not</caption>
            <thead className="text-left text-stone-500">
              <tr>
                <th scope="col" className="pr-4 pb-1.5 font-medium">Group</th>
                <th scope="col" className="pr-4 pb-1.5 text-right font-medium">Scored</th>
                <th scope="col" className="pb-1.5 text-right font-medium">Not scored</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-stone-100">
              <tr>
                <th scope="row" className="py-1.5 pr-4 text-left font-medium">Threatened (CR, EN, VU)</th>
                <td className="py-1.5 pr-4 text-right tabular-nums">{formatCount(c.scored.threatened)}</td>
                <td className="py-1.5 text-right tabular-nums">{formatCount(c.unscored.threatened)}</td>
              </tr>
              <tr>
                <th scope="row" className="py-1.5 pr-4 text-left font-medium">Not threatened (NT, LC)</th>
                <td className="py-1.5 pr-4 text-right tabular-nums">{formatCount(c.scored.notThreatened)}</td>
                <td className="py-1.5 text-right tabular-nums">{formatCount(c.unscored.notThreatened)}</td>
              </tr>
              <tr>
                <th scope="row" className="py-1.5 pr-4 text-left font-medium">Kept out (EX, EW, DD, NE)</th>
                <td className="py-1.5 pr-4 text-right tabular-nums">{formatCount(c.scored.excluded)}</td>
                <td className="py-1.5 text-right tabular-nums">{formatCount(c.unscored.excluded)}</td>
              </tr>
            </tbody>
          </table>
          <div>
            <h3 className="text-sm font-medium text-stone-800">Kept out of the comparison</h3>
            <ul className="mt-2 space-y-1 text-sm" aria-label="Kept out of the comparison">
              {(["EX", "EW", "DD", "NE"] as const).map((code) => (
                <li key={code} className="flex items-center gap-2">
                  <CategoryBadge category={code} />
                  <span className="tabular-nums font-medium">{formatCount(c.excluded[code])}</span>
                  <span className="text-stone-600">{IUCN_CATEGORY_NAMES[code]}</span>
                </li>
              ))}
            </ul>
          </div>
        </div>
        {unscored > 0 && (
          <div className="mt-5">
            <h3 className="text-sm font-medium text-caution-700">{pluralize(unscored, "species", "species")} could not be scored</h3>
            <ul className="mt-1 list-disc space-y-1 pl-5 text-sm text-stone-700">
              {r.unscoredReasons.map((u) => (
                <li key={u.reason}>
                  {clause(u.reason)}: {pluralize(u.count, "species", "species")} (e.g. {u.examples.join(", ")})
                </li>
              ))}
            </ul>
          </div>
        )}
        {r.notes.length > 0 && (
          <ul className="mt-4 space-y-1 text-sm text-stone-600">
            {r.notes.map((n) => (
              <li key={n}>{n}</li>
            ))}
          </ul>
        )}
      </Section>

      <Section id="roc" title="ROC curve" description="How well the predicted probability ranks species listed threatened above those that are not.">
        {r.roc ? (
          <div className="flex flex-col gap-6 md:flex-row md:items-start">
            <RocChart roc={r.roc} fixedWidth={print ? 360 : undefined} />
            <dl className="space-y-2 text-sm">
              <div>
                <dt className="text-stone-500">Area under the curve</dt>
                <dd className="font-medium tabular-nums">
                  {formatTwo(r.roc.auc)} ({levelPercent} interval {formatInterval(r.roc.ci, formatTwo)}
                  {r.roc.ciMethod ? `, ${r.roc.ciMethod}` : ""}, {r.roc.seMethod === "score-interval" ? "standard error from the interval, as DeLong's collapses at 0 or 1" : "DeLong standard error"}{" "}
                  {r.roc.se.toFixed(3)})
                </dd>
              </div>
              <div>
                <dt className="text-stone-500">Mann-Whitney U</dt>
                <dd className="font-medium tabular-nums">
                  {r.roc.mannWhitneyU} of {formatCount(r.roc.cases * r.roc.controls)} pairs = AUC (Hanley &amp; McNeil 1982)
                </dd>
              </div>
              <div>
                <dt className="text-stone-500">Scored species</dt>
                <dd className="font-medium tabular-nums">
                  {formatCount(r.roc.cases)} threatened, {formatCount(r.roc.controls)} not threatened
                </dd>
              </div>
            </dl>
          </div>
        ) : (
          <p className="text-[15px] text-stone-600">{r.rocNote}</p>
        )}
      </Section>

      <Section
        id="traits"
        title="Each trait, today and in the past"
        description="Odds ratio of being threatened today (CR, EN, VU against NT, LC) beside the same contrast’s odds ratio of extinction in the past crisis. Above 1: the state goes with more risk."
      >
        <div className="mb-3 flex flex-wrap gap-4 text-sm text-stone-600">
          <span className="inline-flex items-center gap-2">
            <span className="inline-block size-3 rounded-full" style={{ background: COMPARISON_COLOUR.today }} aria-hidden="true" /> Today
          </span>
          <span className="inline-flex items-center gap-2">
            <span className="inline-block size-3 rounded-full" style={{ background: COMPARISON_COLOUR.past }} aria-hidden="true" /> Past crisis (crude)
          </span>
          <span>Log scale, from {formatOdds(domain[0])} to {formatOdds(domain[1])}; the dashed line is 1; an arrow marks an interval running past the edge.</span>
        </div>
        <div className="overflow-x-auto">
          <table className="min-w-full text-sm">
            <caption className="sr-only">Odds ratios today and in the past crisis, by trait contrast</caption>
            <thead className="text-left text-stone-500">
              <tr>
                <th scope="col" className="py-2 pr-4 font-medium">Contrast</th>
                <th scope="col" className="py-2 pr-4 font-medium">Today ({levelPercent} interval)</th>
                <th scope="col" className="py-2 pr-4 font-medium">Past crisis, crude</th>
                <th scope="col" className="py-2 pr-4 font-medium">Past, adjusted for the model’s other traits</th>
                <th scope="col" className="py-2 font-medium">Side by side</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-stone-100">
              {r.traits.flatMap((t) =>
                t.contrasts.map((k) => (
                  <tr key={`${t.key}:${k.contrast}`} className="align-top">
                    <th scope="row" className="py-2 pr-4 text-left font-medium text-stone-900">
                      {t.label}: {k.contrast}
                    </th>
                    <td className="py-2 pr-4 tabular-nums">
                      {k.today ? (
                        <>
                          <span className="font-medium">{formatOdds(k.today.estimate)}</span> ({formatInterval(k.today.ci)})
                          <span className="block text-xs text-stone-500">
                            {pluralize(k.today.n, "species", "species")}
                            {k.today.table ? `; threatened ${k.today.table[0][0]} of ${k.today.table[0][0] + k.today.table[0][1]} against ${k.today.table[1][0]} of ${k.today.table[1][0] + k.today.table[1][1]}` : ""}
                          </span>
                        </>
                      ) : (
                        <span className="text-stone-500">{k.todayNote}</span>
                      )}
                    </td>
                    <td className="py-2 pr-4 tabular-nums">{k.pastCrude ? `${formatOdds(k.pastCrude.estimate)} (${formatInterval(k.pastCrude.ci)})` : "—"}</td>
                    <td className="py-2 pr-4 tabular-nums">{k.pastModelAdjusted ? `${formatOdds(k.pastModelAdjusted.estimate)} (${formatInterval(k.pastModelAdjusted.ci)})` : "—"}</td>
                    <td className="py-2">
                      <SideBySide contrast={k} domain={domain} />
                    </td>
                  </tr>
                )),
              )}
            </tbody>
          </table>
        </div>
      </Section>

      <Section
        id="worth-a-look"
        title="Worth a look"
        description={`Species listed Least Concern or Data Deficient whose predicted probability under the past crisis’s selectivity is at least ${formatProbability(comparison.params.worthALookMin)}, highest first. A prompt to check their assessment, not a finding about them.`}
      >
        {r.worthALook.length === 0 ? (
          <p className="text-[15px] text-stone-600">No species listed LC or DD reaches {formatProbability(comparison.params.worthALookMin)}.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="min-w-full text-sm" aria-label="Worth a look">
              <thead className="text-left text-stone-500">
                <tr>
                  <th scope="col" className="py-2 pr-4 text-right font-medium">Rank</th>
                  <th scope="col" className="py-2 pr-4 font-medium">Species</th>
                  <th scope="col" className="py-2 pr-4 font-medium">Higher taxon</th>
                  <th scope="col" className="py-2 pr-4 font-medium">Listed</th>
                  <th scope="col" className="py-2 text-right font-medium">Predicted ({levelPercent} interval)</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-stone-100">
                {r.worthALook.map((s) => (
                  <tr key={s.name}>
                    <td className="py-1.5 pr-4 text-right tabular-nums">{s.rank}</td>
                    <td className="py-1.5 pr-4 font-medium italic">{s.name}</td>
                    <td className="py-1.5 pr-4 text-stone-600">{s.higherTaxon || "—"}</td>
                    <td className="py-1.5 pr-4">
                      <CategoryBadge category={s.category} />
                    </td>
                    <td className="py-1.5 text-right tabular-nums">
                      <span className="font-medium">{formatProbability(s.probability)}</span> ({formatInterval(s.ci, formatProbability)})
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Section>

      <Section id="what-was-read" title="What was read">
        <dl className="grid gap-x-6 gap-y-2 text-sm sm:grid-cols-[max-content_1fr]">
          <dt className="text-stone-500">Run</dt>
          <dd>
            {r.run.name}; {r.run.boundaryLabel}; model: {r.run.modelMethod}, {pluralize(r.run.modelN, "taxon", "taxa")}
            {r.run.dataHash && <span className="block font-mono text-xs text-stone-500">run data {r.run.dataHash}</span>}
          </dd>
          <dt className="text-stone-500">List</dt>
          <dd>
            {r.list.name}, {pluralize(r.list.speciesCount, "species", "species")}
          </dd>
          <dt className="text-stone-500">Crosswalk</dt>
          <dd>{r.crosswalkLabels.length ? r.crosswalkLabels.map((p) => `${p.column} → ${p.traitLabel}`).join("; ") : "—"}</dd>
          <dt className="text-stone-500">Data hash</dt>
          <dd className="font-mono text-xs break-all">{comparison.dataHash}</dd>
          <dt className="text-stone-500">Saved</dt>
          <dd>
            {formatDateTime(comparison.createdAt)}
            {comparison.createdBy ? ` by ${comparison.createdBy.name}` : ""} · Stratasieve {comparison.appVersion}
          </dd>
        </dl>
      </Section>

      {!print && (
        <Section id="all-species" title="Every species" description={r.species.length > SPECIES_SHOWN ? `The first ${SPECIES_SHOWN} by name; the CSV holds all ${formatCount(r.species.length)}.` : undefined}>
          <details>
            <summary className="cursor-pointer text-sm font-medium text-accent-700">Show {pluralize(Math.min(r.species.length, SPECIES_SHOWN), "species", "species")} with their scores</summary>
            <div className="mt-3 max-h-[32rem] overflow-auto">
              <table className="min-w-full text-sm">
                <thead className="sticky top-0 bg-white text-left text-stone-500">
                  <tr>
                    <th scope="col" className="py-2 pr-4 font-medium">Species</th>
                    <th scope="col" className="py-2 pr-4 font-medium">Listed</th>
                    <th scope="col" className="py-2 pr-4 text-right font-medium">Predicted</th>
                    <th scope="col" className="py-2 font-medium">Not scored because</th>
                  </tr>
                </thead>
                <tbody className="divide-y divide-stone-100">
                  {r.species.slice(0, SPECIES_SHOWN).map((s) => (
                    <tr key={s.name} className={cx(s.probability === null && "text-stone-500")}>
                      <td className="py-1.5 pr-4 italic">{s.name}</td>
                      <td className="py-1.5 pr-4">
                        <CategoryBadge category={s.category} />
                      </td>
                      <td className="py-1.5 pr-4 text-right tabular-nums">{formatProbability(s.probability)}</td>
                      <td className="py-1.5">{s.reason ?? ""}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </details>
        </Section>
      )}
    </div>
  );
}
