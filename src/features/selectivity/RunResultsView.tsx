import { useId, useState, type ReactNode } from "react";
import type { Run, RunResults } from "@shared/schemas/runs";
import { Caution } from "../../components/Caution";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { formatMa, formatMyr } from "../../components/timescale/ages";
import { formatCount, formatDateTime } from "../../lib/format";
import { BoundaryResults } from "./BoundaryResults";
import { HeatMapCard } from "./HeatMapCard";
import { CrisisCard, differingTraits } from "./CrisisCard";
import { panelOf, RobustnessCard } from "./RobustnessCard";
import { SamplingCard } from "./SamplingCard";
import { SAMPLING_COVARIATE_LABELS } from "@shared/schemas/samplingCheck";
import { boundaryColumns } from "./resultRows";
import { CORRECTION_LABELS, fileSlug, formatWholePercent, levelWords } from "./words";

/** The file names of a run's charts start with its name and the day it was started. */
export function runFilePrefix(run: Run): string {
  return `${fileSlug(run.name)}_${run.createdAt.slice(0, 10)}`;
}

/** Above this many warnings about the outcomes, the list folds (its count stays in view). */
const FOLD_WARNINGS_ABOVE = 3;

/** The run's cautions: the standing one first, then the warnings about the outcomes it read. */
export function RunCautions({ results, printable = false }: { results: RunResults; printable?: boolean }) {
  const [first, ...rest] = results.cautions;
  const list = (
    <ul className="list-disc space-y-1 pl-5">
      {rest.map((caution) => (
        <li key={caution}>{caution}</li>
      ))}
    </ul>
  );
  return (
    <div className="space-y-3 break-inside-avoid" data-testid="run-cautions">
      <Caution title="Association, not mechanism">{first}</Caution>
      {rest.length > 0 && (
        <Caution title="What the outcomes rest on">
          {rest.length > FOLD_WARNINGS_ABOVE ? (
            <details open={printable || undefined}>
              <summary className="cursor-pointer font-medium text-caution-700">
                {rest.length} warnings about the survivors and victims these results count: how many taxa each touches
              </summary>
              <div className="mt-2">{list}</div>
            </details>
          ) : (
            list
          )}
        </Caution>
      )}
    </div>
  );
}

/** What was run, on which data, by whom: everything needed to reproduce or cite it. */
export function RunParameters({ run }: { run: Run }) {
  const p = run.params;
  const traitName = new Map((run.results?.traits ?? []).map((t) => [t.traitId, t.label]));
  const used = run.results?.boundaries ?? [];
  return (
    <dl className="grid gap-x-8 gap-y-4 text-[15px] sm:grid-cols-2" data-testid="run-parameters">
      <Item label={p.boundaries.length === 1 ? "Boundary" : "Boundaries"}>
        <ul className="space-y-0.5">
          {p.boundaries.map((b, i) => {
            const u = used[i];
            return (
              <li key={`${b.boundaryMa}-${b.windowMyr ?? "default"}`}>
                {u?.label ?? b.label ?? formatMa(b.boundaryMa)}; window {u ? formatMyr(u.windowMyr) : b.windowMyr !== undefined ? formatMyr(b.windowMyr) : "the stage below"}
                {u?.windowDefaultFrom && ` (the ${u.windowDefaultFrom.label})`}
              </li>
            );
          })}
        </ul>
      </Item>
      <Item label="Traits tested">
        <ul className="space-y-0.5">
          {p.traits.map((t) => (
            <li key={t.traitId}>
              {traitName.get(t.traitId) ?? "A trait no longer in the codebook"}
              <span className="text-stone-600">
                {[t.reference ? `reference ${t.reference}` : null, t.transform ? (t.transform === "log10" ? "log10" : "as given") : null, t.standardise ? "per SD" : null]
                  .filter(Boolean)
                  .map((w) => `, ${w}`)
                  .join("")}
              </span>
            </li>
          ))}
        </ul>
      </Item>
      <Item label="Multiple testing">{CORRECTION_LABELS[p.correction]}</Item>
      {p.boundaries.length > 1 && (
        <Item label="Crisis against background">
          {p.crisisBoundary !== undefined ? `${used[p.crisisBoundary]?.label ?? `Boundary ${p.crisisBoundary + 1}`} is the crisis; the others are background` : "No crisis named"}
        </Item>
      )}
      <Item label="Robustness panel">
        Windows ×{(p.robustness?.windowFactors ?? [0.5, 1.5, 2]).join(", ×")}; truncation{" "}
        {p.robustness?.truncationMyr !== undefined ? formatMyr(p.robustness.truncationMyr) : "a quarter of each window"}
      </Item>
      <Item label="Sampling covariates">
        {(p.samplingCovariates ?? []).length ? (p.samplingCovariates ?? []).map((c) => SAMPLING_COVARIATE_LABELS[c]).join("; ") : "None"}
      </Item>
      <Item label="Intervals">{levelWords(p.level)}</Item>
      <Item label="Clade-adjusted odds ratios">
        Stratified by higher taxon (Mantel-Haenszel for states, conditional logistic regression for numbers); thin below {p.minInformativeClades ?? 3} informative clades
      </Item>
      <Item label="Firth’s regression">{p.forceFirth ? "Forced" : "Only when the data separate"}</Item>
      <Item label="Confounding flag">
        Crude odds ratio differs from the standardised one by more than {formatWholePercent(p.confoundingThreshold)} (common practice) and by more than its own uncertainty (bootstrap)
      </Item>
      <Item label="Data read">
        {run.rowCount === null ? "—" : `${formatCount(run.rowCount)} taxon rows`}
        {run.dataHash && (
          <span className="mt-0.5 block font-mono text-xs break-all text-stone-600" title="SHA-256 of exactly the data the run read">
            SHA-256 {run.dataHash}
          </span>
        )}
      </Item>
      <Item label="Run by">
        {run.createdBy?.name ?? "A former member"}, {formatDateTime(run.createdAt)}
        {run.finishedAt && <span className="text-stone-600">; finished {formatDateTime(run.finishedAt)}</span>}
      </Item>
      <Item label="Stratasieve version">
        {run.appVersion}
        {run.attempt > 1 && <span className="text-stone-600">, attempt {run.attempt}</span>}
      </Item>
    </dl>
  );
}

