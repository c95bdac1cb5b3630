import { Link, useParams, useSearchParams } from "react-router-dom";
import type { Study } from "@shared/schemas/studies";
import { Button } from "../../components/Button";
import { Caution } from "../../components/Caution";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { focusRing } from "../../components/focus";
import { LoadingState } from "../../components/LoadingState";
import { formatDateTime } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useStudy } from "../../lib/queries/study";
import { formatMa, formatMyr, RANK_WORD } from "../../components/timescale/ages";
import { DrawChartsAtOnce } from "../../components/DeferredChart";
import { useOutcomes, useTurnover, type OutcomesRequest } from "./api";
import { BoundaryScorecard } from "./BoundaryScorecard";
import { readBoundaryView } from "./boundaryParams";
import { OutcomeSummary } from "./OutcomeSummary";
import { RatesChart } from "./RatesChart";
import { TurnoverSection } from "./TurnoverSection";

// The printed page: no navigation or buttons, exact colours in the charts, no figure split over two pages,
// the tables behind the charts open.
const PRINT_RULES = `
@media print {
  @page { margin: 14mm 12mm; }
  html, body { background: #ffffff !important; }
  nav, [data-print="hide"] { display: none !important; }
  [data-report] { max-width: none !important; padding: 0 !important; }
  [data-report] figure, [data-report] table { break-inside: avoid; }
  [data-report] * { -webkit-print-color-adjust: exact; print-color-adjust: exact; box-shadow: none !important; }
  details > summary { display: none; }
}
`;

/** A boundary as a document to print or save as PDF: outcomes, scorecard, turnover and their numbers, with the cautions. */
export function BoundaryReportPage() {
  const { studyId = "" } = useParams();
  const [search] = useSearchParams();
  const view = readBoundaryView(search);
  const splitBy = search.get("split") ?? "";
  // The report opens outside the study layout, so it loads the study itself.
  const study = useStudy(studyId);
  const where = view.choice ? (view.choice.kind === "unit" ? { boundaryUnit: view.choice.name } : { boundary: view.choice.age }) : null;
  const outcomesRequest: OutcomesRequest | null = where ? { ...where, window: view.window, pageSize: 1 } : null;
  const outcomes = useOutcomes(studyId, outcomesRequest);
  const turnover = useTurnover(studyId, where ? { ...where, window: view.window, splitBy: splitBy || undefined } : null);
  useDocumentTitle(study.data ? `Boundary report · ${study.data.name}` : "Boundary report");

  return (
    <div className="min-h-screen bg-white">
      <style>{PRINT_RULES}</style>
      <nav aria-label="Report" data-print="hide" className="sticky top-0 z-30 border-b border-stone-200 bg-white/95 backdrop-blur">
        <div className="mx-auto flex h-14 max-w-5xl items-center justify-between gap-4 px-4 sm:px-6">
          <Link to={`${paths.study(studyId)}/boundary?${search.toString()}`} className={`rounded text-sm font-medium text-stone-600 hover:text-stone-900 ${focusRing}`}>
            ← Back to the boundary
          </Link>
          <Button size="sm" onClick={() => window.print()} disabled={!outcomes.data || !turnover.data}>
            Print or save as PDF
          </Button>
        </div>
      </nav>
      {/* A document to print: its charts are drawn at once, not after the numbers. */}
      <DrawChartsAtOnce value>
      <main data-report className="mx-auto max-w-5xl px-4 py-8 sm:px-6">
        {!where && (
          <EmptyState
            title="No boundary in this link"
            description="Open the report from the Boundary screen after choosing a boundary: the link carries the boundary, the window and the split."
          />
        )}
        {where && study.isPending && <LoadingState label="Loading the study" lines={3} />}
        {study.isError && <ErrorState error={study.error} title="The study could not be opened" onRetry={() => void study.refetch()} />}
        {where && outcomes.isPending && <LoadingState label="Sorting taxa across the boundary" lines={4} />}
        {outcomes.isError && <ErrorState error={outcomes.error} title="The outcomes could not be worked out" onRetry={() => void outcomes.refetch()} />}
        {study.data && outcomes.data && (
          <Report
            study={study.data}
            outcomes={outcomes.data}
            turnover={turnover}
            splitBy={splitBy}
            unitName={view.choice?.kind === "unit" ? view.choice.name : null}
          />
        )}
      </main>
      </DrawChartsAtOnce>
    </div>
  );
}

function Report({
  study,
  outcomes,
  turnover,
  splitBy,
  unitName,
}: {
  study: Study;
  outcomes: NonNullable<ReturnType<typeof useOutcomes>["data"]>;
  turnover: ReturnType<typeof useTurnover>;
  splitBy: string;
  /** The unit of the time scale chosen on the Boundary screen, when one was. */
  unitName: string | null;
}) {
  const unit = outcomes.boundaryUnits.find((u) => u.name === unitName) ?? outcomes.boundaryUnits[outcomes.boundaryUnits.length - 1];
  return (
    <article className="space-y-8" data-testid="boundary-report">
      <header className="border-b border-stone-200 pb-6">
        <p className="text-sm font-semibold tracking-wide text-accent-700 uppercase">Stratasieve · boundary report</p>
        <h1 className="mt-2 text-3xl font-semibold tracking-tight text-stone-900">
          {unit ? `Base of the ${unit.label} ${RANK_WORD[unit.rank]}, ${formatMa(outcomes.boundary)}` : `Boundary at ${formatMa(outcomes.boundary)}`}
        </h1>
        <p className="mt-2 text-[15px] text-stone-600">
          Study: {study.name} · window {formatMyr(outcomes.window)} · time scale v{outcomes.timescaleVersion} · printed {formatDateTime(new Date())}
        </p>
      </header>
      <OutcomeSummary result={outcomes} refreshing={false} />
      <BoundaryScorecard turnover={turnover} csvUrl={null} />
      <div className="space-y-3">
        <Caution title="The counts rest on the ranges as coded">
          Who counts as a survivor or a victim depends on the first and last appearances as coded and on how well each stage was sampled. A last find
          comes before the true extinction, so ranges are truncated: some victims look earlier than they were, and an abrupt loss can look gradual.
        </Caution>
        <Caution title="Association, not mechanism">
          Selectivity results are statistical associations across a boundary, not proof of a kill mechanism; a shared cause can produce them.
        </Caution>
      </div>
      <RatesChart studyId={study.id} boundary={outcomes.boundary} />
      <TurnoverSection turnover={turnover} splitBy={splitBy} onSplitBy={() => undefined} csvUrl={null} report />
    </article>
  );
}
