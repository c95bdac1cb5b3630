import { Fragment, useId, useState } from "react";
import { Link, useSearchParams } from "react-router-dom";
import type { RunDiff, RunDiffCheckSide } from "@shared/schemas/runDiff";
import type { RunSummary } from "@shared/schemas/runs";
import { Button, ButtonLink } from "../../components/Button";
import { Card } from "../../components/Card";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { PageHeader } from "../../components/PageHeader";
import { TextLink } from "../../components/TextLink";
import { useCurrentStudy } from "../../lib/currentStudy";
import { formatCount, formatDateTime, formatNumber, formatMyr, formatP } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useRunDiff } from "../../lib/queries/runs";
import { selectivityLink } from "./RunsPage";
import { ChangedParameters } from "../../components/ChangedParameters";

type Pair = { base: number | null; run: number | null };

const number = (v: number | null) => (v === null ? "—" : v === Infinity ? "∞" : formatNumber(v));

/** Two runs side by side: whether the data and the parameters changed, and every number that moved. */
export function RunComparePage() {
  const study = useCurrentStudy();
  useDocumentTitle(`Compare runs · ${study.name}`);
  const [search, setSearch] = useSearchParams();
  const baseId = search.get("base");
  const runId = search.get("run");
  const diff = useRunDiff(study.id, runId, baseId);
  const runsPath = `${paths.study(study.id)}/runs`;

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title="Compare runs"
        description="The earlier run on the left, the later one on the right. Changed numbers are marked; a different data fingerprint means the trait table or the outcomes changed between the two."
        actions={
          <>
            {baseId && runId && (
              <Button variant="ghost" onClick={() => setSearch({ base: runId, run: baseId })}>
                Swap sides
              </Button>
            )}
            <ButtonLink to={runsPath} variant="secondary">
              All runs
            </ButtonLink>
          </>
        }
      />
      {!baseId || !runId ? (
        <EmptyState
          title="Choose two runs to compare"
          description="Tick two finished runs in the list of runs, then choose Compare side by side."
          action={
            <ButtonLink to={runsPath} variant="primary">
              Go to the runs
            </ButtonLink>
          }
        />
      ) : diff.isPending ? (
        <LoadingState label="Setting the two runs side by side" lines={6} />
      ) : diff.isError ? (
        <ErrorState error={diff.error} title="These two runs could not be compared" onRetry={() => void diff.refetch()} actions={<TextLink to={runsPath}>Back to the runs</TextLink>} />
      ) : (
        <Comparison studyId={study.id} diff={diff.data} />
      )}
    </>
  );
}

function Comparison({ studyId, diff }: { studyId: string; diff: RunDiff }) {
  const [onlyChanged, setOnlyChanged] = useState(false);
  const onlyId = useId();
  const anyChange = diff.boundaries.some((b) => b.traits.some((t) => t.changed) || b.sampling.changed || b.robustness.changed) || diff.crisis.changed;
  return (
    <div className="space-y-6" data-testid="run-comparison">
      <div className="grid gap-4 md:grid-cols-2">
        <RunSide side="Earlier (base)" studyId={studyId} run={diff.base} />
        <RunSide side="Later" studyId={studyId} run={diff.run} />
      </div>

      <Card title="Data and parameters">
        <div className="space-y-3 text-[15px]">
          <p className={cx("rounded-lg px-4 py-3", diff.hashChanged ? "border border-caution-200 bg-caution-50 text-stone-800" : "bg-stone-50 text-stone-700")} data-testid="data-change">
            {diff.hashChanged ? (
              <>
                <span className="font-semibold">The data differ:</span> the two runs read different trait values, outcomes or taxa (fingerprint{" "}
                <code className="font-mono text-sm">{diff.base.dataHashShort}</code> → <code className="font-mono text-sm">{diff.run.dataHashShort}</code>)
                {diff.rowCount.change !== null && diff.rowCount.change !== 0 && (
                  <>
                    ; taxon rows {formatCount(diff.rowCount.base ?? 0)} → {formatCount(diff.rowCount.run ?? 0)}
                  </>
                )}
                .
              </>
            ) : (
              <>
                <span className="font-semibold">Same data:</span> both runs read exactly the same values (fingerprint <code className="font-mono text-sm">{diff.run.dataHashShort}</code>).
              </>
            )}
          </p>
          {diff.paramsChanged.length === 0 ? (
            <p className="text-stone-700">Same parameters.</p>
          ) : (
            <ChangedParameters changes={diff.paramsChanged} />
          )}
          {!anyChange && <p className="text-stone-700">No test result, odds ratio or verdict differs between the two runs.</p>}
        </div>
      </Card>

      {shown(diff.crisis) && (
        <Card
          title="Crisis against background"
          description={
            diff.crisis.crisis.base === diff.crisis.crisis.run
              ? `Does each trait sort survivors from victims differently at ${diff.crisis.crisis.run} than at the background boundaries?`
              : "Does each trait sort survivors from victims differently at the crisis than at the background boundaries?"
          }
        >
          <CheckChanges check={diff.crisis} name="crisis" />
        </Card>
      )}

      <div className="flex items-center gap-2">
        <input id={onlyId} type="checkbox" checked={onlyChanged} onChange={(e) => setOnlyChanged(e.target.checked)} className="size-4 rounded border-stone-300 accent-accent-600" />
        <label htmlFor={onlyId} className="text-[15px] text-stone-800">
          Show only what changed
        </label>
      </div>

      {diff.boundaries.map((b) => (
        <BoundaryComparison key={`${b.boundaryMa}-${b.windowMyr.base}-${b.windowMyr.run}`} boundary={b} onlyChanged={onlyChanged} />
      ))}
    </div>
  );
}

