import { useState, type FormEvent } from "react";
import { formatTaxaFilter, parseTaxaFilter, type FilterOp, type TaxaColumnFilter } from "@shared/schemas/taxa";
import { Button } from "../../components/Button";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { Select } from "../../components/Select";
import { TextField } from "../../components/TextField";
import { formatTraitValue, type GridColumn } from "./cellValues";
import { OP_WORDS } from "./gridQuery";

type Condition = { value: string; label: string; op: FilterOp | "missing"; column: (c: GridColumn) => string };

const same = (c: GridColumn) => c.id;
const ages = (c: GridColumn) => (c.id === "fad" ? "fadMa" : "ladMa");
const interval = (c: GridColumn) => (c.id === "fad" ? "fadInterval" : "ladInterval");

/** What can be asked of each kind of column; every answer is filtered on the server. */
function conditionsFor(c: GridColumn): Condition[] {
  const missing: Condition = { value: "missing", label: "is missing", op: "missing", column: same };
  if (c.kind === "range") {
    return [
      { value: "min", label: "at least (Ma)", op: "min", column: ages },
      { value: "max", label: "at most (Ma)", op: "max", column: ages },
      { value: "interval", label: "interval name contains", op: "contains", column: interval },
      missing,
    ];
  }
  if (c.kind === "trait") {
    if (c.trait.kind === "numeric") {
      return [
        { value: "min", label: "at least", op: "min", column: same },
        { value: "max", label: "at most", op: "max", column: same },
        { value: "eq", label: "equals", op: "eq", column: same },
        missing,
      ];
    }
    return [{ value: "eq", label: "is", op: "eq", column: same }, missing];
  }
  const text: Condition[] = [
    { value: "contains", label: "contains", op: "contains", column: same },
    { value: "eq", label: "is exactly", op: "eq", column: same },
  ];
  // Names are searched in the box beside; here a name can only be matched exactly.
  return c.id === "name" ? [text[1]] : [...text, missing];
}

interface FilterBarProps {
  columns: GridColumn[];
  filters: TaxaColumnFilter[];
  missing: string[];
  hasOpenThread: boolean;
  nameSearch: string;
  onNameSearch: (text: string) => void;
  onAddFilter: (filter: TaxaColumnFilter) => void;
  onAddMissing: (column: string) => void;
  onRemoveFilter: (index: number) => void;
  onRemoveMissing: (column: string) => void;
  onOpenThreadChange: (value: boolean) => void;
  onClearAll: () => void;
}

