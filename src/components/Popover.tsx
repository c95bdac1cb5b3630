import { useEffect, useId, useRef, useState, type ReactNode } from "react";
import { buttonClasses } from "./Button";
import { cx } from "../lib/cx";

interface PopoverProps {
  /** What the button shows. */
  label: ReactNode;
  /** Names the panel for screen readers. */
  title: string;
  align?: "start" | "end";
  /** The button's look; a secondary small button with a chevron by default. */
  buttonClassName?: string;
  chevron?: boolean;
  /** Width and padding of the panel. */
  panelClassName?: string;
  /** The panel closes whenever this changes (e.g. the location, so navigating closes it). */
  resetKey?: string;
  /** The panel's content; a function gets `close` for items that act and close it. */
  children: ReactNode | ((close: () => void) => ReactNode);
}

/** A button that opens a small panel below it; Escape or a click outside closes it. */
export function Popover({ label, title, align = "end", buttonClassName, chevron = true, panelClassName = "w-72 p-4", resetKey = "", children }: PopoverProps) {
  // Open "at" a reset key: a new key closes it without an effect.
  const [openAt, setOpenAt] = useState<string | null>(null);
  const open = openAt === resetKey;
  const close = () => setOpenAt(null);
  const panelId = useId();
  const rootRef = useRef<HTMLDivElement>(null);
  const buttonRef = useRef<HTMLButtonElement>(null);

  useEffect(() => {
    if (!open) return;
    const onPointer = (event: PointerEvent) => {
      if (!rootRef.current?.contains(event.target as Node)) setOpenAt(null);
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
          close();
          buttonRef.current?.focus();
        }
      }}
    >
      <button
        ref={buttonRef}
        type="button"
        aria-expanded={open}
        aria-controls={panelId}
        onClick={() => setOpenAt(open ? null : resetKey)}
        className={buttonClassName ?? buttonClasses("secondary", "sm")}
      >
        {label}
        {chevron && (
          <svg className={cx("size-4 transition-transform", open && "rotate-180")} viewBox="0 0 20 20" fill="currentColor" aria-hidden="true">
            <path
              fillRule="evenodd"
              d="M5.22 8.22a.75.75 0 0 1 1.06 0L10 11.94l3.72-3.72a.75.75 0 1 1 1.06 1.06l-4.25 4.25a.75.75 0 0 1-1.06 0L5.22 9.28a.75.75 0 0 1 0-1.06Z"
              clipRule="evenodd"
            />
          </svg>
        )}
      </button>
      <div
        id={panelId}
        role="group"
        aria-label={title}
        hidden={!open}
        className={cx(
          "absolute top-full z-40 mt-2 max-w-[calc(100vw-2rem)] rounded-xl border border-stone-200 bg-white shadow-xl",
          panelClassName,
          align === "end" ? "right-0" : "left-0",
        )}
      >
        {typeof children === "function" ? children(close) : children}
      </div>
    </div>
  );
}
