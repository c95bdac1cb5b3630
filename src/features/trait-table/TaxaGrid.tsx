import { useCallback, useEffect, useLayoutEffect, useMemo, useRef, useState, type KeyboardEvent, type ReactNode } from "react";
import {
  columnPinningFeature,
  columnSizingFeature,
  columnVisibilityFeature,
  createColumnHelper,
  metaHelper,
  rowPaginationFeature,
  rowSelectionFeature,
  rowSortingFeature,
  tableFeatures,
  useTable,
  type ColumnVisibilityState,
  type RowSelectionState,
  type SortingState,
  type Updater,
} from "@tanstack/react-table";
import { useVirtualizer } from "@tanstack/react-virtual";
import type { TaxonRow } from "@shared/schemas/taxa";
import { timescaleUnits } from "@shared/timescale/units";
import { qualifiedHigherTaxon } from "@shared/imports/qualifiedHigherTaxon";
import { cx } from "../../lib/cx";
import { sharedAgeDecimals } from "../../lib/format";
import { useCurrentStudy } from "../../lib/currentStudy";
import { useIntervalLookup } from "../../lib/queries/timeBins";
import { CellEditor, INTERVAL_LIST_ID, stateListId } from "./CellEditor";
import { cellValue, displayText, editText, isEmptyValue, type CellChange, type GridColumn } from "./cellValues";

const ROW_HEIGHT = 36;
const SELECT_COLUMN = "select";

interface ColumnMeta {
  grid?: GridColumn;
}

const features = tableFeatures({
  rowSortingFeature,
  rowPaginationFeature,
  rowSelectionFeature,
  columnVisibilityFeature,
  columnSizingFeature,
  columnPinningFeature,
  columnMeta: metaHelper<ColumnMeta>(),
});
const helper = createColumnHelper<typeof features, TaxonRow>();

const selectColumn = helper.display({
  id: SELECT_COLUMN,
  size: 44,
  enableSorting: false,
  enableHiding: false,
  header: ({ table }) => (
    <input
      type="checkbox"
      aria-label="Select every taxon on this page"
      className="size-4 accent-accent-600"
      checked={table.getIsAllPageRowsSelected()}
      ref={(el) => {
        if (el) el.indeterminate = !table.getIsAllPageRowsSelected() && table.getIsSomePageRowsSelected();
      }}
      onChange={table.getToggleAllPageRowsSelectedHandler()}
    />
  ),
  cell: ({ row }) => (
    <input
      type="checkbox"
      tabIndex={-1}
      aria-label={`Select ${row.original.name}`}
      className="size-4 accent-accent-600"
      checked={row.getIsSelected()}
      onChange={() => undefined}
      onClick={row.getToggleSelectedHandler()}
    />
  ),
});

const WIDTHS: Record<string, number> = { name: 230, higherTaxon: 170, fad: 190, lad: 190, notes: 260 };
/**
 * A trait column is as wide as its heading needs on two lines (about 7 px a character at the
 * heading's size, plus the sort mark), at least 130 or 150 px and at most 240 px.
 */
function widthOf(c: GridColumn): number {
  if (WIDTHS[c.id]) return WIDTHS[c.id];
  const base = c.kind === "trait" && c.trait.kind === "numeric" ? 130 : 150;
  const unit = c.kind === "trait" && c.trait.kind === "numeric" && c.trait.unit ? c.trait.unit.length + 3 : 0;
  const longestWord = Math.max(...`${c.label} ${"x".repeat(unit)}`.split(/\s+/).map((w) => w.length));
  const twoLines = Math.max(Math.ceil((c.label.length + unit) / 2), longestWord);
  return Math.min(240, Math.max(base, twoLines * 7.5 + 44));
}

/** Where the keyboard is: a row of the page and a column. */
export interface ActiveCell {
  rowIndex: number;
  columnId: string;
}

