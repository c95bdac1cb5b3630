import { createContext, useCallback, useContext, useMemo, useRef, useState, type ReactNode } from "react";
import { focusRing } from "./focus";
import { cx } from "../lib/cx";

export type ToastTone = "success" | "info" | "error";

interface ToastItem {
  id: number;
  message: string;
  tone: ToastTone;
}

interface ToastApi {
  /** A short confirmation that outlives a page change, e.g. "Study deleted". */
  show: (message: string, tone?: ToastTone) => void;
}

const ToastContext = createContext<ToastApi | null>(null);

const TOAST_VISIBLE_MS = 6000;

const tones: Record<ToastTone, { box: string; mark: string }> = {
  success: { box: "border-accent-200 text-stone-900", mark: "bg-accent-600" },
  info: { box: "border-stone-200 text-stone-900", mark: "bg-stone-500" },
  error: { box: "border-red-200 text-red-900", mark: "bg-red-600" },
};

export function ToastProvider({ children }: { children: ReactNode }) {
  const [toasts, setToasts] = useState<ToastItem[]>([]);
  const nextId = useRef(1);

  const dismiss = useCallback((id: number) => setToasts((current) => current.filter((t) => t.id !== id)), []);

  const show = useCallback(
    (message: string, tone: ToastTone = "success") => {
      const id = nextId.current++;
      setToasts((current) => [...current.slice(-2), { id, message, tone }]);
      window.setTimeout(() => dismiss(id), TOAST_VISIBLE_MS);
    },
    [dismiss],
  );

  const value = useMemo(() => ({ show }), [show]);

  return (
    <ToastContext value={value}>
      {children}
      <div aria-live="polite" className="pointer-events-none fixed inset-x-4 bottom-4 z-50 flex flex-col items-end gap-2 sm:left-auto sm:w-96">
        {toasts.map((toast) => (
          <div
            key={toast.id}
            role={toast.tone === "error" ? "alert" : "status"}
            className={cx("pointer-events-auto flex w-full items-start gap-3 rounded-lg border bg-white py-3 pr-2 pl-4 shadow-lg", tones[toast.tone].box)}
          >
            <span className={cx("mt-2 size-2 shrink-0 rounded-full", tones[toast.tone].mark)} aria-hidden="true" />
            <p className="min-w-0 flex-1 text-[15px]">{toast.message}</p>
            <button
              type="button"
              onClick={() => dismiss(toast.id)}
              className={cx("rounded-md px-2 py-0.5 text-sm text-stone-500 hover:bg-stone-100 hover:text-stone-900", focusRing)}
            >
              Dismiss
            </button>
          </div>
        ))}
      </div>
    </ToastContext>
  );
}

export function useToast(): ToastApi {
  const api = useContext(ToastContext);
  if (!api) throw new Error("useToast() needs a <ToastProvider> above it.");
  return api;
}
