import { useState } from "react";
import { taxonConflictSchema, taxonUpdateSchema, type TaxonConflict, type TaxonRow } from "@shared/schemas/taxa";
import type { Trait } from "@shared/schemas/traits";
import { useToast } from "../../components/Toast";
import { ApiError, errorMessage } from "../../lib/api";
import { useReplaceRow, useUpdateTaxon } from "./api";
import { isEmptyValue, type CellChange, type GridColumn } from "./cellValues";
import { ConflictDialog } from "./ConflictDialog";
import { ReasonDialog } from "./ReasonDialog";
import { ValueText } from "./ValueText";

interface PendingEdit {
  row: TaxonRow;
  column: GridColumn;
  change: CellChange;
  version: number;
  reason: string;
}

const cellKey = (edit: PendingEdit) => `${edit.row.id}:${edit.column.id}`;
const fieldOf = (column: GridColumn) => (column.kind === "trait" || column.kind === "count" ? column.id : column.field);

/**
 * Saving one cell: a reason is asked first when a recorded value is replaced or cleared; the edit
 * carries the row version it is based on, and a 409 opens the choice between both values.
 */
export function useCellEdits(studyId: string, traits: Map<string, Trait>) {
  const update = useUpdateTaxon(studyId);
  const takeCurrent = useReplaceRow(studyId);
  const toast = useToast();
  const [askReason, setAskReason] = useState<PendingEdit | null>(null);
  const [conflict, setConflict] = useState<{ edit: PendingEdit; body: TaxonConflict } | null>(null);
  const [saving, setSaving] = useState<ReadonlySet<string>>(new Set());
  const [lastSaved, setLastSaved] = useState<string | null>(null);

  const mark = (key: string, on: boolean) =>
    setSaving((current) => {
      const next = new Set(current);
      if (on) next.add(key);
      else next.delete(key);
      return next;
    });

  function send(edit: PendingEdit) {
    const input = { version: edit.version, changes: edit.change.changes, reason: edit.reason };
    const parsed = taxonUpdateSchema.safeParse(input);
    if (!parsed.success) {
      toast.show(parsed.error.issues[0]?.message ?? "This value cannot be saved.", "error");
      return;
    }
    const key = cellKey(edit);
    mark(key, true);
    update.mutate(
      { taxonId: edit.row.id, input },
      {
        onSuccess: () => {
          setAskReason(null);
          setConflict(null);
          setLastSaved(`Saved ${edit.column.label} of ${edit.row.name}.`);
        },
        onError: (error) => {
          setAskReason(null);
          if (error instanceof ApiError && error.status === 409) {
            const body = taxonConflictSchema.safeParse(error.body);
            if (body.success) {
              setConflict({ edit, body: body.data });
              return;
            }
          }
          setConflict(null);
          toast.show(`${edit.column.label} of ${edit.row.name} was not saved: ${errorMessage(error)}`, "error");
        },
        onSettled: () => mark(key, false),
      },
    );
  }

  function commit(row: TaxonRow, column: GridColumn, change: CellChange): "sending" | "asking" {
    const edit: PendingEdit = { row, column, change, version: row.version, reason: "" };
    if (isEmptyValue(change.oldValue)) {
      send(edit);
      return "sending";
    }
    setAskReason(edit);
    return "asking";
  }

  const field = askReason ? fieldOf(askReason.column) : "";
  const dialogs = (
    <>
      <ReasonDialog
        open={askReason !== null}
        title={askReason && isEmptyValue(askReason.change.newValue) ? "Why clear this value?" : "Why change this value?"}
        summary={
          askReason && (
            <>
              {askReason.column.label} of <span className="italic">{askReason.row.name}</span>: <ValueText field={field} value={askReason.change.oldValue} traits={traits} />{" "}
              <span aria-hidden="true">→</span>
              <span className="sr-only">to</span> <ValueText field={field} value={askReason.change.newValue} traits={traits} />
            </>
          )
        }
        confirmLabel="Save change"
        busy={update.isPending && askReason !== null}
        onCancel={() => setAskReason(null)}
        onConfirm={(reason) => askReason && send({ ...askReason, reason })}
      />
      <ConflictDialog
        conflict={conflict?.body ?? null}
        taxonName={conflict?.edit.row.name ?? ""}
        traits={traits}
        reason={conflict?.edit.reason ?? ""}
        busy={update.isPending}
        onClose={() => setConflict(null)}
        onTakeCurrent={() => {
          if (conflict) takeCurrent(conflict.body.taxon);
          setConflict(null);
        }}
        onKeepMine={(reason) => conflict && send({ ...conflict.edit, version: conflict.body.currentVersion, reason, row: conflict.body.taxon })}
      />
    </>
  );

  return { commit, saving, lastSaved, dialogs };
}
