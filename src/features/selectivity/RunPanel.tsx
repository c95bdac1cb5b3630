import { useEffect } from "react";
import { can } from "@shared/roles";
import { RUN_EXPORT_TABLES, type Run, type RunResults } from "@shared/schemas/runs";
import type { Study } from "@shared/schemas/studies";
import { Button, ButtonLink, buttonClasses } from "../../components/Button";
import { Card } from "../../components/Card";
import { ErrorState } from "../../components/ErrorState";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { DiscussButton } from "../../components/threads/DiscussButton";
import { LoadingState } from "../../components/LoadingState";
import { FormError } from "../../components/Notice";
import { TextLink } from "../../components/TextLink";
import { useToast } from "../../components/Toast";
import { ApiError, errorMessage } from "../../lib/api";
import { formatDateTime, pluralize } from "../../lib/format";
import { paths } from "../../lib/paths";
import { isActive, runExportUrl, runReplicationUrl, useRerun, useRetryRun, useRun } from "./api";
import { RerunChanges } from "./RerunChanges";
import { RunParameters, RunResultsView } from "./RunResultsView";
import { RunProgress } from "./RunProgress";
import { RunStatusBadge } from "./RunStatusBadge";

const TABLE_LABEL: Record<(typeof RUN_EXPORT_TABLES)[number], string> = {
  run: "Run: parameters, data hash, cautions",
  design: "Design: taxa entering, per trait",
  states: "States: extinction proportions",
  tests: "Tests: p-values",
  contrasts: "Contrasts: odds ratios crude and adjusted",
  coefficients: "Regression coefficients",
  terms: "Regression likelihood ratio tests",
  crisis: "Crisis against background",
  robustness: "Robustness panel: every variant",
  sampling: "Sampling: odds ratios with and without it",
};

export const reportPath = (studyId: string, runId: string) => `${paths.study(studyId)}/runs/${runId}/report`;

/** The key of the toast that says a run was queued: the run's panel follows it and takes it away once the run is over. */
export const runToastKey = (runId: string) => `run:${runId}`;

/** Keeps the "queued" toast of a run in step with the run: "running" while it computes, gone when its results (or its failure) show. */
function useRunToast(run: Run | undefined) {
  const toast = useToast();
  const status = run?.status;
  const id = run?.id;
  const name = run?.name;
  useEffect(() => {
    if (!id || !status) return;
    if (status === "running") toast.update(runToastKey(id), `“${name}” is running. Its progress shows below.`);
    else if (status === "succeeded" || status === "failed") toast.dismiss(runToastKey(id));
  }, [toast, id, name, status]);
  // Leaving the run takes its toast along: it speaks of what this panel shows.
  useEffect(() => (id ? () => toast.dismiss(runToastKey(id)) : undefined), [toast, id]);
}

/** One run on the Selectivity screen: its status while it computes, the reason when it failed, its results when done. */
export function RunPanel({ study, runId, onRerun }: { study: Study; runId: string; onRerun: (run: Run) => void }) {
  const run = useRun(study.id, runId);
  useRunToast(run.data);

  if (run.isPending) return <LoadingState label="Opening the run" lines={4} />;
  if (run.isError) {
    const gone = run.error instanceof ApiError && (run.error.status === 404 || run.error.status === 400);
    return (
      <ErrorState
        error={gone ? new Error("This run is not in this study. It may belong to another study, or the link is incomplete.") : run.error}
        title="The run could not be opened"
        onRetry={gone ? undefined : () => void run.refetch()}
        actions={<TextLink to={`${paths.study(study.id)}/runs`}>See all runs</TextLink>}
      />
    );
  }
  const data = run.data;
  return (
    <section aria-label="Run" className="space-y-6">
      <RunHeader study={study} run={data} onRerun={onRerun} />
      {isActive(data) && <RunProgress run={data} />}
      {data.status === "failed" && <FailedRun study={study} run={data} />}
      {data.status === "succeeded" && data.results && (
        <>
          {data.rerunOf && <RerunChanges studyId={study.id} runId={data.id} baseId={data.rerunOf} />}
          <RunResultsView run={data as Run & { results: RunResults }} />
          <Card title="Parameters and data" description="What this run read and how, to reproduce or cite it.">
            <RunParameters run={data} />
          </Card>
        </>
      )}
    </section>
  );
}

