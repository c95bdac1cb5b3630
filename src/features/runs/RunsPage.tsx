import { useState } from "react";
import { useNavigate, useSearchParams } from "react-router-dom";
import { can } from "@shared/roles";
import type { RunSummary } from "@shared/schemas/runs";
import { Button, ButtonLink } from "../../components/Button";
import { Card } from "../../components/Card";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { FormError } from "../../components/Notice";
import { PageHeader } from "../../components/PageHeader";
import { TextLink } from "../../components/TextLink";
import { useToast } from "../../components/Toast";
import { errorMessage } from "../../lib/api";
import { useCurrentStudy } from "../../lib/currentStudy";
import { formatCount, formatDateTime, formatMa, pluralize } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { isRunActive, runExportUrl, useRerunRun, useRetryRun, useRunList } from "../../lib/queries/runs";

const RUNS_PAGE_SIZE = 20;

const STATUS: Record<RunSummary["status"], { label: string; dot: string }> = {
  queued: { label: "Queued", dot: "bg-stone-400" },
  running: { label: "Running", dot: "bg-accent-500 animate-pulse" },
  succeeded: { label: "Finished", dot: "bg-accent-700" },
  failed: { label: "Failed", dot: "bg-red-600" },
};

const exportLink = cx("rounded font-medium text-accent-700 underline decoration-accent-200 underline-offset-2 hover:text-accent-900", focusRing);

export const selectivityLink = (studyId: string, runId: string) => `${paths.study(studyId)}/selectivity?run=${encodeURIComponent(runId)}`;

