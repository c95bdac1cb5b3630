import { useRef, useState } from "react";
import type { ThreadTargetInput } from "@shared/schemas/threads";
import { buttonClasses, type ButtonSize, type ButtonVariant } from "../Button";
import { useThreads } from "./api";
import { ThreadDrawer } from "./ThreadDrawer";

interface DiscussButtonProps {
  studyId: string;
  target: ThreadTargetInput;
  /** The target in words, e.g. the run “Crisis at the base of the Turonian”. */
  targetLabel: string;
  variant?: ButtonVariant;
  size?: ButtonSize;
}

/**
 * "Discuss" for one thing on a page (a run, a comparison): opens its threads in the side panel,
 * with the number of open ones beside the word. Focus comes back to the button when the panel closes.
 */
export function DiscussButton({ studyId, target, targetLabel, variant = "ghost", size = "sm" }: DiscussButtonProps) {
  const [open, setOpen] = useState(false);
  const buttonRef = useRef<HTMLButtonElement>(null);
  // The same list the panel reads, so opening it asks nothing new.
  const threads = useThreads(studyId, { targetType: target.type, targetId: target.id, traitId: target.traitId, status: "all", pageSize: 100 });
  const openCount = threads.data?.counts.open ?? 0;

  return (
    <>
      <button ref={buttonRef} type="button" className={buttonClasses(variant, size)} aria-haspopup="dialog" aria-expanded={open} onClick={() => setOpen(true)}>
        Discuss
        {openCount > 0 && (
          <span className="rounded-full bg-caution-50 px-1.5 text-xs font-semibold text-caution-700 ring-1 ring-caution-200 tabular-nums">
            {openCount} open
          </span>
        )}
      </button>
      {open && (
        <ThreadDrawer
          studyId={studyId}
          target={target}
          targetLabel={targetLabel}
          onClose={() => {
            setOpen(false);
            buttonRef.current?.focus();
          }}
        />
      )}
    </>
  );
}
