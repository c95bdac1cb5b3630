import { useState, type FormEvent, type ReactNode } from "react";
import { requiredReasonSchema } from "@shared/schemas/taxa";
import { Button } from "../../components/Button";
import { FormError } from "../../components/Notice";
import { TextField } from "../../components/TextField";
import { ModalDialog } from "../../components/ModalDialog";

interface ReasonDialogProps {
  open: boolean;
  title: ReactNode;
  /** What changes, from what to what. */
  summary: ReactNode;
  confirmLabel: string;
  busy?: boolean;
  error?: string | null;
  onConfirm: (reason: string) => void;
  onCancel: () => void;
}

/** Asks why before a recorded value is replaced, cleared or reverted; the reason joins the record. */
export function ReasonDialog({ open, ...rest }: ReasonDialogProps) {
  return (
    <ModalDialog open={open} title={rest.title} onClose={rest.onCancel} busy={rest.busy}>
      {/* Mounted per opening, so every question starts with an empty reason. */}
      {open && <ReasonForm {...rest} />}
    </ModalDialog>
  );
}

function ReasonForm({ summary, confirmLabel, busy, error, onConfirm, onCancel }: Omit<ReasonDialogProps, "open" | "title">) {
  const [reason, setReason] = useState("");
  const [fieldError, setFieldError] = useState<string | undefined>();

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const checked = requiredReasonSchema.safeParse(reason);
    if (!checked.success) {
      setFieldError(checked.error.issues[0].message);
      return;
    }
    onConfirm(checked.data);
  }

  return (
    <form noValidate onSubmit={submit}>
      <div className="rounded-lg bg-stone-50 px-3 py-2 text-[15px] text-stone-800">{summary}</div>
      <FormError message={error} className="mt-3" />
      <TextField
        label="Reason"
        hint="Kept with the change in the cell's history."
        value={reason}
        error={fieldError}
        autoFocus
        autoComplete="off"
        onChange={(e) => {
          setReason(e.target.value);
          setFieldError(undefined);
        }}
        className="mt-4"
      />
      <div className="mt-6 flex flex-col-reverse gap-3 sm:flex-row sm:justify-end">
        <Button variant="secondary" onClick={onCancel} disabled={busy}>
          Cancel
        </Button>
        <Button type="submit" busy={busy}>
          {confirmLabel}
        </Button>
      </div>
    </form>
  );
}
