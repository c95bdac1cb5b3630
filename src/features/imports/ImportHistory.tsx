import { useState } from "react";
import { revertConflictSchema } from "@shared/schemas/decisions";
import { importRevertSchema, type ImportSummary } from "@shared/schemas/imports";
import type { Trait } from "@shared/schemas/traits";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { ConfirmDialog } from "../../components/ConfirmDialog";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { TextField } from "../../components/TextField";
import { useToast } from "../../components/Toast";
import { ApiError, errorMessage } from "../../lib/api";
import { formatCount, formatDateTime, pluralize } from "../../lib/format";
import { useDiscardImport, useImportDecisions, useImports, useRevertImport } from "./api";
import { fieldLabel, formatImportValue } from "./formatValue";

const STATUS: Record<ImportSummary["status"], { label: string; tone: string }> = {
  previewed: { label: "Not committed", tone: "bg-stone-100 text-stone-700 ring-stone-200" },
  committing: { label: "Being written", tone: "bg-caution-50 text-caution-700 ring-caution-200" },
  committed: { label: "Committed", tone: "bg-accent-50 text-accent-900 ring-accent-200" },
  reverted: { label: "Reverted", tone: "bg-stone-100 text-stone-600 ring-stone-200" },
  discarded: { label: "Discarded", tone: "bg-stone-100 text-stone-500 ring-stone-200" },
};

interface ImportHistoryProps {
  studyId: string;
  traits: Map<string, Trait>;
  canRevert: boolean;
  /** Opens an upload not yet committed at the mapping step again. */
  onResume?: (importId: string) => void;
}

