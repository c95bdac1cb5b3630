import { useEffect, useId, useRef, useState, type ReactNode } from "react";
import { buttonClasses } from "../../components/Button";
import { cx } from "../../components/focus";

interface PopoverProps {
  label: ReactNode;
  /** Names the panel for screen readers. */
  title: string;
  align?: "start" | "end";
  children: ReactNode;
}

/** A button that opens a small panel below it; Escape or a click outside closes it. */
export function Popover({ label, title, align = "end", children }: PopoverProps) {
  const [open, setOpen] = useState(false);
  const panelId = useId();
  const rootRef = useRef<HTMLDivElement>(null);
  const buttonRef = useRef<HTMLButtonElement>(null);

  useEffect(() => {
    if (!open) return;
    const onPointer = (event: PointerEvent) => {
      if (!rootRef.current?.contains(event.target as Node)) setOpen(false);
    };
    document.addEventListener("pointerdown", onPointer);
    return () => document.removeEventListener("pointerdown", onPointer);
  }, [open]);

  return (
    <div
      ref={rootRef}
      className="relative"
      onKeyDown={(event) => {
        if (event.key === "Escape" && open) {
          event.stopPropagation();
          setOpen(false);
          buttonRef.current?.focus();
        }
      }}
    >
      <button
        ref={buttonRef}
        type="button"
        aria-expanded={open}
        aria-controls={panelId}
        onClick={() => setOpen((o) => !o)}
        className={buttonClasses("secondary", "sm")}
      >
        {label}
        <svg className={cx("size-4 transition-transform", open && "rotate-180")} viewBox="0 0 20 20" fill="currentColor" aria-hidden="true">
          <path
            fillRule="evenodd"
            d="M5.22 8.22a.75.75 0 0 1 1.06 0L10 11.94l3.72-3.72a.75.75 0 1 1 1.06 1.06l-4.25 4.25a.75.75 0 0 1-1.06 0L5.22 9.28a.75.75 0 0 1 0-1.06Z"
            clipRule="evenodd"
          />
        </svg>
      </button>
      <div
        id={panelId}
        role="group"
        aria-label={title}
        hidden={!open}
        className={cx("absolute top-full z-30 mt-2 w-72 rounded-xl border border-stone-200 bg-white p-4 shadow-xl", align === "end" ? "right-0" : "left-0")}
      >
        {children}
      </div>
    </div>
  );
}
