import type { ReactNode } from "react";
import { ApiError, errorMessage, NETWORK_ERROR_CODE } from "../lib/api";
import { Button } from "./Button";
import { cx } from "../lib/cx";

export interface ErrorStateProps {
  error: unknown;
  title?: ReactNode;
  /** Offered when trying again can help (network trouble, server errors). */
  onRetry?: () => void;
  /** More ways out, e.g. a link back to the studies. */
  actions?: ReactNode;
  className?: string;
}

function retryCanHelp(error: unknown): boolean {
  if (!(error instanceof ApiError)) return true;
  return error.code === NETWORK_ERROR_CODE || error.status >= 500 || error.status === 429;
}

/** A failed load: what went wrong in plain words, and a way to try again. */
export function ErrorState({ error, title = "This could not be loaded", onRetry, actions, className }: ErrorStateProps) {
  return (
    <div role="alert" className={cx("rounded-xl border border-red-200 bg-red-50/60 px-5 py-5 sm:px-6", className)}>
      <div className="flex items-start gap-3">
        <svg className="mt-0.5 size-5 shrink-0 text-red-700" viewBox="0 0 20 20" fill="currentColor" aria-hidden="true">
          <path
            fillRule="evenodd"
            d="M8.485 2.495c.673-1.167 2.357-1.167 3.03 0l6.28 10.875c.673 1.167-.17 2.625-1.516 2.625H3.72c-1.347 0-2.189-1.458-1.515-2.625L8.485 2.495ZM10 5a.75.75 0 0 1 .75.75v3.5a.75.75 0 0 1-1.5 0v-3.5A.75.75 0 0 1 10 5Zm0 9a1 1 0 1 0 0-2 1 1 0 0 0 0 2Z"
            clipRule="evenodd"
          />
        </svg>
        <div className="min-w-0">
          <p className="font-semibold text-red-900">{title}</p>
          <p className="mt-1 text-[15px] text-red-800">{errorMessage(error)}</p>
          {((onRetry && retryCanHelp(error)) || actions) && (
            <div className="mt-4 flex flex-wrap gap-3">
              {onRetry && retryCanHelp(error) && (
                <Button variant="secondary" size="sm" onClick={onRetry}>
                  Try again
                </Button>
              )}
              {actions}
            </div>
          )}
        </div>
      </div>
    </div>
  );
}
