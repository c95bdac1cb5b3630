import { useState, type FormEvent } from "react";
import { checkTraitValue, readRangeCell, readTraitCell } from "@shared/csv/values";
import { taxaBulkEditSchema, type RangeEndInput } from "@shared/schemas/taxa";
import type { Trait } from "@shared/schemas/traits";
import { Button } from "../../components/Button";
import { FormError } from "../../components/Notice";
import { Select } from "../../components/Select";
import { TextField } from "../../components/TextField";
import { useToast } from "../../components/Toast";
import { formLevelMessage, issuesToFieldErrors, type FieldErrors } from "../../lib/forms";
import { formatCount, pluralize } from "../../lib/format";
import { ApiError } from "../../lib/api";
import { useBulkEditTaxa } from "./api";
import { INTERVAL_LIST_ID } from "./CellEditor";
import { decimalCommaProblem } from "./cellValues";
import { ModalDialog } from "../../components/ModalDialog";
import { useIntervalLookup } from "../../lib/queries/timeBins";

const CLEAR = "__clear__";
const TAXON_FIELDS = [
  { value: "higherTaxon", label: "Higher taxon" },
  { value: "fad", label: "First appearance" },
  { value: "lad", label: "Last appearance" },
  { value: "notes", label: "Notes" },
];

interface BulkEditDialogProps {
  open: boolean;
  studyId: string;
  taxonIds: string[];
  traits: Trait[];
  onClose: () => void;
  onDone: () => void;
}

/** One value for every selected taxon, with one reason shared by all the coding decisions. */
export function BulkEditDialog({ open, ...rest }: BulkEditDialogProps) {
  return (
    <ModalDialog open={open} title={`Edit ${pluralize(rest.taxonIds.length, "selected taxon", "selected taxa")}`} onClose={rest.onClose} width="lg">
      {open && <BulkEditForm {...rest} />}
    </ModalDialog>
  );
}

function BulkEditForm({ studyId, taxonIds, traits, onClose, onDone }: Omit<BulkEditDialogProps, "open">) {
  const active = traits.filter((t) => !t.retired);
  const [field, setField] = useState(active[0]?.id ?? "higherTaxon");
  const [value, setValue] = useState("");
  const [reason, setReason] = useState("");
  const [errors, setErrors] = useState<FieldErrors>({});
  const bulk = useBulkEditTaxa(studyId);
  const intervals = useIntervalLookup(studyId);
  const toast = useToast();
  const trait = active.find((t) => t.id === field);

  /** The value as the API takes it, read like a grid cell; a message when it cannot be read. */
  function readValue(): { ok: true; value: string | number | RangeEndInput } | { ok: false; message: string } {
    if (trait) {
      if (trait.kind !== "numeric" && value === "") return { ok: false, message: "Choose a state, or choose to clear the value" };
      if (value === CLEAR || value.trim() === "") return { ok: true, value: null };
      const comma = trait.kind === "numeric" ? decimalCommaProblem(value) : null;
      if (comma) return { ok: false, message: comma };
      const read = readTraitCell(trait, value, { decimalComma: false });
      if (!read.ok) return read;
      if (read.value === null) return { ok: true, value: null };
      const checked = checkTraitValue(trait, read.value);
      return checked.ok ? { ok: true, value: checked.value } : checked;
    }
    if (field === "fad" || field === "lad") {
      const comma = decimalCommaProblem(value);
      if (comma) return { ok: false, message: comma };
      const read = readRangeCell(value, field, { decimalComma: false, intervals });
      if (!read.ok) return read;
      if (read.value === null) return { ok: true, value: null };
      return { ok: true, value: read.value.interval ? { interval: read.value.interval } : { ma: read.value.ma } };
    }
    return { ok: true, value: value.trim() };
  }

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const read = readValue();
    const problems: FieldErrors = {};
    if (!read.ok) problems.value = read.message;
    const parsed = taxaBulkEditSchema.safeParse({ taxonIds, field, value: read.ok ? read.value : null, reason });
    if (!parsed.success) Object.assign(problems, issuesToFieldErrors(parsed.error), problems);
    if (Object.keys(problems).length > 0 || !parsed.success) {
      setErrors(problems);
      return;
    }
    bulk.mutate(parsed.data, {
      onSuccess: (result) => {
        toast.show(
          result.changed === 0
            ? "Nothing changed: every selected taxon already held this value."
            : `Changed ${pluralize(result.changed, "taxon", "taxa")}${result.unchanged > 0 ? `; ${formatCount(result.unchanged)} already held the value` : ""}.`,
        );
        onDone();
      },
      onError: (error) => {
        if (error instanceof ApiError) setErrors(error.fields);
      },
    });
  }

  const fieldOptions = [...active.map((t) => ({ value: t.id, label: t.label })), ...TAXON_FIELDS];

  return (
    <form noValidate onSubmit={submit} className="space-y-5">
      <FormError message={formLevelMessage(bulk.error)} />
      {errors.taxonIds && <p className="text-sm font-medium text-red-700">{errors.taxonIds}</p>}
      <div className="grid gap-5 sm:grid-cols-2">
        <Select
          label="Column"
          options={fieldOptions}
          value={field}
          error={errors.field}
          onChange={(e) => {
            setField(e.target.value);
            setValue("");
            setErrors({});
          }}
        />
        {trait && trait.kind !== "numeric" ? (
          <Select
            label="New value"
            options={[{ value: "", label: "Choose a state…" }, ...trait.states.map((s) => ({ value: s.code, label: `${s.label} (${s.code})` })), { value: CLEAR, label: "Clear (leave missing)" }]}
            value={value}
            error={errors.value}
            onChange={(e) => {
              setValue(e.target.value);
              setErrors((x) => ({ ...x, value: "" }));
            }}
          />
        ) : (
          <TextField
            label="New value"
            hint={
              trait
                ? `A number${trait.unit ? ` in ${trait.unit}` : ""}; empty clears it.`
                : field === "fad" || field === "lad"
                  ? "An age in Ma or an interval name; empty clears it."
                  : "Empty clears it."
            }
            list={field === "fad" || field === "lad" ? INTERVAL_LIST_ID : undefined}
            inputMode={trait ? "decimal" : undefined}
            value={value}
            error={errors.value}
            autoComplete="off"
            onChange={(e) => {
              setValue(e.target.value);
              setErrors((x) => ({ ...x, value: "" }));
            }}
          />
        )}
      </div>
      <TextField
        label="Reason"
        hint="One reason, recorded on every change this edit makes."
        value={reason}
        error={errors.reason}
        autoComplete="off"
        onChange={(e) => {
          setReason(e.target.value);
          setErrors((x) => ({ ...x, reason: "" }));
        }}
      />
      <div className="flex flex-col-reverse gap-3 sm:flex-row sm:justify-end">
        <Button variant="secondary" onClick={onClose} disabled={bulk.isPending}>
          Cancel
        </Button>
        <Button type="submit" busy={bulk.isPending}>
          Apply to {pluralize(taxonIds.length, "taxon", "taxa")}
        </Button>
      </div>
    </form>
  );
}