function RunSide({ side, studyId, run }: { side: string; studyId: string; run: RunSummary }) {
  return (
    <div className="rounded-xl border border-stone-200 bg-white px-5 py-4">
      <p className="text-xs font-semibold tracking-wide text-stone-500 uppercase">{side}</p>
      <p className="mt-1 font-semibold text-stone-900">
        <Link to={selectivityLink(studyId, run.id)} className={cx("rounded hover:underline", focusRing)}>
          {run.name}
        </Link>
      </p>
      <p className="text-sm text-stone-600">
        {formatDateTime(run.createdAt)} · {run.createdBy?.name ?? "a former member"}
      </p>
      <p className="mt-1 text-sm text-stone-600">
        Data <code className="font-mono text-xs">{run.dataHashShort ?? "—"}</code>
        {run.rowCount !== null && ` · ${formatCount(run.rowCount)} taxon rows`}
      </p>
    </div>
  );
}

const PRESENCE: Record<"both" | "baseOnly" | "runOnly", string | null> = {
  both: null,
  baseOnly: "only in the earlier run",
  runOnly: "only in the later run",
};

type Metric = { label: string; pair: Pair; format: (v: number | null) => string };

function BoundaryComparison({ boundary, onlyChanged }: { boundary: RunDiff["boundaries"][number]; onlyChanged: boolean }) {
  const traits = onlyChanged ? boundary.traits.filter((t) => t.changed || t.presence !== "both") : boundary.traits;
  const counts: Array<[string, Pair]> = [
    ["Victims", boundary.victims],
    ["Survivors", boundary.survivors],
    ["In the regression", boundary.completeCases],
  ];
  const window = boundary.windowMyr;
  const checks: Array<[string, string, Check]> = [
    ["Does each contrast hold once sampling is allowed for?", "sampling", boundary.sampling],
    ["Robustness panel", "robustness", boundary.robustness],
  ];
  // A boundary only one run has has no verdicts to compare: its presence line says so.
  const checksShown = boundary.presence === "both" ? checks.filter(([, , check]) => shown(check) && (!onlyChanged || check.changed || check.note !== null)) : [];
  return (
    <Card
      title={boundary.label}
      description={
        <>
          {PRESENCE[boundary.presence] ? `This boundary is ${PRESENCE[boundary.presence]}. ` : null}
          Window {window.base === window.run ? myr(window.run) : `${myr(window.base)} → ${myr(window.run)}`}.
        </>
      }
    >
      <dl className="mb-4 grid grid-cols-3 gap-4 text-sm">
        {counts.map(([label, pair]) => (
          <div key={label}>
            <dt className="text-xs font-semibold tracking-wide text-stone-500 uppercase">{label}</dt>
            <dd className={cx("tabular-nums", pair.base !== pair.run ? "font-semibold text-stone-900" : "text-stone-700")}>
              {pair.base === pair.run ? count(pair.run) : `${count(pair.base)} → ${count(pair.run)}`}
            </dd>
          </div>
        ))}
      </dl>
      {checksShown.length > 0 && (
        <div className="mb-4 space-y-3" aria-label={`Checks of the findings at ${boundary.label}`} role="group">
          {checksShown.map(([title, name, check]) => (
            <div key={name}>
              <h3 className="text-sm font-semibold text-stone-900">{title}</h3>
              <CheckChanges check={check} name={name} />
            </div>
          ))}
        </div>
      )}
      {traits.length === 0 ? (
        <p className="text-[15px] text-stone-600">{boundary.traits.length === 0 ? "No trait results at this boundary." : "No test result or odds ratio changed at this boundary."}</p>
      ) : (
        <div className="overflow-x-auto rounded-lg border border-stone-200">
          <table className="w-full min-w-[30rem] text-sm">
            <caption className="sr-only">Tests and odds ratios of each trait at {boundary.label}: the earlier run beside the later one</caption>
            <thead className="border-b border-stone-200 bg-stone-50 text-xs font-semibold tracking-wide text-stone-500 uppercase">
              <tr>
                <th scope="col" className="px-3 py-2 text-left">
                  Trait, contrast and measure
                </th>
                <th scope="col" className="px-3 py-2 text-right">
                  Earlier
                </th>
                <th scope="col" className="px-3 py-2 text-right">
                  Later
                </th>
              </tr>
            </thead>
            {traits.map((t) => (
              <TraitComparison key={t.key} trait={t} onlyChanged={onlyChanged} />
            ))}
          </table>
        </div>
      )}
    </Card>
  );
}