export interface TaxaGridProps {
  columns: GridColumn[];
  rows: TaxonRow[];
  /** Rows before this page, for aria-rowindex. */
  rowOffset: number;
  total: number;
  sort: { columnId: string; desc: boolean };
  onSortChange: (columnId: string, desc: boolean) => void;
  columnVisibility: ColumnVisibilityState;
  rowSelection: RowSelectionState;
  onRowSelectionChange: (updater: Updater<RowSelectionState>) => void;
  canEdit: boolean;
  /** Cells being saved, as `${rowId}:${columnId}`. */
  savingCells: ReadonlySet<string>;
  /** Grey the rows while a new page loads (the previous one stays visible). */
  stale: boolean;
  /** "asking" when the change waits for a reason first: the grid then stays on the cell. */
  onCommit: (row: TaxonRow, column: GridColumn, change: CellChange) => "sending" | "asking";
  onShowHistory: (row: TaxonRow, column: GridColumn) => void;
  /** Opens the taxon's finds (from a Finds or Collections cell: Enter, or a click on the count). */
  onShowFinds: (row: TaxonRow) => void;
  /** Traits with an open thread about the trait itself (its coding rule): their headers are marked. */
  openTraitThreads?: ReadonlySet<string>;
}

function MissingMark() {
  return (
    <span className="text-stone-500" title="No value recorded">
      <span aria-hidden="true">—</span>
      <span className="sr-only">missing</span>
    </span>
  );
}

/** A higher taxon written with a qualifier ("Anavelidae?", "cf. Ortevida"): kept as written, marked as uncertain. */
function QualifiedMark({ qualifier, base }: { qualifier: string; base: string }) {
  const label = `Qualified higher taxon (${qualifier} ${base}): a clade of its own in clade-adjusted results`;
  return (
    <span className="ml-1.5 shrink-0 rounded bg-amber-100 px-1 text-[11px] font-semibold text-amber-900 ring-1 ring-amber-300" title={label}>
      <span aria-hidden="true">qualified</span>
      <span className="sr-only">{label}</span>
    </span>
  );
}

function ThreadDot({ label }: { label: string }) {
  return <span className="ml-1.5 inline-block size-2 shrink-0 rounded-full bg-caution-700" role="img" aria-label={label} title={label} />;
}

function CellContent({ column, row, onShowFinds, ageDecimals }: { column: GridColumn; row: TaxonRow; onShowFinds: (row: TaxonRow) => void; ageDecimals: number }) {
  if (column.kind === "count") {
    const count = row[column.id];
    if (count === undefined) return <MissingMark />;
    return (
      <button
        type="button"
        tabIndex={-1}
        data-cell-value
        onClick={() => onShowFinds(row)}
        className="ml-auto rounded px-1 text-accent-800 tabular-nums underline decoration-dotted underline-offset-2 hover:bg-accent-50"
        title={`Show the finds of ${row.name} on the time scale (Enter)`}
      >
        {count.toLocaleString("en-US")}
        <span className="sr-only"> {column.id === "occurrences" ? "finds" : "collections"}: show the finds of {row.name}</span>
      </button>
    );
  }
  const value = cellValue(column, row);
  const text = displayText(column, row, ageDecimals);
  const threadOnValue = column.kind === "trait" && row.openThreads.traitIds.includes(column.id);
  const threadOnTaxon = column.id === "name" && row.openThreads.count > 0;
  const qualified = column.id === "higherTaxon" && typeof value === "string" ? qualifiedHigherTaxon(value) : null;
  const outsideCodebook =
    column.kind === "trait" && column.trait.kind !== "numeric" && !isEmptyValue(value) && !column.trait.states.some((s) => s.code === value);
  return (
    <span className="flex min-w-0 items-center" data-cell-value>
      {isEmptyValue(value) ? (
        <MissingMark />
      ) : (
        <span className={cx("truncate", column.id === "name" && "font-medium italic text-stone-900", outsideCodebook && "text-red-700")} title={text}>
          {text}
        </span>
      )}
      {qualified && <QualifiedMark qualifier={qualified.qualifier} base={qualified.base} />}
      {threadOnValue && <ThreadDot label="Open thread about this value" />}
      {threadOnTaxon && <ThreadDot label={`${row.openThreads.count} open thread${row.openThreads.count === 1 ? "" : "s"} about this taxon`} />}
    </span>
  );
}

/**
 * The trait table grid: a TanStack Table over one server page, its rows virtualised, its name
 * column frozen, usable from the keyboard (arrows move, Enter edits, Esc cancels).
 */
