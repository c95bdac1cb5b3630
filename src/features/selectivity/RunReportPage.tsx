import { Link, useParams } from "react-router-dom";
import type { Run, RunResults } from "@shared/schemas/runs";
import type { Study } from "@shared/schemas/studies";
import { Button } from "../../components/Button";
import { ErrorState } from "../../components/ErrorState";
import { focusRing } from "../../components/focus";
import { LoadingState } from "../../components/LoadingState";
import { formatDateTime } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useRun } from "../../lib/queries/runs";
import { useStudy } from "../../lib/queries/study";
import { BoundaryResults } from "./BoundaryResults";
import { HeatMapCard } from "./HeatMapCard";
import { CrisisCard, differingTraits } from "./CrisisCard";
import { panelOf, RobustnessCard } from "./RobustnessCard";
import { SamplingCard } from "./SamplingCard";
import { RunProgress } from "./RunProgress";
import { RunCautions, runFilePrefix, RunParameters } from "./RunResultsView";

// The printed page: no navigation or buttons, exact colours in the charts, no figure split over two
// pages. Tailwind's print: variants hide the controls; these rules cover the page as a whole.
const PRINT_RULES = `
@media print {
  @page { margin: 14mm 12mm; }
  html, body { background: #ffffff !important; }
  nav, [data-print="hide"] { display: none !important; }
  [data-report] { max-width: none !important; padding: 0 !important; }
  [data-report] section, [data-report] figure, [data-report] table { break-inside: avoid; }
  [data-report] * { -webkit-print-color-adjust: exact; print-color-adjust: exact; box-shadow: none !important; }
  details > summary { display: none; }
}
`;

/** A run as a document to print or save as PDF: parameters, data hash, cautions, every figure and table. */
export function RunReportPage() {
  const { studyId = "", runId = "" } = useParams();
  // The report opens outside the study layout, so it loads the study itself.
  const study = useStudy(studyId);
  const run = useRun(studyId, runId);
  useDocumentTitle(run.data ? `Report · ${run.data.name}` : "Run report");

  return (
    <div className="min-h-screen bg-white">
      <style>{PRINT_RULES}</style>
      <nav aria-label="Report" data-print="hide" className="sticky top-0 z-30 border-b border-stone-200 bg-white/95 backdrop-blur">
        <div className="mx-auto flex h-14 max-w-5xl items-center justify-between gap-4 px-4 sm:px-6">
          <Link to={`${paths.study(studyId)}/selectivity?run=${encodeURIComponent(runId)}`} className={`rounded text-sm font-medium text-stone-600 hover:text-stone-900 ${focusRing}`}>
            ← Back to the run
          </Link>
          <Button size="sm" onClick={() => window.print()} disabled={run.data?.status !== "succeeded"}>
            Print or save as PDF
          </Button>
        </div>
      </nav>
      <main data-report className="mx-auto max-w-5xl px-4 py-8 sm:px-6">
        {(run.isPending || study.isPending) && <LoadingState label="Loading the run" lines={6} />}
        {run.isError && <ErrorState error={run.error} title="The run could not be opened" onRetry={() => void run.refetch()} />}
        {!run.isError && study.isError && <ErrorState error={study.error} title="The study could not be opened" onRetry={() => void study.refetch()} />}
        {run.data && study.data && <Report run={run.data} study={study.data} />}
      </main>
    </div>
  );
}

function Report({ run, study }: { run: Run; study: Study }) {
  return (
    <article className="space-y-8" data-testid="run-report">
      <header className="border-b border-stone-200 pb-6">
        <p className="text-sm font-semibold tracking-wide text-accent-700 uppercase">Stratasieve · selectivity report</p>
        <h1 className="mt-2 text-3xl font-semibold tracking-tight text-stone-900">{run.name}</h1>
        <p className="mt-2 text-[15px] text-stone-600">
          Study: {study.name} · run {formatDateTime(run.createdAt)} by {run.createdBy?.name ?? "a former member"}
        </p>
      </header>

      {run.status !== "succeeded" || !run.results ? (
        run.status === "failed" ? (
          <ErrorState error={new Error(run.error ?? "The run stopped without giving a reason.")} title="This run failed, so there is nothing to report" />
        ) : (
          <RunProgress run={run} />
        )
      ) : (
        <ReportBody run={run as Run & { results: RunResults }} />
      )}
    </article>
  );
}

function ReportBody({ run }: { run: Run & { results: RunResults } }) {
  const prefix = runFilePrefix(run);
  return (
    <>
      <section aria-labelledby="report-parameters">
        <h2 id="report-parameters" className="mb-4 text-xl font-semibold tracking-tight text-stone-900">
          Parameters and data
        </h2>
        <RunParameters run={run} />
      </section>

      <section aria-labelledby="report-cautions">
        <h2 id="report-cautions" className="mb-4 text-xl font-semibold tracking-tight text-stone-900">
          Cautions
        </h2>
        <RunCautions results={run.results} printable />
      </section>

      {run.results.boundaries.length > 1 && <HeatMapCard boundaries={run.results.boundaries} filePrefix={prefix} printable differing={differingTraits(run.results)} />}
      <CrisisCard run={run} printable />

      {run.results.boundaries.map((boundary, index) => (
        <section key={`${boundary.boundaryMa}-${boundary.windowMyr}`} aria-label={boundary.label} className="space-y-4 break-before-page first-of-type:break-before-auto">
          <h2 className="text-xl font-semibold tracking-tight text-stone-900">Results at {boundary.label}</h2>
          <BoundaryResults boundary={boundary} params={run.params} filePrefix={prefix} printable robustness={panelOf(run.results, index)?.panel} explainedAbove={index > 0} />
          <SamplingCard boundary={boundary} printable />
          <RobustnessCard results={run.results} index={index} label={boundary.label} printable />
        </section>
      ))}

      <footer className="border-t border-stone-200 pt-4 text-sm text-stone-500">
        Numbers as stored with the run {run.id}, not recomputed. Data fingerprint (SHA-256): <span className="font-mono break-all">{run.dataHash}</span>. Stratasieve{" "}
        {run.appVersion}.
      </footer>
    </>
  );
}
