import type { ReactNode } from "react";
import { Button } from "./Button";
import { useModalDialog } from "./useModalDialog";
import { FormError } from "./Notice";

export interface ConfirmDialogProps {
  open: boolean;
  title: ReactNode;
  /** What will happen, in plain words; may hold an input (e.g. type the name to confirm). */
  children?: ReactNode;
  confirmLabel: string;
  cancelLabel?: string;
  tone?: "danger" | "primary";
  busy?: boolean;
  /** Keeps the confirm button disabled, e.g. until the typed name matches. */
  confirmDisabled?: boolean;
  /** The server's answer when the action failed; the dialog stays open to show it. */
  error?: string | null;
  onConfirm: () => void;
  onCancel: () => void;
}

/**
 * A modal question before an action that cannot be undone. Uses the browser's <dialog>, which
 * keeps focus inside, closes on Escape and returns focus to the opener.
 */
export function ConfirmDialog({
  open,
  title,
  children,
  confirmLabel,
  cancelLabel = "Cancel",
  tone = "danger",
  busy = false,
  confirmDisabled = false,
  error,
  onConfirm,
  onCancel,
}: ConfirmDialogProps) {
  const { titleId, dialogProps } = useModalDialog(open, busy, onCancel);

  return (
    <dialog
      {...dialogProps}
      className="m-auto w-[calc(100%-2rem)] max-w-md rounded-xl border border-stone-200 bg-white p-0 text-stone-900 shadow-xl backdrop:bg-stone-900/45"
    >
      {open && (
        <form
          className="px-6 py-5"
          onSubmit={(event) => {
            event.preventDefault();
            if (!busy && !confirmDisabled) onConfirm();
          }}
        >
          <h2 id={titleId} className="text-lg font-semibold tracking-tight">
            {title}
          </h2>
          {children && <div className="mt-2 space-y-3 text-[15px] text-stone-700">{children}</div>}
          <FormError message={error} className="mt-4" />
          <div className="mt-6 flex flex-col-reverse gap-3 sm:flex-row sm:justify-end">
            <Button variant="secondary" onClick={onCancel} disabled={busy}>
              {cancelLabel}
            </Button>
            <Button type="submit" variant={tone === "danger" ? "danger" : "primary"} busy={busy} disabled={confirmDisabled}>
              {confirmLabel}
            </Button>
          </div>
        </form>
      )}
    </dialog>
  );
}
