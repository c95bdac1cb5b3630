import type { TraitKind } from "@shared/codebook";
import { Button } from "../../components/Button";
import { cx } from "../../lib/cx";
import { TextField } from "../../components/TextField";
import type { FieldErrors } from "../../lib/forms";
import { pluralize } from "../../lib/format";
import { newStateDraft, type StateDraft } from "./traitDraft";

interface StatesEditorProps {
  kind: Exclude<TraitKind, "numeric">;
  states: StateDraft[];
  errors: FieldErrors;
  /** Taxa holding each saved code, when the trait exists; shown beside the row that has it. */
  heldBy?: Map<string, number>;
  onChange: (states: StateDraft[]) => void;
}

const KIND_HINTS: Record<Exclude<TraitKind, "numeric">, string> = {
  binary: "Exactly two states.",
  categorical: "Two or more states in no particular order.",
  ordinal: "Two or more states, from the lowest rank to the highest: the order here is the order analyses use.",
};

/** The list of a trait's states: code and label per row, in order, with move and remove buttons. */
export function StatesEditor({ kind, states, errors, heldBy, onChange }: StatesEditorProps) {
  const canAdd = kind !== "binary" || states.length < 2;

  function update(index: number, patch: Partial<StateDraft>) {
    onChange(states.map((s, i) => (i === index ? { ...s, ...patch } : s)));
  }
  function move(index: number, by: -1 | 1) {
    const next = [...states];
    const [row] = next.splice(index, 1);
    next.splice(index + by, 0, row);
    onChange(next);
  }

  return (
    <fieldset className="rounded-lg border border-stone-200 bg-stone-50/60 px-4 pt-3 pb-4">
      <legend className="px-1 text-sm font-medium text-stone-800">States</legend>
      <p className="text-sm text-stone-500">{KIND_HINTS[kind]} Codes are what a CSV file or the grid holds; labels are what people read.</p>
      {errors.states && (
        <p className="mt-2 text-sm font-medium text-red-700" role="alert">
          {errors.states}
        </p>
      )}
      <ol className="mt-3 space-y-3">
        {states.map((state, index) => {
          const n = index + 1;
          const held = state.originalCode ? (heldBy?.get(state.originalCode) ?? 0) : 0;
          const rowError = errors[`states.${index}`];
          return (
            <li key={state.localId} className={cx("rounded-md", rowError && "ring-1 ring-red-300")}>
              <div className="grid grid-cols-[2rem_minmax(0,10rem)_minmax(0,1fr)_auto] items-start gap-3">
                <span className="pt-8 text-right text-sm text-stone-500 tabular-nums" aria-hidden="true">
                  {n}.
                </span>
                <TextField
                  label={`Code of state ${n}`}
                  value={state.code}
                  error={errors[`states.${index}.code`]}
                  onChange={(e) => update(index, { code: e.target.value })}
                  autoComplete="off"
                  spellCheck={false}
                />
                <TextField label={`Label of state ${n}`} value={state.label} error={errors[`states.${index}.label`]} onChange={(e) => update(index, { label: e.target.value })} />
                <div className="flex items-center gap-1 pt-7">
                  <Button variant="ghost" size="sm" disabled={index === 0} onClick={() => move(index, -1)} aria-label={`Move state ${n} up`}>
                    ↑
                  </Button>
                  <Button variant="ghost" size="sm" disabled={index === states.length - 1} onClick={() => move(index, 1)} aria-label={`Move state ${n} down`}>
                    ↓
                  </Button>
                  <Button
                    variant="ghost"
                    size="sm"
                    className="text-red-700 hover:bg-red-50 hover:text-red-800"
                    onClick={() => onChange(states.filter((_, i) => i !== index))}
                    aria-label={`Remove state ${n}`}
                  >
                    Remove
                  </Button>
                </div>
              </div>
              {(held > 0 || rowError) && (
                <p className="mt-1 ml-11 text-sm">
                  {held > 0 && (
                    <span className="text-stone-500">
                      {pluralize(held, "taxon", "taxa")} hold “{state.originalCode}”.{" "}
                    </span>
                  )}
                  {rowError && <span className="font-medium text-red-700">{rowError}</span>}
                </p>
              )}
            </li>
          );
        })}
      </ol>
      {canAdd && (
        <Button variant="secondary" size="sm" className="mt-4" onClick={() => onChange([...states, newStateDraft()])}>
          Add a state
        </Button>
      )}
    </fieldset>
  );
}
