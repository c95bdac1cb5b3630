import { useCallback, useEffect, useMemo, useState } from "react";
import type { ColumnVisibilityState, RowSelectionState, Updater } from "@tanstack/react-table";
import { can, ROLE_LABELS } from "@shared/roles";
import { TAXA_MAX_BULK, type TaxaColumnFilter, type TaxonRow } from "@shared/schemas/taxa";
import { Button, ButtonLink } from "../../components/Button";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { Notice } from "../../components/Notice";
import { PageHeader } from "../../components/PageHeader";
import { Select } from "../../components/Select";
import { textLinkClasses } from "../../components/TextLink";
import { useCurrentStudy } from "../../lib/currentStudy";
import { formatCount, pluralize } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { errorMessage } from "../../lib/api";
import { useToast } from "../../components/Toast";
import { useThreads } from "../../components/threads/api";
import { useTraits } from "../../lib/queries/codebook";
import { codebookCsvUrl } from "../../lib/queries/paths";
import { taxaCsvUrl, useMatchingTaxonIds, useTaxaPage } from "./api";
import { BulkEditDialog } from "./BulkEditDialog";
import { gridColumns, type GridColumn } from "./cellValues";
import { FilterBar } from "./FilterBar";
import { addFilter, gridQueryString, initialGridQuery, matchingQueryString, PAGE_SIZES, type GridQuery } from "./gridQuery";
import { HistoryPanel } from "./HistoryPanel";
import { Popover } from "../../components/Popover";
import { ModalDialog } from "../../components/ModalDialog";
import { TaxonFinds } from "../../components/TaxonFinds";
import { TaxaGrid } from "./TaxaGrid";
import { useCellEdits } from "./useCellEdits";

/** Waits until typing pauses before a value is used (a filter is one request, not one per key). */
function useDebounced<T>(value: T, ms: number): T {
  const [debounced, setDebounced] = useState(value);
  useEffect(() => {
    const timer = window.setTimeout(() => setDebounced(value), ms);
    return () => window.clearTimeout(timer);
  }, [value, ms]);
  return debounced;
}

/** Hidden columns are remembered per study in this browser. */
function useColumnVisibility(studyId: string) {
  const storageKey = `stratasieve.trait-table.hidden.${studyId}`;
  const [visibility, setVisibility] = useState<ColumnVisibilityState>(() => {
    try {
      const hidden = JSON.parse(window.localStorage.getItem(storageKey) ?? "[]") as string[];
      return Object.fromEntries(hidden.map((id) => [id, false]));
    } catch {
      return {};
    }
  });
  useEffect(() => {
    const hidden = Object.entries(visibility)
      .filter(([, visible]) => visible === false)
      .map(([id]) => id);
    window.localStorage.setItem(storageKey, JSON.stringify(hidden));
  }, [storageKey, visibility]);
  return [visibility, setVisibility] as const;
}

