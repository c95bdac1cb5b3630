import { useId, useLayoutEffect, useRef, useState, type KeyboardEvent } from "react";
import { MARKDOWN_MAX_LENGTH } from "@shared/markdown";
import { controlClasses, FieldShell } from "../Field";
import { cx } from "../../lib/cx";
import { Avatar } from "../Avatar";
import { formatCount } from "../../lib/format";
import { matchMembers, mentionQueryAt, type Mentionable } from "./mentions";

interface MentionComposerProps {
  label: string;
  value: string;
  onChange: (value: string) => void;
  members: readonly Mentionable[];
  error?: string;
  hint?: string;
  rows?: number;
  placeholder?: string;
  /** Ctrl+Enter (or Cmd+Enter) sends. */
  onSubmitShortcut?: () => void;
  disabled?: boolean;
  name?: string;
}

const MAX_SUGGESTIONS = 8;

/**
 * A post's text area. Typing "@" lists the study's members (arrows choose, Enter or Tab picks,
 * Escape closes); picking writes "@Name" into the text.
 */
export function MentionComposer({ label, value, onChange, members, error, hint, rows = 4, placeholder, onSubmitShortcut, disabled, name }: MentionComposerProps) {
  const ref = useRef<HTMLTextAreaElement>(null);
  const listId = useId();
  const [caret, setCaret] = useState(0);
  const [active, setActive] = useState(0);
  const [dismissedAt, setDismissedAt] = useState<number | null>(null);
  // Where the caret goes once a picked name is in the text: set right after that render, before the
  // next key is handled (a later frame would let fast typing land ahead of it).
  const caretAfterPick = useRef<number | null>(null);
  useLayoutEffect(() => {
    const position = caretAfterPick.current;
    if (position === null || !ref.current) return;
    caretAfterPick.current = null;
    ref.current.focus();
    ref.current.setSelectionRange(position, position);
  });

  const typing = mentionQueryAt(value, caret);
  // A completed "@Name " is not a question any more.
  const completed = typing ? members.some((m) => typing.query.startsWith(`${m.name} `)) : false;
  const suggestions = typing && !completed && dismissedAt !== typing.start ? matchMembers(typing.query, members).slice(0, MAX_SUGGESTIONS) : [];
  const open = suggestions.length > 0;
  const activeIndex = Math.min(active, Math.max(0, suggestions.length - 1));

  const pick = (member: Mentionable) => {
    if (!typing) return;
    const next = `${value.slice(0, typing.start)}@${member.name} ${value.slice(caret)}`;
    const position = typing.start + member.name.length + 2;
    caretAfterPick.current = position;
    onChange(next);
    setCaret(position);
    setActive(0);
  };

  const onKeyDown = (event: KeyboardEvent<HTMLTextAreaElement>) => {
    if (open) {
      if (event.key === "ArrowDown" || event.key === "ArrowUp") {
        event.preventDefault();
        const step = event.key === "ArrowDown" ? 1 : -1;
        setActive((activeIndex + step + suggestions.length) % suggestions.length);
        return;
      }
      if (event.key === "Enter" || event.key === "Tab") {
        event.preventDefault();
        pick(suggestions[activeIndex]);
        return;
      }
      if (event.key === "Escape") {
        // Closes the list only; a second Escape reaches the panel around the composer.
        event.preventDefault();
        event.stopPropagation();
        setDismissedAt(typing!.start);
        return;
      }
    }
    if (event.key === "Enter" && (event.ctrlKey || event.metaKey) && onSubmitShortcut) {
      event.preventDefault();
      onSubmitShortcut();
    }
  };

  const remaining = MARKDOWN_MAX_LENGTH - value.length;
  const counter = remaining < 500 ? `${formatCount(Math.max(0, remaining))} characters left` : null;

  return (
    <FieldShell label={label} hint={[hint, counter].filter(Boolean).join(" · ") || undefined} error={error}>
      {({ id, describedBy, invalid }) => (
        <div className="relative">
          <textarea
            ref={ref}
            id={id}
            name={name}
            rows={rows}
            value={value}
            disabled={disabled}
            placeholder={placeholder}
            maxLength={MARKDOWN_MAX_LENGTH}
            aria-describedby={describedBy}
            aria-invalid={invalid || undefined}
            aria-autocomplete="list"
            // A text area is a textbox, which takes no aria-expanded; the open list is named by aria-controls.
            aria-controls={open ? listId : undefined}
            aria-activedescendant={open ? `${listId}-${activeIndex}` : undefined}
            onChange={(event) => {
              onChange(event.target.value);
              setCaret(event.target.selectionStart);
              setActive(0);
            }}
            onSelect={(event) => setCaret(event.currentTarget.selectionStart)}
            onKeyDown={onKeyDown}
            onBlur={() => window.setTimeout(() => typing && setDismissedAt(typing.start), 150)}
            onFocus={() => setDismissedAt(null)}
            className={cx(controlClasses(invalid), "py-2 leading-relaxed")}
          />
          {open && (
            <ul
              id={listId}
              role="listbox"
              aria-label="Members to mention"
              className="absolute inset-x-0 top-full z-50 mt-1 max-h-64 overflow-y-auto rounded-lg border border-stone-200 bg-white p-1 shadow-lg"
            >
              {suggestions.map((member, i) => (
                <li
                  key={member.id}
                  id={`${listId}-${i}`}
                  role="option"
                  aria-selected={i === activeIndex}
                  // Keeps the text area focused: the pick happens without a blur.
                  onMouseDown={(event) => {
                    event.preventDefault();
                    pick(member);
                  }}
                  onMouseEnter={() => setActive(i)}
                  className={cx("flex cursor-pointer items-center gap-2 rounded-md px-2 py-1.5 text-[15px]", i === activeIndex ? "bg-accent-50 text-accent-900" : "text-stone-800")}
                >
                  <Avatar name={member.name} className="size-6 text-[10px]" />
                  {member.name}
                </li>
              ))}
            </ul>
          )}
        </div>
      )}
    </FieldShell>
  );
}