/** Who imported what and when, with counts; each committed import can be opened and reverted. */
export function ImportHistory({ studyId, traits, canRevert, onResume }: ImportHistoryProps) {
  const [page, setPage] = useState(1);
  const imports = useImports(studyId, page);
  const [open, setOpen] = useState<string | null>(null);
  const [reverting, setReverting] = useState<ImportSummary | null>(null);
  // An upload never committed keeps its file on the server until it is discarded.
  const discard = useDiscardImport(studyId);

  const total = imports.data?.total ?? 0;
  const pages = Math.max(1, Math.ceil(total / (imports.data?.pageSize ?? 20)));

  return (
    <Card title="Import history" description="Every uploaded file: who imported it, when, and what it changed.">
      {imports.isPending && <LoadingState label="Loading the imports" />}
      {imports.isError && <ErrorState error={imports.error} title="The imports could not be loaded" onRetry={() => void imports.refetch()} />}
      {imports.isSuccess && total === 0 && (
        <EmptyState headingLevel={3} title="Nothing imported yet" description="Imported files are listed here with their counts, and can be reverted." className="py-8" />
      )}
      {discard.isError && <p className="mb-3 text-sm font-medium text-red-700" role="alert">The upload was not discarded: {errorMessage(discard.error)}</p>}
      {imports.isSuccess && total > 0 && (
        <>
          <ul className="-my-3 divide-y divide-stone-100">
            {imports.data.rows.map((item) => (
              <li key={item.id} className="py-3" data-import-file={item.fileName}>
                <div className="flex flex-col gap-2 sm:flex-row sm:items-start sm:justify-between">
                  <div className="min-w-0">
                    <p className="flex flex-wrap items-center gap-2">
                      <span className="font-medium break-all text-stone-900">{item.fileName}</span>
                      <span className={cx("rounded-full px-2 py-0.5 text-xs font-semibold ring-1", STATUS[item.status].tone)}>{STATUS[item.status].label}</span>
                    </p>
                    <p className="text-sm text-stone-500">
                      {item.createdBy?.name ?? "A former member"} · <time dateTime={item.createdAt}>{formatDateTime(item.committedAt ?? item.createdAt)}</time>
                    </p>
                    <p className="mt-1 text-sm text-stone-700 tabular-nums">
                      {pluralize(item.rowCount, "row")}
                      {item.status !== "previewed" && item.status !== "discarded" && (
                        <>
                          {" · "}
                          {formatCount(item.createdCount)} added · {formatCount(item.updatedCount)} changed
                          {item.skippedInvalid > 0 && ` · ${formatCount(item.skippedInvalid)} invalid left out`}
                        </>
                      )}
                    </p>
                    {item.revertedAt && (
                      <p className="text-sm text-stone-500">
                        Reverted by {item.revertedBy?.name ?? "a former member"}, {formatDateTime(item.revertedAt)}
                      </p>
                    )}
                    {item.failureReason && <p className="text-sm text-red-700">Last attempt failed, nothing was written: {item.failureReason}</p>}
                  </div>
                  {item.status === "previewed" && canRevert && (
                    <div className="flex shrink-0 gap-2">
                      {onResume && (
                        <Button variant="secondary" size="sm" onClick={() => onResume(item.id)}>
                          Resume<span className="sr-only"> the upload of {item.fileName}</span>
                        </Button>
                      )}
                      <Button variant="ghost" size="sm" busy={discard.isPending && discard.variables === item.id} onClick={() => discard.mutate(item.id)}>
                        Discard upload<span className="sr-only"> {item.fileName}</span>
                      </Button>
                    </div>
                  )}
                  {(item.status === "committed" || item.status === "reverted") && (
                    <div className="flex shrink-0 gap-2">
                      <Button variant="ghost" size="sm" aria-expanded={open === item.id} onClick={() => setOpen(open === item.id ? null : item.id)}>
                        {open === item.id ? "Hide changes" : "Show changes"}
                        <span className="sr-only"> of {item.fileName}</span>
                      </Button>
                      {canRevert && item.status === "committed" && (
                        <Button variant="secondary" size="sm" onClick={() => setReverting(item)}>
                          Revert…<span className="sr-only"> {item.fileName}</span>
                        </Button>
                      )}
                    </div>
                  )}
                </div>
                {open === item.id && <ImportDecisions studyId={studyId} importId={item.id} traits={traits} />}
              </li>
            ))}
          </ul>
          {pages > 1 && (
            <nav aria-label="Pages of the import history" className="mt-4 flex items-center justify-end gap-2">
              <Button size="sm" variant="secondary" disabled={page <= 1} onClick={() => setPage(page - 1)}>
                Newer
              </Button>
              <span className="text-sm text-stone-600 tabular-nums">
                Page {page} of {pages}
              </span>
              <Button size="sm" variant="secondary" disabled={page >= pages} onClick={() => setPage(page + 1)}>
                Older
              </Button>
            </nav>
          )}
        </>
      )}
      {reverting && <RevertImportDialog key={reverting.id} studyId={studyId} item={reverting} onClose={() => setReverting(null)} />}
    </Card>
  );
}