/** The Runs screen: every stored selectivity run, reopened, re-run, retried, exported, or chosen in pairs to compare. */
export function RunsPage() {
  const study = useCurrentStudy();
  useDocumentTitle(`Runs · ${study.name}`);
  const [search, setSearch] = useSearchParams();
  const page = Math.max(1, Number(search.get("page")) || 1);
  const runs = useRunList(study.id, page, RUNS_PAGE_SIZE);
  const [chosen, setChosen] = useState<string[]>(() => (search.get("compare") ? [search.get("compare")!] : []));
  const [chosenRuns, setChosenRuns] = useState<Map<string, RunSummary>>(new Map());
  const navigate = useNavigate();
  const toast = useToast();
  const rerun = useRerunRun(study.id);
  const retry = useRetryRun(study.id);
  const canRun = can(study.role, "runs.create");

  const total = runs.data?.total ?? 0;
  const pages = Math.max(1, Math.ceil(total / (runs.data?.pageSize ?? RUNS_PAGE_SIZE)));

  const toggle = (run: RunSummary, on: boolean) => {
    setChosen((current) => (on ? [...current.filter((id) => id !== run.id), run.id].slice(-2) : current.filter((id) => id !== run.id)));
    setChosenRuns((current) => new Map(current).set(run.id, run));
  };
  const known = (id: string) => chosenRuns.get(id) ?? runs.data?.runs.find((r) => r.id === id);
  const compare = () => {
    const [a, b] = chosen.map(known);
    if (!a || !b) return;
    // The older run is the base the newer one is compared with.
    const [base, run] = a.createdAt <= b.createdAt ? [a, b] : [b, a];
    void navigate(`${paths.study(study.id)}/runs/compare?base=${encodeURIComponent(base.id)}&run=${encodeURIComponent(run.id)}`);
  };

  const startRerun = (run: RunSummary) =>
    rerun.mutate({ runId: run.id }, {
      onSuccess: (created) => {
        toast.show(`Re-running “${created.name}” on today’s data.`);
        void navigate(selectivityLink(study.id, created.id));
      },
    });

  const chosenNames = chosen.map((id) => known(id)?.name ?? "a run on another page");
  const chosenNotFinished = chosen.map(known).filter((r) => r && r.status !== "succeeded");

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title="Runs"
        description="Every selectivity run of this study, newest first. A run keeps its parameters, a fingerprint of the data it read and its results: reopen it without recomputing, re-run it on today’s data, compare two side by side, or export it."
        actions={
          <ButtonLink to={`${paths.study(study.id)}/selectivity`} variant={canRun ? "primary" : "secondary"}>
            {canRun ? "Set up a run" : "Open the Selectivity screen"}
          </ButtonLink>
        }
      />

      {runs.isPending && <LoadingState label="Loading the runs" lines={5} />}
      {runs.isError && <ErrorState error={runs.error} title="The runs could not be loaded" onRetry={() => void runs.refetch()} />}
      {runs.isSuccess && total === 0 && (
        <EmptyState
          title="No runs yet"
          description={
            canRun
              ? "Set up a selectivity test on the Selectivity screen: choose a boundary and traits, read the design, and run it. Every run is kept here."
              : "When an analyst or the study lead runs a selectivity test, it is kept here for everyone in the study to read."
          }
          action={
            <ButtonLink to={`${paths.study(study.id)}/selectivity`} variant="primary">
              Go to Selectivity
            </ButtonLink>
          }
        />
      )}

      {runs.isSuccess && total > 0 && (
        <div className="space-y-4">
          <div className="flex flex-wrap items-center justify-between gap-3 rounded-xl border border-stone-200 bg-white px-5 py-3" aria-live="polite">
            <p className="text-[15px] text-stone-700">
              {chosen.length === 0 && "Compare two finished runs: tick them in the list."}
              {chosen.length === 1 && (
                <>
                  Chosen: <span className="font-medium text-stone-900">{chosenNames[0]}</span>. Tick one more to compare.
                </>
              )}
              {chosen.length === 2 && (
                <>
                  Compare <span className="font-medium text-stone-900">{chosenNames[0]}</span> with <span className="font-medium text-stone-900">{chosenNames[1]}</span>
                  {chosenNotFinished.length > 0 && <span className="text-caution-700"> (only finished runs can be compared)</span>}
                </>
              )}
            </p>
            <div className="flex gap-2">
              {chosen.length > 0 && (
                <Button variant="ghost" size="sm" onClick={() => setChosen([])}>
                  Clear
                </Button>
              )}
              <Button size="sm" onClick={compare} disabled={chosen.length !== 2 || chosenNotFinished.length > 0}>
                Compare side by side
              </Button>
            </div>
          </div>

          <FormError message={rerun.isError ? errorMessage(rerun.error) : retry.isError ? errorMessage(retry.error) : null} />

          <Card>
            <div className="-mx-5 -my-5 overflow-x-auto sm:-mx-6">
              <table className="w-full min-w-[46rem] text-sm">
                <caption className="sr-only">Selectivity runs of the study, newest first</caption>
                <thead className="border-b border-stone-200 bg-stone-50 text-left text-xs font-semibold tracking-wide text-stone-500 uppercase">
                  <tr>
                    <th scope="col" className="w-10 px-4 py-2.5">
                      <span className="sr-only">Compare</span>
                    </th>
                    <th scope="col" className="px-3 py-2.5">
                      Run
                    </th>
                    <th scope="col" className="px-3 py-2.5">
                      Status
                    </th>
                    <th scope="col" className="px-3 py-2.5">
                      Started
                    </th>
                    <th scope="col" className="px-3 py-2.5">
                      Data read
                    </th>
                    <th scope="col" className="px-3 py-2.5 text-right">
                      <span className="sr-only">Actions</span>
                    </th>
                  </tr>
                </thead>
                <tbody className={cx("divide-y divide-stone-100", runs.isPlaceholderData && "opacity-60")}>
                  {runs.data.runs.map((run) => (
                    <RunRow
                      key={run.id}
                      studyId={study.id}
                      run={run}
                      chosen={chosen.includes(run.id)}
                      canRun={canRun}
                      onToggle={(on) => toggle(run, on)}
                      onRerun={() => startRerun(run)}
                      onRetry={() => retry.mutate(run.id, { onSuccess: () => toast.show(`“${run.name}” is queued again.`) })}
                      busy={(rerun.isPending && rerun.variables?.runId === run.id) || (retry.isPending && retry.variables === run.id)}
                    />
                  ))}
                </tbody>
              </table>
            </div>
          </Card>

          {pages > 1 && (
            <nav aria-label="Pages of runs" className="flex items-center justify-between gap-3 text-sm text-stone-600">
              <span>
                Page {page} of {pages} · {pluralize(total, "run")}
              </span>
              <div className="flex gap-2">
                <Button variant="secondary" size="sm" disabled={page <= 1} onClick={() => setSearch({ page: String(page - 1) })}>
                  Newer runs
                </Button>
                <Button variant="secondary" size="sm" disabled={page >= pages} onClick={() => setSearch({ page: String(page + 1) })}>
                  Older runs
                </Button>
              </div>
            </nav>
          )}
        </div>
      )}
    </>
  );
}