function RunHeader({ study, run, onRerun }: { study: Study; run: Run; onRerun: (run: Run) => void }) {
  const rerun = useRerun(study.id);
  const toast = useToast();
  const canRun = can(study.role, "runs.create");
  const done = run.status === "succeeded";

  const startRerun = () =>
    rerun.mutate(
      { runId: run.id, input: {} },
      {
        onSuccess: (created) => {
          toast.show(`Re-running “${created.name}” on today’s data.`, "success", { key: runToastKey(created.id) });
          onRerun(created);
        },
      },
    );

  return (
    <div className="rounded-xl border border-stone-200 bg-white px-5 py-4 shadow-[0_1px_2px_rgb(28_25_23/0.04)] sm:px-6">
      <div className="flex flex-wrap items-start justify-between gap-4">
        <div className="min-w-0">
          <div className="flex flex-wrap items-center gap-2">
            <h2 className="text-lg font-semibold tracking-tight text-stone-900" data-testid="run-name">
              {run.name}
            </h2>
            <RunStatusBadge status={run.status} />
          </div>
          <p className="mt-1 text-sm text-stone-600">
            Started by {run.createdBy?.name ?? "a former member"}, {formatDateTime(run.createdAt)} · {pluralize(run.params.boundaries.length, "boundary", "boundaries")},{" "}
            {pluralize(run.params.traits.length, "trait")}
            {run.dataHashShort && (
              <>
                {" "}
                · data <code className="font-mono text-xs" title={run.dataHash ?? undefined}>{run.dataHashShort}</code>
              </>
            )}
            {run.rerunOf && (
              <>
                {" "}
                · re-run of an <TextLink to={`${paths.study(study.id)}/selectivity?run=${encodeURIComponent(run.rerunOf)}`}>earlier run</TextLink>
              </>
            )}
          </p>
        </div>
        <div className="flex flex-wrap items-center gap-2 print:hidden">
          {done && (
            <>
              <a href={runExportUrl(study.id, run.id, "csv")} download className={buttonClasses("secondary", "sm")}>
                Download CSV
              </a>
              <a href={runExportUrl(study.id, run.id, "json")} download className={buttonClasses("secondary", "sm")}>
                Download JSON
              </a>
              <a
                href={runReplicationUrl(study.id, run.id)}
                download
                className={buttonClasses("secondary", "sm")}
                title="The exact rows this run analysed, its numbers and an R script that recomputes them with base R and prints both side by side"
              >
                Download for R
              </a>
              <a href={reportPath(study.id, run.id)} target="_blank" rel="noopener" className={buttonClasses("secondary", "sm")}>
                Printable report
              </a>
            </>
          )}
          {canRun && !isActive(run) && (
            <Button size="sm" variant="ghost" onClick={startRerun} busy={rerun.isPending} title="The same parameters on today’s data, as a new run">
              Re-run on today’s data
            </Button>
          )}
          {done && (
            <ButtonLink to={`${paths.study(study.id)}/runs?compare=${encodeURIComponent(run.id)}`} variant="ghost" size="sm">
              Compare with another run
            </ButtonLink>
          )}
          <DiscussButton studyId={study.id} target={{ type: "run", id: run.id }} targetLabel={`The run “${run.name}”`} />
        </div>
      </div>
      {done && (
        <details className="mt-3 print:hidden">
          <summary className={cx("cursor-pointer rounded text-sm font-medium text-accent-700 hover:text-accent-900", focusRing)}>One table as CSV</summary>
          <ul className="mt-2 grid gap-1 text-sm sm:grid-cols-2">
            {RUN_EXPORT_TABLES.map((table) => (
              <li key={table}>
                <a href={runExportUrl(study.id, run.id, "csv", table)} download className="text-accent-700 underline decoration-accent-200 underline-offset-2 hover:text-accent-900">
                  {TABLE_LABEL[table]}
                </a>
              </li>
            ))}
          </ul>
        </details>
      )}
      <FormError message={rerun.isError ? errorMessage(rerun.error) : null} className="mt-3" />
    </div>
  );
}

function FailedRun({ study, run }: { study: Study; run: Run }) {
  const retry = useRetryRun(study.id);
  const canRun = can(study.role, "runs.create");
  return (
    <Card title="The run failed" tone="danger">
      <div data-testid="run-failed">
        <p className="text-[15px] text-red-900">{run.error ?? "The run stopped without giving a reason."}</p>
        <p className="mt-2 text-sm text-stone-600">
          Attempt {run.attempt}
          {run.finishedAt && `, stopped ${formatDateTime(run.finishedAt)}`}. Retrying computes the same parameters again on today’s data.
        </p>
        <div className="mt-4 flex flex-wrap items-center gap-3">
          {canRun ? (
            <Button onClick={() => retry.mutate(run.id)} busy={retry.isPending}>
              Retry
            </Button>
          ) : (
            <p className="text-sm text-stone-600">An analyst or the study lead can retry it.</p>
          )}
        </div>
        <FormError message={retry.isError ? errorMessage(retry.error) : null} className="mt-3" />
      </div>
    </Card>
  );
}
