import { useEffect, useRef, useState } from "react";
import { revertConflictSchema } from "@shared/schemas/decisions";
import type { HistoryEntry, TaxonRow } from "@shared/schemas/taxa";
import type { Trait } from "@shared/schemas/traits";
import { Button } from "../../components/Button";
import { ErrorState } from "../../components/ErrorState";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { useToast } from "../../components/Toast";
import { ThreadPanel } from "../../components/threads/ThreadPanel";
import { ApiError, errorMessage } from "../../lib/api";
import { formatDateTime, sharedAgeDecimals } from "../../lib/format";
import { useRevertDecision, useTaxonHistory, type HistoryCell } from "./api";
import { cellValue, formatStoredValue, storedAge, type GridColumn } from "./cellValues";
import { ReasonDialog } from "./ReasonDialog";
import { ValueText } from "./ValueText";

const ACTION_WORDS: Record<string, string> = {
  create: "Recorded",
  update: "Changed",
  delete: "Taxon deleted",
  restore: "Taxon restored",
  revert: "Reverted",
  override: "Overridden",
};

const TAXON_LEVEL_NOTES: Record<string, string> = {
  create: "Recorded when the taxon was added.",
  delete: "Recorded when the taxon was removed.",
  restore: "Recorded when the taxon was restored.",
  revert: "Recorded when a revert added or removed the taxon.",
};

export function historyCellOf(column: GridColumn): HistoryCell {
  if (column.kind === "count") throw new Error("historyCellOf: a count column has no history");
  return column.kind === "trait" ? { traitId: column.id } : { field: column.field as "name" | "higherTaxon" | "notes" | "fad" | "lad" };
}

interface HistoryPanelProps {
  studyId: string;
  row: TaxonRow;
  column: GridColumn;
  traits: Map<string, Trait>;
  canRevert: boolean;
  onClose: () => void;
}

/**
 * The thread target of a cell: a trait's value, or (for the taxon's own columns) the taxon. `open`
 * marks the tab when the value has an open thread (the row's marks do not single out the taxon's own).
 */
function threadTargetOf(row: TaxonRow, column: GridColumn) {
  return column.kind === "trait"
    ? { target: { type: "value" as const, id: row.id, traitId: column.id }, label: `${column.label} of ${row.name}`, open: row.openThreads.traitIds.includes(column.id) ? 1 : 0 }
    : { target: { type: "taxon" as const, id: row.id }, label: row.name, open: 0 };
}

/**
 * Who changed one cell, when, from what, to what and why (any change can be reverted from here),
 * and the discussion about the value (or the taxon) beside it.
 */