export function TaxaGrid(props: TaxaGridProps) {
  // The study's own time bins are offered first in range cells, as they are read first.
  const intervals = useIntervalLookup(useCurrentStudy().id);
  const { columns, rows, rowOffset, total, sort, onSortChange, columnVisibility, rowSelection, onRowSelectionChange, canEdit, savingCells, stale } = props;
  const { onCommit, onShowHistory, onShowFinds, openTraitThreads } = props;
  const scrollRef = useRef<HTMLDivElement>(null);
  const [active, setActive] = useState<ActiveCell>({ rowIndex: 0, columnId: "name" });
  const [editing, setEditing] = useState<{ initialText: string } | null>(null);
  const focusPending = useRef(false);
  // The two age columns write every age of the page alike: "94.00 Ma" beside "94.41 Ma", not "94 Ma".
  const ageDecimals = useMemo(() => sharedAgeDecimals(rows.flatMap((r) => [r.fadMa, r.ladMa])), [rows]);

  // Selecting rows only serves a bulk edit: people who cannot edit get no checkboxes.
  const columnDefs = useMemo(
    () =>
      helper.columns([
        ...(canEdit ? [selectColumn] : []),
        ...columns.map((gridColumn) =>
          helper.accessor((row: TaxonRow) => cellValue(gridColumn, row), {
            id: gridColumn.id,
            header: gridColumn.label,
            size: widthOf(gridColumn),
            enableHiding: gridColumn.id !== "name",
            meta: { grid: gridColumn },
            cell: ({ row }) => <CellContent column={gridColumn} row={row.original} onShowFinds={onShowFinds} ageDecimals={ageDecimals} />,
          }),
        ),
      ]),
    [columns, canEdit, onShowFinds, ageDecimals],
  );

  const sorting: SortingState = useMemo(() => [{ id: sort.columnId, desc: sort.desc }], [sort.columnId, sort.desc]);
  const table = useTable({
    features,
    columns: columnDefs,
    data: rows,
    getRowId: (row) => row.id,
    manualSorting: true,
    manualPagination: true,
    enableMultiSort: false,
    enableSortingRemoval: false,
    rowCount: total,
    state: { sorting, columnVisibility, rowSelection, columnPinning: { start: canEdit ? [SELECT_COLUMN, "name"] : ["name"], end: [] } },
    onSortingChange: (updater) => {
      const next = typeof updater === "function" ? updater(sorting) : updater;
      if (next[0]) onSortChange(next[0].id, next[0].desc);
    },
    onRowSelectionChange,
  });

  const visibleColumns = table.getVisibleLeafColumns();
  const columnIds = visibleColumns.map((c) => c.id);
  const tableRows = table.getRowModel().rows;
  const totalWidth = table.getTotalSize();

  const virtualizer = useVirtualizer({
    count: tableRows.length,
    getScrollElement: () => scrollRef.current,
    estimateSize: () => ROW_HEIGHT,
    overscan: 12,
    scrollPaddingStart: ROW_HEIGHT,
    getItemKey: (index) => tableRows[index]?.id ?? index,
  });

  // A new page, sort or filter starts at the top; a smaller page keeps the active row inside it.
  const firstRowId = rows[0]?.id;
  useLayoutEffect(() => {
    scrollRef.current?.scrollTo({ top: 0 });
  }, [firstRowId, rowOffset]);
  const rowIndex = Math.min(active.rowIndex, Math.max(0, rows.length - 1));
  const columnId = columnIds.includes(active.columnId) ? active.columnId : "name";
  const activeRow = rows[rowIndex];
  const activeGridColumn = columns.find((c) => c.id === columnId) ?? null;

  const cellDomId = (rowId: string, colId: string) => `taxa-cell-${rowId}-${colId}`;

  // After a keyboard move, the new active cell takes focus once the virtualiser has rendered it.
  useEffect(() => {
    if (!focusPending.current || editing || !activeRow) return;
    const id = cellDomId(activeRow.id, columnId);
    let attempts = 0;
    let frame = 0;
    const tryFocus = () => {
      const el = document.getElementById(id);
      if (el) {
        el.focus();
        focusPending.current = false;
      } else if (attempts++ < 5) frame = requestAnimationFrame(tryFocus);
    };
    tryFocus();
    return () => cancelAnimationFrame(frame);
  });

  const moveTo = useCallback(
    (nextRow: number, nextColumnIndex: number) => {
      const r = Math.max(0, Math.min(rows.length - 1, nextRow));
      const c = Math.max(0, Math.min(columnIds.length - 1, nextColumnIndex));
      virtualizer.scrollToIndex(r, { align: "auto" });
      focusPending.current = true;
      setActive({ rowIndex: r, columnId: columnIds[c] });
    },
    [rows.length, columnIds, virtualizer],
  );

  const isEditable = (gc: GridColumn | null) => canEdit && gc !== null && gc.kind !== "count";

  function startEdit(initialText?: string) {
    if (!activeRow || !isEditable(activeGridColumn) || !activeGridColumn) return;
    setEditing({ initialText: initialText ?? editText(activeGridColumn, activeRow) });
  }

  function onGridKeyDown(event: KeyboardEvent<HTMLDivElement>) {
    if (editing || !activeRow) return;
    const target = event.target as HTMLElement;
    // The header's own controls keep their keys.
    if (target.closest("[role=columnheader]")) return;
    const c = columnIds.indexOf(columnId);
    const page = Math.max(1, Math.floor((scrollRef.current?.clientHeight ?? 400) / ROW_HEIGHT) - 2);
    const key = event.key;
    let handled = true;
    if (key === "ArrowDown") moveTo(rowIndex + 1, c);
    else if (key === "ArrowUp") moveTo(rowIndex - 1, c);
    else if (key === "ArrowRight") moveTo(rowIndex, c + 1);
    else if (key === "ArrowLeft") moveTo(rowIndex, c - 1);
    else if (key === "PageDown") moveTo(rowIndex + page, c);
    else if (key === "PageUp") moveTo(rowIndex - page, c);
    else if (key === "Home") moveTo(event.ctrlKey ? 0 : rowIndex, 0);
    else if (key === "End") moveTo(event.ctrlKey ? rows.length - 1 : rowIndex, columnIds.length - 1);
    else if (key === " " && (columnId === SELECT_COLUMN || event.shiftKey)) table.getRow(activeRow.id).toggleSelected();
    else if ((key === "Enter" || key === "F2") && columnId === SELECT_COLUMN) table.getRow(activeRow.id).toggleSelected();
    else if (key === "Enter" && activeGridColumn?.kind === "count") onShowFinds(activeRow);
    else if (key === "Enter" || key === "F2") startEdit();
    // By the physical key: Option+H types another character on some keyboards.
    else if (event.code === "KeyH" && event.altKey && activeGridColumn && activeGridColumn.kind !== "count") onShowHistory(activeRow, activeGridColumn);
    else if ((key === "Delete" || key === "Backspace") && isEditable(activeGridColumn) && activeGridColumn?.id !== "name") startEdit("");
    else if (key.length === 1 && !event.ctrlKey && !event.metaKey && !event.altKey && key !== " " && isEditable(activeGridColumn)) startEdit(key);
    else handled = false;
    if (handled) event.preventDefault();
  }

  function finishEdit(change: CellChange | null, move: "stay" | "down" | "right" | "left") {
    setEditing(null);
    const c = columnIds.indexOf(columnId);
    const asking = change && activeRow && activeGridColumn ? onCommit(activeRow, activeGridColumn, change) === "asking" : false;
    // While a reason is asked for, the edit has not happened: stay, so focus comes back here.
    if (asking) moveTo(rowIndex, c);
    else if (move === "down") moveTo(rowIndex + 1, c);
    else if (move === "right") moveTo(rowIndex, c + 1);
    else if (move === "left") moveTo(rowIndex, c - 1);
    else moveTo(rowIndex, c);
  }

  const pinnedStyle = (colId: string, isHeader: boolean) => {
    const column = table.getColumn(colId);
    const pinned = column?.getIsPinned();
    return {
      width: column?.getSize(),
      minWidth: column?.getSize(),
      position: pinned ? ("sticky" as const) : undefined,
      left: pinned === "start" ? column?.getStart("start") : undefined,
      zIndex: pinned ? (isHeader ? 3 : 1) : undefined,
    };
  };

  const traitLists = columns.filter((c): c is Extract<GridColumn, { kind: "trait" }> => c.kind === "trait" && c.trait.kind !== "numeric");
  const headerGroup = table.getHeaderGroups()[0];

  return (
    <>
      <div
        ref={scrollRef}
        role="grid"
        aria-label="Trait table"
        aria-rowcount={total + 1}
        aria-colcount={visibleColumns.length}
        aria-multiselectable={canEdit || undefined}
        aria-busy={stale || undefined}
        onKeyDown={onGridKeyDown}
        // A styled scrollbar is always drawn (an overlay one hides until scrolled, so wide tables looked cut).
        className="relative max-h-[max(24rem,calc(100dvh-16rem))] overflow-auto rounded-xl border border-stone-200 bg-white text-sm shadow-[0_1px_2px_rgb(28_25_23/0.04)] [&::-webkit-scrollbar]:size-3 [&::-webkit-scrollbar-corner]:bg-stone-100 [&::-webkit-scrollbar-thumb]:rounded-full [&::-webkit-scrollbar-thumb]:border-2 [&::-webkit-scrollbar-thumb]:border-solid [&::-webkit-scrollbar-thumb]:border-stone-100 [&::-webkit-scrollbar-thumb]:bg-stone-400 [&::-webkit-scrollbar-track]:bg-stone-100"
      >
        <div role="rowgroup" className="sticky top-0 z-20" style={{ width: totalWidth }}>
          <div role="row" aria-rowindex={1} className="flex border-b border-stone-200 bg-stone-100">
            {headerGroup.headers.map((header, index) => {
              const gc = header.column.columnDef.meta?.grid;
              const sorted = header.column.getIsSorted();
              const isPinned = Boolean(header.column.getIsPinned());
              return (
                <div
                  key={header.id}
                  role="columnheader"
                  aria-colindex={index + 1}
                  aria-sort={sorted ? (sorted === "asc" ? "ascending" : "descending") : undefined}
                  style={pinnedStyle(header.column.id, true)}
                  className={cx(
                    "flex min-h-10 shrink-0 items-center border-r border-stone-200 bg-stone-100 px-2 py-1 leading-tight font-semibold text-stone-700",
                    isPinned && header.column.id === "name" && "shadow-[2px_0_0_rgb(214_211_209)]",
                  )}
                >
                  {header.column.id === SELECT_COLUMN ? (
                    <table.FlexRender header={header} />
                  ) : (
                    <button
                      type="button"
                      onClick={header.column.getToggleSortingHandler()}
                      title={gc?.kind === "trait" && gc.trait.codingRule ? `${gc.label}: ${gc.trait.codingRule}` : `Sort by ${gc?.label ?? header.column.id}`}
                      className="flex min-w-0 flex-1 items-center gap-1 rounded text-left hover:text-stone-950 focus-visible:ring-2 focus-visible:ring-accent-500 focus-visible:outline-none"
                    >
                      {/* Headings wrap onto two lines rather than being cut. */}
                      <span className="min-w-0 [overflow-wrap:anywhere]">
                        {gc?.label}
                        {gc?.kind === "trait" && gc.trait.kind === "numeric" && gc.trait.unit && <span className="font-normal whitespace-nowrap text-stone-600"> ({gc.trait.unit})</span>}
                      </span>
                      {gc?.kind === "trait" && openTraitThreads?.has(gc.id) && <ThreadDot label={`Open thread about the trait ${gc.label}`} />}
                      <span aria-hidden="true" className={cx("ml-auto text-xs", sorted ? "text-accent-700" : "text-stone-300")}>
                        {sorted === "desc" ? "▼" : "▲"}
                      </span>
                    </button>
                  )}
                </div>
              );
            })}
          </div>
        </div>

        <div role="rowgroup" className={cx("relative transition-opacity", stale && "opacity-60")} style={{ height: virtualizer.getTotalSize(), width: totalWidth }}>
          {virtualizer.getVirtualItems().map((item) => {
            const row = tableRows[item.index];
            if (!row) return null;
            const selected = row.getIsSelected();
            return (
              <div
                key={row.id}
                role="row"
                aria-rowindex={rowOffset + item.index + 2}
                aria-selected={selected}
                data-taxon={row.original.name}
                className={cx("group absolute top-0 left-0 flex border-b border-stone-100", selected ? "bg-accent-50" : "bg-white hover:bg-stone-50")}
                // The row being edited stays above the next rows, so the editor's message is not covered.
                style={{ height: ROW_HEIGHT, transform: `translateY(${item.start}px)`, width: totalWidth, zIndex: editing && item.index === rowIndex ? 5 : undefined }}
              >
                {row.getVisibleCells().map((cell, index) => {
                  const colId = cell.column.id;
                  const gc = cell.column.columnDef.meta?.grid ?? null;
                  const isActive = item.index === rowIndex && colId === columnId;
                  const isEditing = isActive && editing !== null && gc !== null;
                  const saving = savingCells.has(`${row.id}:${colId}`);
                  let content: ReactNode = <table.FlexRender cell={cell} />;
                  if (isEditing && gc) {
                    content = (
                      <CellEditor
                        column={gc}
                        row={row.original}
                        initialText={editing.initialText}
                        onCommit={finishEdit}
                        onCancel={() => finishEdit(null, "stay")}
                      />
                    );
                  }
                  return (
                    <div
                      key={cell.id}
                      id={cellDomId(row.id, colId)}
                      role="gridcell"
                      aria-colindex={index + 1}
                      aria-readonly={!canEdit || colId === SELECT_COLUMN || gc?.kind === "count" || undefined}
                      aria-busy={saving || undefined}
                      data-column={gc?.label ?? colId}
                      tabIndex={isActive && !isEditing ? 0 : -1}
                      onClick={() => setActive({ rowIndex: item.index, columnId: colId })}
                      onFocus={() => {
                        if (!isActive) setActive({ rowIndex: item.index, columnId: colId });
                      }}
                      onDoubleClick={() => {
                        if (gc && isEditable(gc)) setEditing({ initialText: editText(gc, row.original) });
                      }}
                      style={pinnedStyle(colId, false)}
                      className={cx(
                        "relative flex shrink-0 items-center border-r border-stone-100 outline-none",
                        isEditing ? "p-0" : "px-2",
                        cell.column.getIsPinned() && (selected ? "bg-accent-50" : "bg-white group-hover:bg-stone-50"),
                        colId === "name" && "shadow-[2px_0_0_rgb(231_229_228)]",
                        colId === SELECT_COLUMN && "justify-center",
                        isActive && !isEditing && "z-[2] ring-2 ring-accent-600 ring-inset",
                        saving && "animate-pulse text-stone-400",
                      )}
                    >
                      {content}
                      {isActive && !isEditing && gc && gc.kind !== "count" && (
                        <button
                          type="button"
                          tabIndex={-1}
                          onClick={(e) => {
                            e.stopPropagation();
                            onShowHistory(row.original, gc);
                          }}
                          className="absolute top-1/2 right-1 -translate-y-1/2 rounded bg-white p-0.5 text-accent-700 shadow-sm ring-1 ring-stone-200 hover:bg-accent-50"
                          aria-label={`History of ${gc.label} for ${row.original.name}`}
                          title="History of this cell (Alt+H)"
                        >
                          <svg className="size-4" viewBox="0 0 20 20" fill="currentColor" aria-hidden="true">
                            <path
                              fillRule="evenodd"
                              d="M10 18a8 8 0 1 0 0-16 8 8 0 0 0 0 16Zm.75-13a.75.75 0 0 0-1.5 0v5c0 .2.08.39.22.53l3 3a.75.75 0 1 0 1.06-1.06l-2.78-2.78V5Z"
                              clipRule="evenodd"
                            />
                          </svg>
                        </button>
                      )}
                    </div>
                  );
                })}
              </div>
            );
          })}
        </div>
      </div>

      {/* Suggestions for the cell editor: states by code and label, interval names of the time scale. */}
      {traitLists.map((c) => (
        <datalist key={c.id} id={stateListId(c.id)}>
          {c.trait.states.map((s) => (
            <option key={s.code} value={s.code}>
              {s.label}
            </option>
          ))}
        </datalist>
      ))}
      <datalist id={INTERVAL_LIST_ID}>
        {(intervals.binNames ?? []).map((name) => (
          <option key={`bin-${name}`} value={name}>
            Time bin of this study
          </option>
        ))}
        {timescaleUnits.map((u) => (
          <option key={u.name} value={u.label} />
        ))}
      </datalist>
    </>
  );
}
