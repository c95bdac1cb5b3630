import { useState } from "react";
import { useNavigate, useParams } from "react-router-dom";
import { can } from "@shared/roles";
import { Button, ButtonLink, buttonClasses } from "../../components/Button";
import { ConfirmDialog } from "../../components/ConfirmDialog";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { PageHeader } from "../../components/PageHeader";
import { DiscussButton } from "../../components/threads/DiscussButton";
import { useToast } from "../../components/Toast";
import { errorMessage } from "../../lib/api";
import { useCurrentStudy } from "../../lib/currentStudy";
import { formatDateTime } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { comparisonCsvUrl, useComparison, useDeleteComparison } from "./api";
import { ComparisonResultsView } from "./ComparisonResultsView";

/** One saved comparison: its results as stored, with the caution first, and its downloads. */
export function ComparisonPage() {
  const study = useCurrentStudy();
  const { comparisonId = "" } = useParams();
  const comparison = useComparison(study.id, comparisonId);
  const remove = useDeleteComparison(study.id);
  const [deleting, setDeleting] = useState(false);
  const navigate = useNavigate();
  const toast = useToast();
  const base = `${paths.study(study.id)}/modern-comparison`;
  useDocumentTitle(comparison.data ? `${comparison.data.name} · Modern comparison` : "Modern comparison");

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title={comparison.data?.name ?? "Comparison"}
        description={
          comparison.data
            ? `Run “${comparison.data.runName}” held against “${comparison.data.listName}”, saved ${formatDateTime(comparison.data.createdAt)}${comparison.data.createdBy ? ` by ${comparison.data.createdBy.name}` : ""}.`
            : undefined
        }
        actions={
          comparison.data && (
            <>
              <a href={comparisonCsvUrl(study.id, comparisonId)} download className={buttonClasses("secondary")}>
                Export CSV
              </a>
              <ButtonLink to={`${base}/comparisons/${comparisonId}/report`} variant="secondary">
                Printable report
              </ButtonLink>
              <DiscussButton studyId={study.id} target={{ type: "comparison", id: comparisonId }} targetLabel={`The comparison “${comparison.data.name}”`} variant="secondary" size="md" />
              {can(study.role, "comparisons.create") && (
                <Button variant="ghost" onClick={() => setDeleting(true)}>
                  Delete
                </Button>
              )}
            </>
          )
        }
      />
      {comparison.isPending && <LoadingState label="Loading the comparison" lines={8} />}
      {comparison.isError && (
        <ErrorState
          error={comparison.error}
          title="This comparison could not be loaded"
          onRetry={() => void comparison.refetch()}
          actions={
            <ButtonLink to={base} variant="ghost" size="sm">
              Back to modern comparison
            </ButtonLink>
          }
        />
      )}
      {comparison.data && <ComparisonResultsView comparison={comparison.data} />}
      <ConfirmDialog
        open={deleting}
        title="Delete this comparison?"
        confirmLabel="Delete the comparison"
        busy={remove.isPending}
        error={remove.error ? errorMessage(remove.error) : null}
        onCancel={() => setDeleting(false)}
        onConfirm={() =>
          remove.mutate(comparisonId, {
            onSuccess: () => {
              toast.show("Comparison deleted");
              navigate(base);
            },
          })
        }
      >
        Its saved results are deleted; the list and the run stay. This cannot be undone.
      </ConfirmDialog>
    </>
  );
}
