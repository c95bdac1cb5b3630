import { useState } from "react";
import { Link, useNavigate } from "react-router-dom";
import { MODERN_COMPARISON_CAUTION } from "@shared/comparison";
import { IUCN_CATEGORIES, THREATENED } from "@shared/iucn";
import { can } from "@shared/roles";
import type { ModernListSummary } from "@shared/schemas/modernLists";
import { Button, ButtonLink } from "../../components/Button";
import { Card } from "../../components/Card";
import { Caution } from "../../components/Caution";
import { ConfirmDialog } from "../../components/ConfirmDialog";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { PageHeader } from "../../components/PageHeader";
import { useToast } from "../../components/Toast";
import { errorMessage } from "../../lib/api";
import { useCurrentStudy } from "../../lib/currentStudy";
import { formatCount, formatDateTime, pluralize } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useRunList } from "../../lib/queries/runs";
import { comparisonCsvUrl, useComparisons, useDeleteModernList, useModernLists } from "./api";
import { CategoryBadge } from "./CategoryBadge";
import { ListUploadWizard } from "./ListUploadWizard";
import { NewComparisonForm } from "./NewComparisonForm";
import { formatTwo } from "./words";

const linkClasses = cx("font-medium text-accent-700 underline decoration-accent-200 underline-offset-2 hover:decoration-accent-600", focusRing, "rounded");

