import { useEffect, useId, useRef } from "react";
import { Button } from "../Button";
import { focusRing } from "../focus";
import { cx } from "../../lib/cx";
import { ThreadPanel, type ThreadPanelProps } from "./ThreadPanel";

interface ThreadDrawerProps extends ThreadPanelProps {
  onClose: () => void;
}

/** The thread panel in a side panel over the page (codebook, overrides): Escape or Close leaves it. */
export function ThreadDrawer({ onClose, ...panel }: ThreadDrawerProps) {
  const titleId = useId();
  const headingRef = useRef<HTMLHeadingElement>(null);
  useEffect(() => {
    headingRef.current?.focus();
  }, [panel.target.type, panel.target.id, panel.target.traitId]);

  return (
    <div
      role="dialog"
      aria-modal="false"
      aria-labelledby={titleId}
      onKeyDown={(event) => {
        if (event.key === "Escape") {
          event.stopPropagation();
          onClose();
        }
      }}
      className="fixed inset-y-0 right-0 z-40 flex w-full max-w-lg flex-col border-l border-stone-200 bg-white shadow-2xl"
    >
      <header className="flex items-start justify-between gap-3 border-b border-stone-100 px-5 py-4">
        <div className="min-w-0">
          <p className="text-sm font-medium text-accent-700">Discussion</p>
          <h2 id={titleId} ref={headingRef} tabIndex={-1} className={cx("rounded text-lg font-semibold tracking-tight text-stone-900", focusRing)}>
            {panel.targetLabel}
          </h2>
        </div>
        <Button variant="ghost" size="sm" onClick={onClose}>
          Close<span className="sr-only"> discussion</span>
        </Button>
      </header>
      <div className="min-h-0 flex-1 overflow-y-auto px-5 py-4">
        <ThreadPanel {...panel} />
      </div>
    </div>
  );
}
