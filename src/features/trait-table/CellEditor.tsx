import { useEffect, useRef, useState, type KeyboardEvent } from "react";
import type { TaxonRow } from "@shared/schemas/taxa";
import { cx } from "../../lib/cx";
import { useCurrentStudy } from "../../lib/currentStudy";
import { useIntervalLookup } from "../../lib/queries/timeBins";
import { readCellEdit, type CellChange, type GridColumn } from "./cellValues";

export const INTERVAL_LIST_ID = "grid-interval-names";
export const stateListId = (traitId: string) => `grid-states-${traitId}`;

interface CellEditorProps {
  column: GridColumn;
  row: TaxonRow;
  initialText: string;
  /** A checked change (null: nothing changed); `move` says where the active cell goes next. */
  onCommit: (change: CellChange | null, move: "stay" | "down" | "right" | "left") => void;
  onCancel: () => void;
}

const HINTS: Record<GridColumn["kind"], string> = {
  text: "Enter saves, Esc cancels",
  range: "An age in Ma or an interval name (the study's time bins first); empty clears",
  trait: "Enter saves, Esc cancels; empty clears",
  count: "Counted from the occurrences; not editable",
};

/**
 * The input inside a cell being edited. What is typed is read like a CSV cell (a state's code or
 * label, a number, an age or interval name) and refused on the spot with the reader's message.
 */
export function CellEditor({ column, row, initialText, onCommit, onCancel }: CellEditorProps) {
  const [text, setText] = useState(initialText);
  const intervals = useIntervalLookup(useCurrentStudy().id);
  const [error, setError] = useState<string | null>(null);
  const inputRef = useRef<HTMLInputElement>(null);
  // Enter and Esc end the edit themselves; the blur that follows must not end it again.
  const settled = useRef(false);

  useEffect(() => {
    const input = inputRef.current;
    if (!input) return;
    input.focus();
    // Typing a character starts the edit with it: keep the caret after it.
    input.setSelectionRange(input.value.length, input.value.length);
  }, []);

  function commit(move: "stay" | "down" | "right" | "left"): boolean {
    const read = readCellEdit(column, row, text, intervals);
    if (!read.ok) {
      setError(read.message);
      return false;
    }
    settled.current = true;
    onCommit(read.value, move);
    return true;
  }

  function onKeyDown(event: KeyboardEvent<HTMLInputElement>) {
    event.stopPropagation();
    if (event.key === "Enter") {
      event.preventDefault();
      commit("down");
    } else if (event.key === "Escape") {
      event.preventDefault();
      settled.current = true;
      onCancel();
    } else if (event.key === "Tab") {
      event.preventDefault();
      commit(event.shiftKey ? "left" : "right");
    }
  }

  const trait = column.kind === "trait" ? column.trait : null;
  const listId = trait && trait.kind !== "numeric" ? stateListId(trait.id) : column.kind === "range" ? INTERVAL_LIST_ID : undefined;
  const errorId = `cell-editor-error-${row.id}-${column.id}`;

  return (
    <div className="relative h-full w-full">
      <input
        ref={inputRef}
        value={text}
        onChange={(e) => {
          setText(e.target.value);
          setError(null);
        }}
        onKeyDown={onKeyDown}
        onBlur={() => {
          if (settled.current) return;
          // Leaving the cell keeps a valid change and drops one that cannot be read.
          if (!commit("stay")) onCancel();
        }}
        list={listId}
        inputMode={trait?.kind === "numeric" ? "decimal" : undefined}
        aria-label={`${column.label} of ${row.name}`}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? errorId : undefined}
        autoComplete="off"
        spellCheck={false}
        className={cx(
          "h-full w-full rounded-none border-0 bg-white px-2 text-sm text-stone-900 outline-none ring-2 ring-inset",
          error ? "ring-red-500" : "ring-accent-600",
        )}
      />
      <div
        id={errorId}
        role={error ? "alert" : undefined}
        className={cx(
          "absolute top-full left-0 z-30 mt-0.5 w-72 rounded-md px-2.5 py-1.5 text-xs shadow-lg",
          error ? "bg-red-700 text-white" : "bg-stone-800 text-stone-100",
        )}
      >
        {error ?? HINTS[column.kind]}
      </div>
    </div>
  );
}