export function HistoryPanel({ studyId, row, column, traits, canRevert, onClose }: HistoryPanelProps) {
  const [tab, setTab] = useState<"history" | "discussion">("history");
  const discussion = threadTargetOf(row, column);
  const history = useTaxonHistory(studyId, row.id, historyCellOf(column));
  // Every age of the panel (now, and each change's old and new value) written alike.
  const ageDecimals = sharedAgeDecimals([cellValue(column, row), ...(history.data?.entries ?? []).flatMap((e) => [e.oldValue, e.newValue])].map(storedAge));
  const revert = useRevertDecision(studyId);
  const toast = useToast();
  const [reverting, setReverting] = useState<HistoryEntry | null>(null);
  const headingRef = useRef<HTMLHeadingElement>(null);
  const field = column.kind === "trait" || column.kind === "count" ? column.id : column.field;

  useEffect(() => {
    headingRef.current?.focus();
  }, [row.id, column.id]);

  const revertError = (() => {
    if (!revert.error) return null;
    if (revert.error instanceof ApiError) {
      const conflict = revertConflictSchema.safeParse(revert.error.body);
      if (conflict.success && conflict.data.conflicts[0]) {
        const c = conflict.data.conflicts[0];
        const now = formatStoredValue(c.field, c.currentValue, traits) || "no value";
        return `${conflict.data.error.message} It now holds ${now}${c.setBy ? `, set by ${c.setBy.name}` : ""}.`;
      }
    }
    return errorMessage(revert.error);
  })();

  return (
    <div
      role="dialog"
      aria-modal="false"
      aria-labelledby="cell-history-title"
      onKeyDown={(e) => {
        if (e.key === "Escape" && !reverting) {
          e.stopPropagation();
          onClose();
        }
      }}
      className="fixed inset-y-0 right-0 z-40 flex w-full max-w-md flex-col border-l border-stone-200 bg-white shadow-2xl"
    >
      <header className="flex items-start justify-between gap-3 border-b border-stone-100 px-5 py-4">
        <div className="min-w-0">
          <p className="text-sm font-medium text-accent-700">{tab === "history" ? "History" : "Discussion"}</p>
          <h2 id="cell-history-title" ref={headingRef} tabIndex={-1} className={cx("rounded text-lg font-semibold tracking-tight text-stone-900", focusRing)}>
            {column.label} of <span className="italic">{row.name}</span>
          </h2>
          <p className="mt-1 text-sm text-stone-600">
            Now: <ValueText field={field} value={cellValue(column, row)} traits={traits} ageDecimals={ageDecimals} />
          </p>
        </div>
        <Button variant="ghost" size="sm" onClick={onClose}>
          Close<span className="sr-only"> history</span>
        </Button>
      </header>
      <div role="tablist" aria-label="History or discussion" className="flex gap-1 border-b border-stone-100 px-5">
        {(["history", "discussion"] as const).map((name) => (
          <button
            key={name}
            type="button"
            role="tab"
            aria-selected={tab === name}
            onClick={() => setTab(name)}
            className={cx(
              "-mb-px border-b-2 px-3 py-2 text-sm font-medium",
              tab === name ? "border-accent-600 text-accent-900" : "border-transparent text-stone-600 hover:text-stone-900",
              focusRing,
            )}
          >
            {name === "history" ? "History" : "Discuss"}
            {name === "discussion" && discussion.open > 0 && (
              <span className="ml-1.5 inline-block size-2 rounded-full bg-caution-700" role="img" aria-label="has an open thread" />
            )}
          </button>
        ))}
      </div>
      {tab === "discussion" && (
        <div role="tabpanel" aria-label="Discuss" className="min-h-0 flex-1 overflow-y-auto px-5 py-4">
          <ThreadPanel studyId={studyId} target={discussion.target} targetLabel={discussion.label} />
        </div>
      )}
      <div role="tabpanel" aria-label="History" hidden={tab !== "history"} className="min-h-0 flex-1 overflow-y-auto px-5 py-4">
        {history.isPending && <LoadingState label="Loading the history" lines={4} />}
        {history.isError && <ErrorState error={history.error} title="The history could not be loaded" onRetry={() => void history.refetch()} />}
        {history.isSuccess && history.data.entries.length === 0 && <p className="text-[15px] text-stone-500">No change of this cell has been recorded yet.</p>}
        {history.isSuccess && history.data.entries.length > 0 && (
          <ol className="relative space-y-4 border-l-2 border-stone-100 pl-4" aria-label="Changes, newest first">
            {history.data.entries.map((entry) => (
              <li key={entry.decisionId} className="relative" data-decision={entry.decisionId}>
                <span className="absolute top-1.5 -left-[1.4rem] size-2.5 rounded-full bg-accent-500 ring-2 ring-white" aria-hidden="true" />
                <p className="text-sm text-stone-500">
                  <span className="font-semibold text-stone-800">{ACTION_WORDS[entry.action] ?? entry.action}</span>
                  {" · "}
                  {entry.user?.name ?? "someone no longer in the study"}
                  {" · "}
                  <time dateTime={entry.createdAt}>{formatDateTime(entry.createdAt)}</time>
                </p>
                <p className="mt-1 text-[15px]">
                  <ValueText field={field} value={entry.oldValue} traits={traits} ageDecimals={ageDecimals} /> <span aria-hidden="true">→</span>
                  <span className="sr-only">to</span> <ValueText field={field} value={entry.newValue} traits={traits} ageDecimals={ageDecimals} />
                </p>
                {entry.reason && <p className="mt-1 rounded-md bg-stone-50 px-2.5 py-1.5 text-sm text-stone-700">“{entry.reason}”</p>}
                {entry.importFileName && <p className="mt-1 text-sm text-stone-500">From the import of {entry.importFileName}</p>}
                {entry.field === "taxon" && <p className="mt-1 text-sm text-stone-500">{TAXON_LEVEL_NOTES[entry.action] ?? "Recorded for the whole taxon."}</p>}
                {/* A taxon-level entry is undone with the taxon, not from one cell. */}
                {canRevert && entry.field !== "taxon" && (
                  <Button
                    variant="ghost"
                    size="sm"
                    className="mt-1 -ml-3 text-stone-600"
                    onClick={() => {
                      revert.reset();
                      setReverting(entry);
                    }}
                  >
                    Revert this change…
                  </Button>
                )}
              </li>
            ))}
          </ol>
        )}
      </div>
      <ReasonDialog
        open={reverting !== null}
        title="Revert this change?"
        summary={
          reverting && (
            <>
              {column.label} of <span className="italic">{row.name}</span> goes back from <ValueText field={field} value={reverting.newValue} traits={traits} ageDecimals={ageDecimals} /> to{" "}
              <ValueText field={field} value={reverting.oldValue} traits={traits} ageDecimals={ageDecimals} />. The revert is recorded as a change of its own.
            </>
          )
        }
        confirmLabel="Revert"
        busy={revert.isPending}
        error={revertError}
        onCancel={() => setReverting(null)}
        onConfirm={(reason) =>
          reverting &&
          revert.mutate(
            { decisionId: reverting.decisionId, input: { reason } },
            {
              onSuccess: () => {
                setReverting(null);
                toast.show("The change was reverted.");
              },
            },
          )
        }
      />
    </div>
  );
}