/** Name search, filters by any column or by missing values, and "has an open thread". */
export function FilterBar(props: FilterBarProps) {
  const { columns, filters, missing, hasOpenThread, nameSearch } = props;
  // Counts of finds and collections sort but do not filter (the server refuses it).
  const filterable = columns.filter((c) => c.kind !== "count");
  const [columnId, setColumnId] = useState(filterable[0]?.id ?? "name");
  const column = filterable.find((c) => c.id === columnId) ?? filterable[0];
  const conditions = column ? conditionsFor(column) : [];
  const [conditionValue, setConditionValue] = useState(conditions[0]?.value ?? "contains");
  const condition = conditions.find((c) => c.value === conditionValue) ?? conditions[0];
  const [value, setValue] = useState("");
  const [error, setError] = useState<string | undefined>();

  const labelOf = (id: string) => {
    const base = id.replace(/(Ma|Interval)$/, "");
    return columns.find((c) => c.id === id || c.id === base)?.label ?? id;
  };
  const chipText = (f: TaxaColumnFilter) => {
    const c = columns.find((x) => x.id === f.column);
    const shown = c?.kind === "trait" && c.trait.kind !== "numeric" ? formatTraitValue(c.trait, f.value) : f.value;
    const suffix = f.column.endsWith("Ma") ? " Ma" : "";
    if (f.column.endsWith("Interval")) return `${labelOf(f.column)} interval contains “${shown}”`;
    return `${labelOf(f.column)} ${OP_WORDS[f.op]} ${f.op === "contains" ? `“${shown}”` : shown}${suffix}`;
  };

  function add(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (!column || !condition) return;
    if (condition.op === "missing") {
      props.onAddMissing(column.id);
      return;
    }
    const candidate: TaxaColumnFilter = { column: condition.column(column), op: condition.op, value: value.trim() };
    // The server's own reader of filters decides what is acceptable.
    const parsed = parseTaxaFilter(formatTaxaFilter(candidate));
    if (typeof parsed === "string") {
      setError(value.trim() === "" ? "Give a value to filter by" : (parsed.split(": ").pop() ?? parsed));
      return;
    }
    props.onAddFilter(parsed);
    setValue("");
  }

  const chips = filters.length + missing.length + (hasOpenThread ? 1 : 0);
  const stateColumn = column?.kind === "trait" && column.trait.kind !== "numeric" ? column.trait : null;

  return (
    <section aria-label="Filters" className="rounded-xl border border-stone-200 bg-white px-4 py-3 shadow-[0_1px_2px_rgb(28_25_23/0.04)]">
      <div className="flex flex-wrap items-end gap-x-3 gap-y-3">
        <TextField
          label="Search names"
          type="search"
          placeholder="e.g. Vessir"
          value={nameSearch}
          onChange={(e) => props.onNameSearch(e.target.value)}
          className="w-44"
        />
        <div className="mx-1 hidden h-10 w-px self-end bg-stone-200 sm:block" aria-hidden="true" />
        <form noValidate onSubmit={add} className="flex flex-wrap items-end gap-2" aria-label="Add a filter">
          <Select
            label="Filter column"
            options={filterable.map((c) => ({ value: c.id, label: c.label }))}
            value={column?.id ?? ""}
            onChange={(e) => {
              setColumnId(e.target.value);
              const next = filterable.find((c) => c.id === e.target.value);
              setConditionValue(next ? conditionsFor(next)[0].value : "contains");
              setValue("");
              setError(undefined);
            }}
            className="w-36"
          />
          <Select
            label="Condition"
            options={conditions.map((c) => ({ value: c.value, label: c.label }))}
            value={condition?.value ?? ""}
            onChange={(e) => {
              setConditionValue(e.target.value);
              setError(undefined);
            }}
            className="w-36"
          />
          {condition?.op !== "missing" &&
            (stateColumn ? (
              <Select
                label="Value"
                options={[{ value: "", label: "Choose a state…" }, ...stateColumn.states.map((s) => ({ value: s.code, label: s.label }))]}
                value={value}
                error={error}
                onChange={(e) => {
                  setValue(e.target.value);
                  setError(undefined);
                }}
                className="w-36"
              />
            ) : (
              <TextField
                label="Value"
                value={value}
                error={error}
                inputMode={condition?.op === "min" || condition?.op === "max" ? "decimal" : undefined}
                onChange={(e) => {
                  setValue(e.target.value);
                  setError(undefined);
                }}
                className="w-32"
              />
            ))}
          <Button type="submit" variant="secondary" className={error ? "mb-7" : undefined}>
            Add filter
          </Button>
        </form>
      </div>
      <label className="mt-3 flex w-fit items-center gap-2 text-sm font-medium text-stone-800">
        <input type="checkbox" className="size-4 accent-accent-600" checked={hasOpenThread} onChange={(e) => props.onOpenThreadChange(e.target.checked)} />
        Only taxa with an open thread
        <span className="inline-block size-2 rounded-full bg-caution-700" aria-hidden="true" />
      </label>
      {chips > 0 && (
        <ul className="mt-3 flex flex-wrap items-center gap-2" aria-label="Active filters">
          {filters.map((f, i) => (
            <li key={`${f.column}:${f.op}:${f.value}`}>
              <Chip text={chipText(f)} onRemove={() => props.onRemoveFilter(i)} />
            </li>
          ))}
          {missing.map((m) => (
            <li key={`missing:${m}`}>
              <Chip text={`${labelOf(m)} is missing`} onRemove={() => props.onRemoveMissing(m)} />
            </li>
          ))}
          {hasOpenThread && (
            <li>
              <Chip text="Has an open thread" onRemove={() => props.onOpenThreadChange(false)} />
            </li>
          )}
          <li>
            <button type="button" onClick={props.onClearAll} className={cx("rounded px-1 text-sm font-medium text-stone-600 underline hover:text-stone-900", focusRing)}>
              Clear all filters
            </button>
          </li>
        </ul>
      )}
    </section>
  );
}

function Chip({ text, onRemove }: { text: string; onRemove: () => void }) {
  return (
    <span className="inline-flex items-center gap-1 rounded-full bg-accent-50 py-0.5 pr-1 pl-3 text-sm text-accent-900 ring-1 ring-accent-200">
      {text}
      <button type="button" onClick={onRemove} className={cx("rounded-full px-1.5 text-accent-700 hover:bg-accent-100", focusRing)} aria-label={`Remove filter: ${text}`}>
        ×
      </button>
    </span>
  );
}