type Check = { base: RunDiffCheckSide; run: RunDiffCheckSide; note: string | null; changes: string[]; changed: boolean };

/** A check is worth a line when either run holds it (otherwise neither has anything to compare). */
const shown = (check: Check) => check.base.status === "computed" || check.run.status === "computed";

/** The verdicts of one check that changed, in words; or why they are not compared. */
function CheckChanges({ check, name }: { check: Check; name: string }) {
  return (
    <div className="text-[15px]" data-compare-check={name} data-changed={check.changed ? "true" : "false"}>
      {check.note !== null ? (
        <p className="text-stone-600">{check.note}</p>
      ) : check.changes.length === 0 ? (
        <p className="text-stone-700">Same verdicts in both runs.</p>
      ) : (
        <ul className="mt-1 list-disc space-y-0.5 pl-5 text-stone-800">
          {check.changes.map((change) => (
            <li key={change}>{change}</li>
          ))}
        </ul>
      )}
    </div>
  );
}

const myr = (v: number | null) => (v === null ? "—" : formatMyr(v));
const count = (v: number | null) => (v === null ? "—" : formatCount(v));
const flag = (v: boolean | null) => (v === null ? "—" : v ? "Flagged" : "Holds");

function MetricRow({ metric, indent }: { metric: Metric; indent: boolean }) {
  const changed = metric.pair.base !== metric.pair.run;
  return (
    <tr data-changed={changed ? "true" : "false"} className={changed ? "bg-caution-50/50" : undefined}>
      <th scope="row" className={cx("py-1.5 pr-3 text-left font-normal text-stone-600", indent ? "pl-10" : "pl-6")}>
        {metric.label}
      </th>
      <td className="px-3 py-1.5 text-right text-stone-600 tabular-nums">{metric.format(metric.pair.base)}</td>
      <td className={cx("px-3 py-1.5 text-right tabular-nums", changed ? "font-semibold text-stone-900" : "text-stone-600")}>
        {changed && <span className="sr-only">changed to </span>}
        {metric.format(metric.pair.run)}
      </td>
    </tr>
  );
}

function TraitComparison({ trait, onlyChanged }: { trait: RunDiff["boundaries"][number]["traits"][number]; onlyChanged: boolean }) {
  const contrasts = onlyChanged ? trait.contrasts.filter((c) => c.changed) : trait.contrasts;
  const traitMetrics: Metric[] = [
    { label: "Taxa tested", pair: trait.used, format: count },
    { label: "p", pair: trait.pValue, format: formatP },
    { label: "Adjusted p", pair: trait.adjustedPValue, format: formatP },
  ];
  const keep = (m: Metric) => !onlyChanged || m.pair.base !== m.pair.run;
  return (
    <tbody className="border-t border-stone-200" data-compare-trait={trait.key} data-changed={trait.changed ? "true" : "false"}>
      <tr>
        <th scope="rowgroup" colSpan={3} className="bg-white px-3 pt-3 pb-1 text-left font-semibold text-stone-900">
          {trait.label}
          {PRESENCE[trait.presence] && <span className="ml-1.5 text-xs font-normal text-stone-500">{PRESENCE[trait.presence]}</span>}
          {trait.changed && <span className="ml-2 rounded-full bg-caution-200/70 px-2 py-0.5 text-xs font-semibold text-caution-700">Changed</span>}
        </th>
      </tr>
      {traitMetrics.filter(keep).map((m) => (
        <MetricRow key={m.label} metric={m} indent={false} />
      ))}
      {contrasts.map((c) => {
        const metrics: Metric[] = [
          { label: "Crude odds ratio", pair: c.crudeOddsRatio, format: number },
          { label: "Adjusted for clade", pair: c.cladeAdjustedOddsRatio, format: number },
          { label: "Adjusted for the other traits", pair: c.modelAdjustedOddsRatio, format: number },
        ];
        const flagChanged = c.flagged.base !== c.flagged.run;
        return (
          <Fragment key={c.contrast}>
            <tr data-compare-contrast={`${trait.key}:${c.contrast}`}>
              <th scope="rowgroup" colSpan={3} className="px-6 pt-2 pb-0.5 text-left text-[13px] font-medium text-stone-800">
                {c.contrast}
              </th>
            </tr>
            {metrics.filter(keep).map((m) => (
              <MetricRow key={m.label} metric={m} indent />
            ))}
            {(!onlyChanged || flagChanged) && (
              <tr data-changed={flagChanged ? "true" : "false"} className={flagChanged ? "bg-caution-50/50" : undefined}>
                <th scope="row" className="py-1.5 pr-3 pl-10 text-left font-normal text-stone-600">
                  Confounding check
                </th>
                <td className="px-3 py-1.5 text-right text-stone-600">{flag(c.flagged.base)}</td>
                <td className={cx("px-3 py-1.5 text-right", flagChanged ? "font-semibold text-caution-700" : c.flagged.run ? "text-caution-700" : "text-stone-600")}>
                  {flag(c.flagged.run)}
                </td>
              </tr>
            )}
          </Fragment>
        );
      })}
    </tbody>
  );
}
