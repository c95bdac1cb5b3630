import { useEffect, useId, useRef, type DialogHTMLAttributes, type RefObject } from "react";

/**
 * Keeps a native <dialog> shown as a modal exactly while `open` is true. Escape asks to close
 * (refused while busy), and a close the browser makes on its own is reported too, so `open`
 * stays in step with the dialog.
 */
export function useModalDialog(open: boolean, busy: boolean, onClose: () => void) {
  const ref = useRef<HTMLDialogElement>(null);
  const titleId = useId();
  useEffect(() => {
    const dialog = ref.current;
    if (!dialog) return;
    if (open && !dialog.open) dialog.showModal();
    if (!open && dialog.open) dialog.close();
  }, [open]);
  const dialogProps: DialogHTMLAttributes<HTMLDialogElement> & { ref: RefObject<HTMLDialogElement | null> } = {
    ref,
    "aria-labelledby": titleId,
    onCancel: (event) => {
      event.preventDefault();
      if (!busy) onClose();
    },
    onClose: () => {
      if (open) onClose();
    },
  };
  return { titleId, dialogProps };
}
