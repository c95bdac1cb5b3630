import { Link, useParams } from "react-router-dom";
import { Button } from "../../components/Button";
import { ErrorState } from "../../components/ErrorState";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { formatDateTime } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useStudy } from "../../lib/queries/study";
import { useComparison } from "./api";
import { ComparisonResultsView } from "./ComparisonResultsView";

// Paper: A4 with modest margins, no screen chrome, sections kept whole, links printed as text.
const PRINT_STYLES = `
@page { size: A4; margin: 14mm 12mm; }
@media print {
  html, body { background: #fff !important; }
  .no-print { display: none !important; }
  .report-section { break-inside: avoid; page-break-inside: avoid; border-color: #d6d3d1 !important; box-shadow: none !important; }
  .report-page { max-width: none !important; padding: 0 !important; }
  a { color: inherit !important; text-decoration: none !important; }
}
`;

/** A saved comparison laid out for printing, on a page of its own (no navigation around it). */
export function ComparisonReportPage() {
  const { studyId = "", comparisonId = "" } = useParams();
  const comparison = useComparison(studyId, comparisonId);
  // The report opens outside the study layout, so it loads the study itself.
  const study = useStudy(studyId);
  useDocumentTitle(comparison.data ? `Report: ${comparison.data.name}` : "Report");
  const back = `${paths.study(studyId)}/modern-comparison/comparisons/${comparisonId}`;

  return (
    <main className="report-page mx-auto max-w-4xl px-4 py-8 sm:px-6">
      <style>{PRINT_STYLES}</style>
      <div className="no-print mb-6 flex flex-wrap items-center justify-between gap-3">
        <Link to={back} className={cx("rounded text-sm font-medium text-accent-700 hover:text-accent-900", focusRing)}>
          ← Back to the comparison
        </Link>
        <Button onClick={() => window.print()} disabled={!comparison.data}>
          Print or save as PDF
        </Button>
      </div>
      {comparison.isPending && <LoadingState label="Loading the comparison" lines={8} />}
      {comparison.isError && <ErrorState error={comparison.error} title="This comparison could not be loaded" onRetry={() => void comparison.refetch()} />}
      {comparison.data && (
        <article>
          <header className="report-section mb-6 border-b border-stone-300 pb-4">
            <p className="text-sm font-semibold tracking-wide text-accent-700 uppercase">Stratasieve · Modern comparison report</p>
            <h1 className="mt-1 text-2xl font-semibold tracking-tight text-stone-900">{comparison.data.name}</h1>
            <p className="mt-1 text-sm text-stone-600">
              {study.data ? `${study.data.name} · ` : ""}
              saved {formatDateTime(comparison.data.createdAt)}
              {comparison.data.createdBy ? ` by ${comparison.data.createdBy.name}` : ""} · data {comparison.data.dataHashShort}
            </p>
          </header>
          <ComparisonResultsView comparison={comparison.data} print />
        </article>
      )}
    </main>
  );
}
