import { useState } from "react";
import { requiredReasonSchema, type TaxonConflict } from "@shared/schemas/taxa";
import type { Trait } from "@shared/schemas/traits";
import { Button } from "../../components/Button";
import { TextField } from "../../components/TextField";
import { formatDateTime } from "../../lib/format";
import { isEmptyValue } from "./cellValues";
import { ModalDialog } from "../../components/ModalDialog";
import { ValueText } from "./ValueText";

const FIELD_LABELS: Record<string, string> = { name: "Name", higherTaxon: "Higher taxon", notes: "Notes", fad: "First appearance", lad: "Last appearance" };

interface ConflictDialogProps {
  conflict: TaxonConflict | null;
  taxonName: string;
  traits: Map<string, Trait>;
  /** The reason already given with the edit, if any. */
  reason: string;
  busy: boolean;
  onKeepMine: (reason: string) => void;
  onTakeCurrent: () => void;
  onClose: () => void;
}

/**
 * Someone saved this taxon after it was loaded: both values side by side, who set the current one,
 * and the choice to keep one's own (sent again on top of the new version) or take the current.
 */
export function ConflictDialog({ conflict, ...rest }: ConflictDialogProps) {
  return (
    <ModalDialog
      open={conflict !== null}
      width="lg"
      title="This value was changed meanwhile"
      description={<>Someone saved <span className="italic">{rest.taxonName}</span> after you opened the page. Choose which value stays.</>}
      onClose={rest.onClose}
      busy={rest.busy}
    >
      {conflict && <ConflictChoice conflict={conflict} {...rest} />}
    </ModalDialog>
  );
}

function ConflictChoice({ conflict, traits, reason: givenReason, busy, onKeepMine, onTakeCurrent }: Omit<ConflictDialogProps, "conflict"> & { conflict: TaxonConflict }) {
  const [reason, setReason] = useState(givenReason);
  const [reasonError, setReasonError] = useState<string | undefined>();
  // Keeping one's own value over a recorded one replaces it: that needs a reason.
  const needsReason = conflict.conflicts.some((c) => !isEmptyValue(c.currentValue));

  function keepMine() {
    if (needsReason) {
      const checked = requiredReasonSchema.safeParse(reason);
      if (!checked.success) {
        setReasonError(checked.error.issues[0].message);
        return;
      }
      onKeepMine(checked.data);
    } else onKeepMine(reason);
  }

  return (
    <div>
      <div className="overflow-x-auto rounded-lg border border-stone-200">
        <table className="w-full text-left text-sm">
          <thead className="bg-stone-50 text-stone-600">
            <tr>
              <th scope="col" className="px-3 py-2 font-semibold">Field</th>
              <th scope="col" className="px-3 py-2 font-semibold">Your value</th>
              <th scope="col" className="px-3 py-2 font-semibold">Current value</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-stone-100">
            {conflict.conflicts.map((c) => (
              <tr key={c.field} className="align-top">
                <th scope="row" className="px-3 py-2 font-medium text-stone-800">
                  {c.traitId ? (traits.get(c.traitId)?.label ?? "Trait") : (FIELD_LABELS[c.field] ?? c.field)}
                </th>
                <td className="px-3 py-2">
                  <ValueText field={c.traitId ?? c.field} value={c.yourValue} traits={traits} />
                </td>
                <td className="px-3 py-2">
                  <ValueText field={c.traitId ?? c.field} value={c.currentValue} traits={traits} />
                  <p className="mt-0.5 text-xs text-stone-500">
                    {c.setBy ? `Set by ${c.setBy.name}` : "Set"}
                    {c.setAt && `, ${formatDateTime(c.setAt)}`}
                  </p>
                  {c.reason && <p className="mt-0.5 text-xs text-stone-600">“{c.reason}”</p>}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {needsReason && (
        <TextField
          label="Reason for keeping your value"
          value={reason}
          error={reasonError}
          onChange={(e) => {
            setReason(e.target.value);
            setReasonError(undefined);
          }}
          className="mt-4"
        />
      )}
      <div className="mt-6 flex flex-col-reverse gap-3 sm:flex-row sm:justify-end">
        <Button variant="secondary" onClick={onTakeCurrent} disabled={busy}>
          Take the current value
        </Button>
        <Button onClick={keepMine} busy={busy}>
          Keep my value
        </Button>
      </div>
    </div>
  );
}
