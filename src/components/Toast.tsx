import { createContext, useCallback, useContext, useMemo, useRef, useState, type ReactNode } from "react";
import { focusRing } from "./focus";
import { cx } from "../lib/cx";

export type ToastTone = "success" | "info" | "error";

interface ToastItem {
  id: number;
  message: string;
  tone: ToastTone;
  key?: string;
}

export interface ToastOptions {
  /**
   * Names a toast that follows something going on (a run in the queue): showing again with the same
   * key replaces its words in place, and `dismiss(key)` takes it away once the thing it reports is over.
   * It stays until then (at most a minute, in case nothing on screen follows it any more).
   */
  key?: string;
}

interface ToastApi {
  /** A short confirmation that outlives a page change, e.g. "Study deleted". */
  show: (message: string, tone?: ToastTone, options?: ToastOptions) => void;
  /** Changes the words of the toast with this key, if it is still shown (never brings one back). */
  update: (key: string, message: string, tone?: ToastTone) => void;
  /** Takes away the toast with this key, if it is shown. */
  dismiss: (key: string) => void;
}

const ToastContext = createContext<ToastApi | null>(null);

const TOAST_VISIBLE_MS = 6000;
/** A keyed toast leaves when its owner dismisses it; this only bounds one whose owner went away. */
const FOLLOWING_TOAST_MAX_MS = 60_000;

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
    (message: string, tone: ToastTone = "success", options: ToastOptions = {}) => {
      const id = nextId.current++;
      const { key } = options;
      setToasts((current) => [...current.filter((t) => key === undefined || t.key !== key).slice(-2), { id, message, tone, key }]);
      window.setTimeout(() => dismiss(id), key === undefined ? TOAST_VISIBLE_MS : FOLLOWING_TOAST_MAX_MS);
    },
    [dismiss],
  );

  const update = useCallback((key: string, message: string, tone?: ToastTone) => {
    setToasts((current) => (current.some((t) => t.key === key) ? current.map((t) => (t.key === key ? { ...t, message, tone: tone ?? t.tone } : t)) : current));
  }, []);

  const dismissKey = useCallback((key: string) => setToasts((current) => (current.some((t) => t.key === key) ? current.filter((t) => t.key !== key) : current)), []);

  const value = useMemo(() => ({ show, update, dismiss: dismissKey }), [show, update, dismissKey]);

  return (
    <ToastContext value={value}>
      {children}
      <div aria-live="polite" className="pointer-events-none fixed inset-x-4 bottom-4 z-50 flex flex-col items-end gap-2 sm:left-auto sm:w-96">
        {toasts.map((toast) => (
          <div
            key={toast.id}
            role={toast.tone === "error" ? "alert" : "status"}
            data-toast-key={toast.key}
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