/** The modern comparison screen: the study's species lists, a new comparison, and the saved ones. */
export function ModernComparisonPage() {
  const study = useCurrentStudy();
  useDocumentTitle(`Modern comparison · ${study.name}`);
  const canCompare = can(study.role, "comparisons.create");
  const base = `${paths.study(study.id)}/modern-comparison`;
  const lists = useModernLists(study.id);
  // The newest runs, to choose the one whose model scores the list.
  const runs = useRunList(study.id, 1, 100);
  const comparisons = useComparisons(study.id);
  const [uploading, setUploading] = useState(false);
  const [deleting, setDeleting] = useState<ModernListSummary | null>(null);
  const remove = useDeleteModernList(study.id);
  const navigate = useNavigate();
  const toast = useToast();
  const finishedRuns = (runs.data?.runs ?? []).filter((r) => r.status === "succeeded");
  const readyLists = (lists.data?.lists ?? []).filter((l) => l.crosswalkSaved);

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title="Modern comparison"
        description="Hold the selectivity of a past crisis against a modern threat list: every listed species is scored with a run's fitted model, and the scores are set against the species' IUCN categories."
        actions={
          canCompare && !uploading ? (
            <Button onClick={() => setUploading(true)} variant="secondary">
              Upload a species list
            </Button>
          ) : undefined
        }
      />
      <div className="space-y-6">
        <Caution title="A screening aid, not an assessment">{MODERN_COMPARISON_CAUTION}</Caution>

        {uploading && (
          <Card title="Upload a modern species list" description="A CSV file with one row per species and its threat category; trait columns in the list's own words.">
            <ListUploadWizard
              studyId={study.id}
              onCancel={() => setUploading(false)}
              onSaved={(list) => {
                setUploading(false);
                toast.show(`Saved “${list.name}” with ${pluralize(list.speciesCount, "species", "species")}. Now pair its columns with the codebook.`);
                navigate(`${base}/lists/${list.id}`);
              }}
            />
          </Card>
        )}

        <Card title="Species lists" description="Each list keeps its crosswalk onto the codebook; open it to pair columns and values.">
          {lists.isPending && <LoadingState label="Loading the lists" lines={3} />}
          {lists.isError && <ErrorState error={lists.error} title="The lists could not be loaded" onRetry={() => void lists.refetch()} />}
          {lists.data && lists.data.lists.length === 0 && (
            <EmptyState
              headingLevel={3}
              title="No species list yet"
              description={canCompare ? "Upload a CSV file of modern species with their threat categories to begin." : "A study lead or an analyst can upload one."}
              action={canCompare && !uploading ? <Button onClick={() => setUploading(true)}>Upload a species list</Button> : undefined}
            />
          )}
          {lists.data && lists.data.lists.length > 0 && (
            <ul className="divide-y divide-stone-100" aria-label="Species lists">
              {lists.data.lists.map((l) => (
                <li key={l.id} className="flex flex-wrap items-start justify-between gap-3 py-3">
                  <div className="min-w-0">
                    <Link to={`${base}/lists/${l.id}`} className={linkClasses}>
                      {l.name}
                    </Link>
                    <p className="mt-0.5 text-sm text-stone-600">
                      {pluralize(l.speciesCount, "species", "species")}
                      {l.fileName ? ` from ${l.fileName}` : ""} · added {formatDateTime(l.createdAt)}
                      {l.createdBy ? ` by ${l.createdBy.name}` : ""} · {pluralize(l.comparisonCount, "comparison")}
                    </p>
                    <p className="mt-1.5 flex flex-wrap gap-x-3 gap-y-1 text-xs text-stone-600" aria-label="Species per category">
                      {IUCN_CATEGORIES.filter((c) => l.categories[c] > 0).map((c) => (
                        <span key={c} className="inline-flex items-center gap-1">
                          <CategoryBadge category={c} /> {formatCount(l.categories[c])}
                        </span>
                      ))}
                    </p>
                    <p className="mt-1 text-xs text-stone-500">
                      {THREATENED.reduce((n, c) => n + l.categories[c], 0)} threatened (CR, EN, VU) · {l.categories.NT + l.categories.LC} not threatened (NT, LC)
                    </p>
                  </div>
                  <div className="flex shrink-0 items-center gap-2">
                    <span className={cx("rounded-full px-2.5 py-0.5 text-xs font-medium ring-1", l.crosswalkSaved ? "bg-accent-50 text-accent-900 ring-accent-200" : "bg-caution-50 text-caution-700 ring-caution-200")}>
                      {l.crosswalkSaved ? "Crosswalk saved" : "No crosswalk yet"}
                    </span>
                    <ButtonLink to={`${base}/lists/${l.id}`} variant="secondary" size="sm">
                      {canCompare ? "Edit crosswalk" : "Crosswalk"}
                    </ButtonLink>
                    {canCompare && (
                      <Button variant="ghost" size="sm" onClick={() => setDeleting(l)} aria-label={`Delete ${l.name}`}>
                        Delete
                      </Button>
                    )}
                  </div>
                </li>
              ))}
            </ul>
          )}
        </Card>

        {canCompare && (
          <Card title="Compare a list with a run" description="The run's fitted model gives every species a predicted probability of extinction under the past crisis's selectivity.">
            {(lists.isPending || runs.isPending) && <LoadingState label="Loading lists and runs" lines={2} />}
            {runs.isError && <ErrorState error={runs.error} title="The runs could not be loaded" onRetry={() => void runs.refetch()} />}
            {lists.data && runs.data && (readyLists.length === 0 || finishedRuns.length === 0) && (
              <p className="rounded-lg border border-dashed border-stone-300 px-4 py-6 text-center text-[15px] text-stone-600">
                {readyLists.length === 0 && "Save a crosswalk for a species list first. "}
                {finishedRuns.length === 0 && "A comparison needs a finished selectivity run of this study; none has finished yet."}
              </p>
            )}
            {lists.data && runs.data && readyLists.length > 0 && finishedRuns.length > 0 && <NewComparisonForm studyId={study.id} lists={lists.data.lists} runs={finishedRuns} mainBoundary={study.mainBoundary} />}
          </Card>
        )}

        <Card title="Saved comparisons" description="Reopened as saved, never recomputed; each keeps the hash of the exact data it read.">
          {comparisons.isPending && <LoadingState label="Loading the comparisons" lines={3} />}
          {comparisons.isError && <ErrorState error={comparisons.error} title="The comparisons could not be loaded" onRetry={() => void comparisons.refetch()} />}
          {comparisons.data && comparisons.data.comparisons.length === 0 && <p className="text-[15px] text-stone-600">No comparison has been saved yet.</p>}
          {comparisons.data && comparisons.data.comparisons.length > 0 && (
            <div className="overflow-x-auto">
              <table className="min-w-full text-sm">
                <caption className="sr-only">Saved comparisons, newest first</caption>
                <thead className="text-left text-stone-500">
                  <tr>
                    <th scope="col" className="py-2 pr-4 font-medium">Comparison</th>
                    <th scope="col" className="py-2 pr-4 font-medium">Run and list</th>
                    <th scope="col" className="py-2 pr-4 text-right font-medium">AUC</th>
                    <th scope="col" className="py-2 pr-4 text-right font-medium">Worth a look</th>
                    <th scope="col" className="py-2 pr-4 font-medium">Saved</th>
                    <th scope="col" className="py-2 font-medium"><span className="sr-only">Downloads</span></th>
                  </tr>
                </thead>
                <tbody className="divide-y divide-stone-100">
                  {comparisons.data.comparisons.map((c) => (
                    <tr key={c.id}>
                      <td className="py-2 pr-4">
                        <Link to={`${base}/comparisons/${c.id}`} className={linkClasses}>
                          {c.name}
                        </Link>
                        <span className="block font-mono text-xs text-stone-500" title={c.dataHash}>
                          data {c.dataHashShort}
                        </span>
                      </td>
                      <td className="py-2 pr-4 text-stone-700">
                        {c.runName}
                        <span className="block text-stone-500">{c.listName}</span>
                      </td>
                      <td className="py-2 pr-4 text-right tabular-nums">{c.auc === null ? "—" : formatTwo(c.auc)}</td>
                      <td className="py-2 pr-4 text-right tabular-nums">{formatCount(c.worthALookCount)}</td>
                      <td className="py-2 pr-4 text-stone-600">
                        {formatDateTime(c.createdAt)}
                        {c.createdBy && <span className="block">{c.createdBy.name}</span>}
                      </td>
                      <td className="py-2 whitespace-nowrap">
                        <a href={comparisonCsvUrl(study.id, c.id)} download className={linkClasses}>
                          CSV
                        </a>
                        <span className="text-stone-300"> · </span>
                        <Link to={`${base}/comparisons/${c.id}/report`} className={linkClasses}>
                          Report
                        </Link>
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </Card>
      </div>

      <ConfirmDialog
        open={deleting !== null}
        title={`Delete “${deleting?.name ?? ""}”?`}
        confirmLabel="Delete the list"
        busy={remove.isPending}
        error={remove.error ? errorMessage(remove.error) : null}
        onCancel={() => {
          setDeleting(null);
          remove.reset();
        }}
        onConfirm={() =>
          deleting &&
          remove.mutate(deleting.id, {
            onSuccess: () => {
              toast.show(`Deleted “${deleting.name}”`);
              setDeleting(null);
            },
          })
        }
      >
        Its {pluralize(deleting?.speciesCount ?? 0, "species", "species")}, its crosswalk and {pluralize(deleting?.comparisonCount ?? 0, "saved comparison")} made with it are deleted. This cannot be undone.
      </ConfirmDialog>
    </>
  );
}