function RevertImportDialog({ studyId, item, onClose }: { studyId: string; item: ImportSummary; onClose: () => void }) {
  const revert = useRevertImport(studyId);
  const toast = useToast();
  const [reason, setReason] = useState("");
  const [skipChanged, setSkipChanged] = useState(false);
  const conflict = revert.error instanceof ApiError && revert.error.status === 409 ? revertConflictSchema.safeParse(revert.error.body) : null;
  const changedSince = conflict?.success && conflict.data.error.code === "changed_since" ? conflict.data : null;

  function confirm() {
    const parsed = importRevertSchema.safeParse({ reason, skipChanged });
    if (!parsed.success) return;
    revert.mutate(
      { importId: item.id, input: parsed.data },
      {
        onSuccess: (result) => {
          toast.show(
            `Reverted ${item.fileName}: ${pluralize(result.reverted, "change")} undone${result.skipped ? `, ${pluralize(result.skipped, "value")} edited since kept` : ""}.`,
            "info",
          );
          onClose();
        },
      },
    );
  }

  return (
    <ConfirmDialog
      open
      title={`Revert the import of ${item.fileName}?`}
      confirmLabel={changedSince && !skipChanged ? "Revert" : skipChanged ? "Revert the rest" : "Revert import"}
      busy={revert.isPending}
      confirmDisabled={Boolean(changedSince) && !skipChanged}
      error={revert.error && !changedSince ? errorMessage(revert.error) : null}
      onCancel={onClose}
      onConfirm={confirm}
    >
      <p>
        Every value this import wrote goes back to what it was before ({formatCount(item.createdCount)} added, {formatCount(item.updatedCount)} changed). Taxa it added are removed. The revert is
        recorded as coding decisions of its own.
      </p>
      {changedSince && (
        <div className="rounded-lg border border-caution-200 bg-caution-50 px-3 py-2 text-sm text-stone-800">
          <p className="font-semibold text-caution-700">{pluralize(changedSince.conflictCount, "value")} changed since the import</p>
          <ul className="mt-1 max-h-40 list-disc overflow-y-auto pl-5">
            {changedSince.conflicts.slice(0, 20).map((c) => (
              <li key={c.decisionId}>
                <span className="italic">{c.taxonName ?? "A taxon"}</span>, {c.field}
                {c.setBy && ` (by ${c.setBy.name})`}
              </li>
            ))}
          </ul>
          <label className="mt-2 flex items-start gap-2">
            <input type="checkbox" className="mt-1 size-4 accent-accent-600" checked={skipChanged} onChange={(e) => setSkipChanged(e.target.checked)} />
            <span>Revert the rest and keep the values changed since</span>
          </label>
        </div>
      )}
      <TextField label="Reason" optional value={reason} onChange={(e) => setReason(e.target.value)} placeholder="e.g. Wrong file: the draft sheet" />
    </ConfirmDialog>
  );
}

function ImportDecisions({ studyId, importId, traits }: { studyId: string; importId: string; traits: Map<string, Trait> }) {
  const [page, setPage] = useState(1);
  const decisions = useImportDecisions(studyId, importId, page);
  if (decisions.isPending) return <LoadingState label="Loading the changes" lines={2} />;
  if (decisions.isError) return <ErrorState error={decisions.error} title="The changes could not be loaded" onRetry={() => void decisions.refetch()} className="mt-3" />;
  const { rows, total, pageSize } = decisions.data;
  const pages = Math.max(1, Math.ceil(total / pageSize));
  return (
    <div className="mt-3 rounded-lg border border-stone-200">
      {rows.length === 0 ? (
        <p className="px-3 py-2 text-sm text-stone-500">This import changed nothing.</p>
      ) : (
        <table className="min-w-full text-left text-sm">
          <caption className="sr-only">Coding decisions of this import</caption>
          <thead className="bg-stone-50 text-stone-600">
            <tr>
              <th scope="col" className="px-3 py-1.5 font-semibold">Taxon</th>
              <th scope="col" className="px-3 py-1.5 font-semibold">Column</th>
              <th scope="col" className="px-3 py-1.5 font-semibold">From</th>
              <th scope="col" className="px-3 py-1.5 font-semibold">To</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-stone-100">
            {rows.map((d) => {
              const trait = d.traitId ? traits.get(d.traitId) : undefined;
              return (
                <tr key={d.id} className={cx(d.revertedById && "text-stone-400 line-through")}>
                  <td className="px-3 py-1.5 italic">{d.taxonName ?? "—"}</td>
                  <td className="px-3 py-1.5">{fieldLabel(d.field, d.traitId, traits, d.traitKey)}</td>
                  <td className="px-3 py-1.5">{formatImportValue(d.oldValue, trait) ?? <span className="text-stone-500">missing</span>}</td>
                  <td className="px-3 py-1.5">{formatImportValue(d.newValue, trait) ?? <span className="text-stone-500">missing</span>}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      )}
      {pages > 1 && (
        <div className="flex items-center justify-end gap-2 border-t border-stone-100 px-3 py-2">
          <Button size="sm" variant="ghost" disabled={page <= 1} onClick={() => setPage(page - 1)}>
            Previous
          </Button>
          <span className="text-sm text-stone-600 tabular-nums">
            {page} / {pages}
          </span>
          <Button size="sm" variant="ghost" disabled={page >= pages} onClick={() => setPage(page + 1)}>
            Next
          </Button>
        </div>
      )}
    </div>
  );
}
