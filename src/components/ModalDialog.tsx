import type { ReactNode } from "react";
import { cx } from "../lib/cx";
import { useModalDialog } from "./useModalDialog";

interface ModalDialogProps {
  open: boolean;
  title: ReactNode;
  description?: ReactNode;
  /** Escape and the backdrop close it unless busy. */
  onClose: () => void;
  busy?: boolean;
  width?: "md" | "lg";
  children: ReactNode;
}

/**
 * A modal built on the browser's <dialog>: it keeps focus inside, closes on Escape and gives
 * focus back to the cell or button that opened it.
 */
export function ModalDialog({ open, title, description, onClose, busy = false, width = "md", children }: ModalDialogProps) {
  const { titleId, dialogProps } = useModalDialog(open, busy, onClose);
  return (
    <dialog
      {...dialogProps}
      className={cx(
        "m-auto w-[calc(100%-2rem)] rounded-xl border border-stone-200 bg-white p-0 text-stone-900 shadow-xl backdrop:bg-stone-900/45",
        width === "lg" ? "max-w-2xl" : "max-w-md",
      )}
    >
      {open && (
        <div className="px-6 py-5">
          <h2 id={titleId} className="text-lg font-semibold tracking-tight">
            {title}
          </h2>
          {description && <div className="mt-1 text-[15px] text-stone-600">{description}</div>}
          <div className="mt-4">{children}</div>
        </div>
      )}
    </dialog>
  );
}