export function TraitTablePage() {
  const study = useCurrentStudy();
  useDocumentTitle(`Trait table · ${study.name}`);
  const canEdit = can(study.role, "taxa.edit");
  const canImport = can(study.role, "imports.run");
  const traits = useTraits(study.id);
  const allTraits = useMemo(() => traits.data?.traits ?? [], [traits.data]);
  const traitsById = useMemo(() => new Map(allTraits.map((t) => [t.id, t])), [allTraits]);
  const columns = useMemo(() => gridColumns(allTraits), [allTraits]);

  const [query, setQuery] = useState<GridQuery>(initialGridQuery);
  const [nameSearch, setNameSearch] = useState("");
  const debouncedName = useDebounced(nameSearch.trim(), 300);
  const effectiveQuery = useMemo<GridQuery>(
    () => (debouncedName ? { ...query, filters: addFilter(query.filters, { column: "name", op: "contains", value: debouncedName }) } : query),
    [query, debouncedName],
  );
  const page = useTaxaPage(study.id, gridQueryString(effectiveQuery));
  const [columnVisibility, setColumnVisibility] = useColumnVisibility(study.id);
  const [rowSelection, setRowSelection] = useState<RowSelectionState>({});
  const [history, setHistory] = useState<{ row: TaxonRow; column: GridColumn } | null>(null);
  const [bulkOpen, setBulkOpen] = useState(false);
  const [findsOf, setFindsOf] = useState<TaxonRow | null>(null);
  const showFinds = useCallback((row: TaxonRow) => setFindsOf(row), []);
  const edits = useCellEdits(study.id, traitsById);
  const matching = useMatchingTaxonIds(study.id);
  const toast = useToast();
  const traitThreads = useThreads(study.id, { targetType: "trait", status: "open", pageSize: 100 });
  const openTraitThreads = useMemo(() => new Set((traitThreads.data?.rows ?? []).map((t) => t.target.id)), [traitThreads.data]);

  const rows = page.data?.rows;
  const total = page.data?.total ?? 0;
  const selectedIds = Object.keys(rowSelection);
  const filtered = effectiveQuery.filters.length > 0 || effectiveQuery.missing.length > 0 || effectiveQuery.hasOpenThread;
  const pageCount = Math.max(1, Math.ceil(total / query.pageSize));
  const firstShown = total === 0 ? 0 : (query.page - 1) * query.pageSize + 1;
  const lastShown = Math.min(total, query.page * query.pageSize);
  // The history follows the row as it is now (after a save or a revert).
  const historyRow = history ? (rows?.find((r) => r.id === history.row.id) ?? history.row) : null;

  const change = (patch: Partial<GridQuery>) => setQuery((q) => ({ ...q, page: 1, ...patch }));
  const sortColumn = columns.find((c) => c.sortId === query.sort)?.id ?? "name";

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title="Trait table"
        description="Every taxon of the study with its range and trait values. Edits are checked against the codebook, and every change is recorded with who, when and why."
        actions={
          <>
            <Popover label="Export" title="Export the table">
              <p className="text-sm text-stone-600">CSV files, comma separated, with the codebook as a companion file.</p>
              <ul className="mt-3 space-y-2 text-[15px]">
                <li>
                  <a className={textLinkClasses} href={taxaCsvUrl(study.id, "wide", false)} download>
                    Table, wide form
                  </a>
                  <span className="block text-sm text-stone-500">One row per taxon, one column per trait.</span>
                </li>
                <li>
                  <a className={textLinkClasses} href={taxaCsvUrl(study.id, "long", false)} download>
                    Table, long form
                  </a>
                  <span className="block text-sm text-stone-500">One row per taxon and trait (tidy).</span>
                </li>
                <li>
                  <a className={textLinkClasses} href={codebookCsvUrl(study.id)} download>
                    Codebook
                  </a>
                  <span className="block text-sm text-stone-500">Keys, kinds, states, units and coding rules.</span>
                </li>
              </ul>
            </Popover>
            {canImport && (
              <ButtonLink to={`${paths.study(study.id)}/imports`} variant="secondary">
                Import a CSV
              </ButtonLink>
            )}
          </>
        }
      />

      {!canEdit && <Notice className="mb-4">As {ROLE_LABELS[study.role]} you can read the table and each cell’s history. Coders and study leads change values.</Notice>}

      {traits.isPending && <LoadingState label="Loading the codebook" />}
      {traits.isError && <ErrorState error={traits.error} title="The codebook could not be loaded" onRetry={() => void traits.refetch()} />}

      {traits.isSuccess && (
        <div className="space-y-4">
          <FilterBar
            columns={columns}
            filters={query.filters}
            missing={query.missing}
            hasOpenThread={query.hasOpenThread}
            nameSearch={nameSearch}
            onNameSearch={(text) => {
              setNameSearch(text);
              setQuery((q) => ({ ...q, page: 1 }));
            }}
            onAddFilter={(f: TaxaColumnFilter) => change({ filters: addFilter(query.filters, f) })}
            onAddMissing={(column) => change({ missing: query.missing.includes(column) ? query.missing : [...query.missing, column] })}
            onRemoveFilter={(index) => change({ filters: query.filters.filter((_, i) => i !== index) })}
            onRemoveMissing={(column) => change({ missing: query.missing.filter((m) => m !== column) })}
            onOpenThreadChange={(hasOpenThread) => change({ hasOpenThread })}
            onClearAll={() => {
              setNameSearch("");
              change({ filters: [], missing: [], hasOpenThread: false });
            }}
          />

          <div className="flex flex-wrap items-center justify-between gap-3">
            <p className="text-sm text-stone-600 tabular-nums" aria-live="polite">
              {page.data ? (total === 0 ? "No taxa" : `Taxa ${formatCount(firstShown)}–${formatCount(lastShown)} of ${formatCount(total)}`) : "\u00a0"}
              {page.isFetching && page.data && <span className="ml-2 text-stone-500">Updating…</span>}
            </p>
            <div className="flex flex-wrap items-center gap-2">
              {/* Every matching taxon, not just this page's, up to what one bulk edit takes. */}
              {canEdit && total > 0 && total <= TAXA_MAX_BULK && selectedIds.length < total && (
                <Button
                  size="sm"
                  variant="secondary"
                  busy={matching.isPending}
                  onClick={() =>
                    matching.mutate(matchingQueryString(effectiveQuery), {
                      onSuccess: (found) => setRowSelection(Object.fromEntries(found.ids.map((id) => [id, true]))),
                      onError: (error) => toast.show(`The taxa could not be selected: ${errorMessage(error)}`, "error"),
                    })
                  }
                >
                  {filtered ? `Select all ${formatCount(total)} matching` : `Select all ${pluralize(total, "taxon", "taxa")}`}
                </Button>
              )}
              {selectedIds.length > 0 && (
                <div className="flex items-center gap-2 rounded-lg bg-accent-50 py-1 pr-1 pl-3 text-sm text-accent-900 ring-1 ring-accent-200" role="status">
                  {pluralize(selectedIds.length, "taxon", "taxa")} selected
                  {canEdit && (
                    <Button size="sm" onClick={() => setBulkOpen(true)}>
                      Edit selected…
                    </Button>
                  )}
                  <Button size="sm" variant="ghost" onClick={() => setRowSelection({})}>
                    Clear selection
                  </Button>
                </div>
              )}
              <Popover label={`Columns${Object.values(columnVisibility).filter((v) => v === false).length ? ` (${Object.values(columnVisibility).filter((v) => v === false).length} hidden)` : ""}`} title="Columns shown">
                <ul className="max-h-72 space-y-1.5 overflow-y-auto">
                  {columns
                    .filter((c) => c.id !== "name")
                    .map((c) => (
                      <li key={c.id}>
                        <label className="flex items-center gap-2 text-[15px] text-stone-800">
                          <input
                            type="checkbox"
                            className="size-4 accent-accent-600"
                            checked={columnVisibility[c.id] !== false}
                            onChange={(e) => setColumnVisibility((v) => ({ ...v, [c.id]: e.target.checked }))}
                          />
                          {c.label}
                        </label>
                      </li>
                    ))}
                </ul>
                <Button size="sm" variant="ghost" className="mt-3 -ml-3" onClick={() => setColumnVisibility({})}>
                  Show every column
                </Button>
              </Popover>
            </div>
          </div>

          {page.isPending && <LoadingState label="Loading taxa" lines={8} />}
          {page.isError && !page.data && <ErrorState error={page.error} title="The taxa could not be loaded" onRetry={() => void page.refetch()} />}
          {page.isError && page.data && (
            <Notice tone="error" title="The latest page could not be loaded">
              Showing the previous one. <button type="button" className={textLinkClasses} onClick={() => void page.refetch()}>Try again</button>
            </Notice>
          )}

          {rows && total === 0 && !filtered && (
            <EmptyState
              title="No taxa yet"
              description="Import a CSV file of taxa with their ranges and trait values; the columns are matched to the codebook in the first step."
              action={canImport ? <ButtonLink to={`${paths.study(study.id)}/imports`}>Import a CSV</ButtonLink> : undefined}
            />
          )}
          {rows && total === 0 && filtered && (
            <EmptyState
              title="No taxa match these filters"
              description="Remove a filter or clear them all to see more of the table."
              action={
                <Button
                  variant="secondary"
                  onClick={() => {
                    setNameSearch("");
                    change({ filters: [], missing: [], hasOpenThread: false });
                  }}
                >
                  Clear all filters
                </Button>
              }
            />
          )}

          {rows && total > 0 && (
            <>
              <TaxaGrid
                columns={columns}
                rows={rows}
                rowOffset={(query.page - 1) * query.pageSize}
                total={total}
                sort={{ columnId: sortColumn, desc: query.dir === "desc" }}
                onSortChange={(columnId, desc) => change({ sort: columns.find((c) => c.id === columnId)?.sortId ?? "name", dir: desc ? "desc" : "asc" })}
                columnVisibility={columnVisibility}
                rowSelection={rowSelection}
                onRowSelectionChange={(updater: Updater<RowSelectionState>) => setRowSelection((current) => (typeof updater === "function" ? updater(current) : updater))}
                canEdit={canEdit}
                savingCells={edits.saving}
                stale={page.isPlaceholderData}
                onCommit={edits.commit}
                onShowHistory={(row, column) => setHistory({ row, column })}
                onShowFinds={showFinds}
                openTraitThreads={openTraitThreads}
              />
              <div className="flex flex-wrap items-center justify-between gap-3">
                <p className="text-sm text-stone-500">
                  <kbd className="font-sans font-semibold">Arrows</kbd> move · <kbd className="font-sans font-semibold">Enter</kbd> edits ·{" "}
                  <kbd className="font-sans font-semibold">Esc</kbd> cancels · <kbd className="font-sans font-semibold">Alt+H</kbd> shows the cell’s history ·{" "}
                  <kbd className="font-sans font-semibold">Enter</kbd> on Finds shows the taxon’s finds ·{" "}
                  <kbd className="font-sans font-semibold">Shift+Space</kbd> selects the row
                </p>
                <nav aria-label="Pages of the table" className="flex flex-wrap items-center gap-2">
                  <Select
                    label="Rows per page"
                    hideLabel
                    options={PAGE_SIZES.map((n) => ({ value: String(n), label: `${n} per page` }))}
                    value={String(query.pageSize)}
                    onChange={(e) => change({ pageSize: Number(e.target.value) })}
                    className="w-36"
                  />
                  <Button size="sm" variant="secondary" disabled={query.page <= 1} onClick={() => setQuery((q) => ({ ...q, page: 1 }))}>
                    First
                    <span className="sr-only"> page</span>
                  </Button>
                  <Button size="sm" variant="secondary" disabled={query.page <= 1} onClick={() => setQuery((q) => ({ ...q, page: q.page - 1 }))}>
                    Previous
                    <span className="sr-only"> page</span>
                  </Button>
                  <span className="px-1 text-sm text-stone-700 tabular-nums">
                    Page {formatCount(query.page)} of {formatCount(pageCount)}
                  </span>
                  <Button size="sm" variant="secondary" disabled={query.page >= pageCount} onClick={() => setQuery((q) => ({ ...q, page: q.page + 1 }))}>
                    Next
                    <span className="sr-only"> page</span>
                  </Button>
                  <Button size="sm" variant="secondary" disabled={query.page >= pageCount} onClick={() => setQuery((q) => ({ ...q, page: pageCount }))}>
                    Last
                    <span className="sr-only"> page</span>
                  </Button>
                </nav>
              </div>
              {edits.lastSaved && (
                <p className="sr-only" role="status">
                  {edits.lastSaved}
                </p>
              )}
            </>
          )}
        </div>
      )}

      {history && historyRow && (
        <HistoryPanel
          studyId={study.id}
          row={historyRow}
          column={history.column}
          traits={traitsById}
          canRevert={canEdit}
          onClose={() => {
            const id = `taxa-cell-${historyRow.id}-${history.column.id}`;
            setHistory(null);
            document.getElementById(id)?.focus();
          }}
        />
      )}
      <ModalDialog
        open={findsOf !== null}
        width="lg"
        title={findsOf ? <>Finds of <span className="italic">{findsOf.name}</span></> : ""}
        description="Each find's dates on the time scale, under the taxon's range as the table holds it."
        onClose={() => setFindsOf(null)}
      >
        {findsOf && (
          <div className="space-y-3">
            <TaxonFinds
              studyId={study.id}
              taxon={findsOf.name}
              range={findsOf.fadMa !== null && findsOf.ladMa !== null ? { fadMa: findsOf.fadMa, ladMa: findsOf.ladMa } : null}
            />
            <div className="flex justify-end">
              <Button variant="secondary" onClick={() => setFindsOf(null)}>
                Close
              </Button>
            </div>
          </div>
        )}
      </ModalDialog>
      <BulkEditDialog
        open={bulkOpen}
        studyId={study.id}
        taxonIds={selectedIds}
        traits={allTraits}
        onClose={() => setBulkOpen(false)}
        onDone={() => {
          setBulkOpen(false);
          setRowSelection({});
        }}
      />
      {edits.dialogs}
    </>
  );
}