interface RunRowProps {
  studyId: string;
  run: RunSummary;
  chosen: boolean;
  canRun: boolean;
  busy: boolean;
  onToggle: (on: boolean) => void;
  onRerun: () => void;
  onRetry: () => void;
}

function RunRow({ studyId, run, chosen, canRun, busy, onToggle, onRerun, onRetry }: RunRowProps) {
  const status = STATUS[run.status];
  const percent = Math.round(run.progress * 100);
  const boundaries = run.params.boundaries.map((b) => b.label ?? formatMa(b.boundaryMa));
  return (
    <tr data-run={run.name} data-run-id={run.id} className={chosen ? "bg-accent-50/60" : undefined}>
      <td className="px-4 py-3 align-top">
        <input
          type="checkbox"
          checked={chosen}
          onChange={(event) => onToggle(event.target.checked)}
          aria-label={`Choose “${run.name}” for comparison`}
          className="mt-0.5 size-4 rounded border-stone-300 accent-accent-600"
        />
      </td>
      <td className="min-w-[14rem] px-3 py-3 align-top">
        <TextLink to={selectivityLink(studyId, run.id)}>{run.name}</TextLink>
        <p className="mt-0.5 text-xs text-stone-500">
          {boundaries.length === 1 ? boundaries[0] : pluralize(boundaries.length, "boundary", "boundaries")} · {pluralize(run.params.traits.length, "trait")}
          {run.rerunOf && " · re-run"}
        </p>
      </td>
      <td className="px-3 py-3 align-top">
        <span className="inline-flex items-center gap-2 font-medium text-stone-800" data-status={run.status}>
          <span className={cx("size-2 rounded-full", status.dot)} aria-hidden="true" />
          {status.label}
          {isRunActive(run) && <span className="text-stone-500 tabular-nums">{percent}%</span>}
        </span>
        {isRunActive(run) && (
          <>
            <div
              role="progressbar"
              aria-label={`Progress of ${run.name}`}
              aria-valuemin={0}
              aria-valuemax={100}
              aria-valuenow={percent}
              className="mt-1.5 h-1.5 w-36 overflow-hidden rounded-full bg-stone-200"
            >
              <div className="h-full rounded-full bg-accent-600 transition-[width] duration-500" style={{ width: `${Math.max(percent, 3)}%` }} />
            </div>
            {run.progressNote && <p className="mt-1 max-w-56 text-xs text-stone-500">{run.progressNote}</p>}
          </>
        )}
        {run.status === "failed" && run.error && <p className="mt-1 max-w-64 text-xs text-red-800">{run.error}</p>}
      </td>
      <td className="px-3 py-3 align-top text-stone-700">
        {formatDateTime(run.createdAt)}
        <p className="text-xs text-stone-500">{run.createdBy?.name ?? "A former member"}</p>
      </td>
      <td className="px-3 py-3 align-top text-stone-700">
        {run.dataHashShort ? (
          <>
            <code className="font-mono text-xs" title={`SHA-256 ${run.dataHash}`}>
              {run.dataHashShort}
            </code>
            {run.rowCount !== null && <p className="text-xs text-stone-500">{formatCount(run.rowCount)} taxon rows</p>}
            {run.status === "succeeded" && (
              <p className="mt-1 text-xs">
                <a href={runExportUrl(studyId, run.id, "csv")} download className={exportLink} aria-label={`Download “${run.name}” as CSV`}>
                  CSV
                </a>
                <span className="text-stone-400"> · </span>
                <a href={runExportUrl(studyId, run.id, "json")} download className={exportLink} aria-label={`Download “${run.name}” as JSON`}>
                  JSON
                </a>
              </p>
            )}
          </>
        ) : (
          <span className="text-stone-400">Not read yet</span>
        )}
      </td>
      <td className="py-3 pr-4 pl-3 text-right align-top">
        <div className="flex justify-end gap-1.5 whitespace-nowrap">
          <ButtonLink to={selectivityLink(studyId, run.id)} variant="secondary" size="sm" aria-label={`Open “${run.name}”`}>
            Open
          </ButtonLink>
          {canRun && run.status === "failed" && (
            <Button size="sm" onClick={onRetry} busy={busy} aria-label={`Retry “${run.name}”`}>
              Retry
            </Button>
          )}
          {canRun && !isRunActive(run) && (
            <Button variant="ghost" size="sm" onClick={onRerun} busy={busy} aria-label={`Re-run “${run.name}” on today’s data`}>
              Re-run
            </Button>
          )}
        </div>
      </td>
    </tr>
  );
}