function Item({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div className="min-w-0">
      <dt className="text-xs font-semibold tracking-wide text-stone-500 uppercase">{label}</dt>
      <dd className="mt-0.5 text-stone-900">{children}</dd>
    </div>
  );
}

/** A finished run's results: cautions, the heat map over boundaries, then one boundary at a time. */
export function RunResultsView({ run }: { run: Run & { results: RunResults } }) {
  const { results } = run;
  const [selected, setSelected] = useState(0);
  const tabsId = useId();
  const prefix = runFilePrefix(run);
  const columns = boundaryColumns(results.boundaries);
  const boundary = results.boundaries[Math.min(selected, results.boundaries.length - 1)];

  return (
    <div className="space-y-6" data-testid="run-results">
      <RunCautions results={results} />
      {results.boundaries.length > 1 && <HeatMapCard boundaries={results.boundaries} filePrefix={prefix} differing={differingTraits(results)} />}
      <CrisisCard run={run} />

      {results.boundaries.length > 1 && (
        <div role="tablist" aria-label="Boundary shown" className="flex flex-wrap gap-1 border-b border-stone-200">
          {results.boundaries.map((b, i) => (
            <button
              key={`${b.boundaryMa}-${b.windowMyr}`}
              type="button"
              role="tab"
              id={`${tabsId}-${i}`}
              aria-selected={i === selected}
              aria-controls={`${tabsId}-panel`}
              onClick={() => setSelected(i)}
              className={cx(
                "-mb-px rounded-t-md border-b-2 px-3 py-2 text-sm font-medium transition-colors",
                i === selected ? "border-accent-600 text-accent-900" : "border-transparent text-stone-600 hover:text-stone-900",
                focusRing,
              )}
            >
              {columns[i]}
            </button>
          ))}
        </div>
      )}
      <div id={`${tabsId}-panel`} role={results.boundaries.length > 1 ? "tabpanel" : undefined} aria-labelledby={results.boundaries.length > 1 ? `${tabsId}-${selected}` : undefined}>
        <BoundaryResults
          key={`${boundary.boundaryMa}-${boundary.windowMyr}`}
          boundary={boundary}
          params={run.params}
          filePrefix={prefix}
          robustness={panelOf(results, Math.min(selected, results.boundaries.length - 1))?.panel}
        />
        {boundary.sampling && (
          <div className="mt-6">
            <SamplingCard key={`sampling-${boundary.boundaryMa}-${boundary.windowMyr}`} boundary={boundary} />
          </div>
        )}
        <div className="mt-6">
          <RobustnessCard
            key={`robustness-${boundary.boundaryMa}-${boundary.windowMyr}`}
            results={results}
            index={Math.min(selected, results.boundaries.length - 1)}
            label={boundary.label}
          />
        </div>
      </div>
    </div>
  );
}
