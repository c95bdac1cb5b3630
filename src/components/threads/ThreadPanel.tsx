import { useEffect, useMemo, useRef, useState, type ReactNode, type RefObject } from "react";
import { can, ROLE_LABELS } from "@shared/roles";
import { threadCreateSchema, THREAD_TITLE_MAX, type ThreadDetail, type ThreadTarget, type ThreadTargetInput } from "@shared/schemas/threads";
import { Button } from "../Button";
import { ErrorState } from "../ErrorState";
import { focusRing } from "../focus";
import { cx } from "../../lib/cx";
import { LoadingState } from "../LoadingState";
import { FormError } from "../Notice";
import { TextField } from "../TextField";
import { errorMessage, isApiError } from "../../lib/api";
import { useCurrentStudy } from "../../lib/currentStudy";
import { issuesToFieldErrors, type FieldErrors } from "../../lib/forms";
import { useCreateThread, useMentionableMembers, useThreads } from "./api";
import { MentionComposer } from "./MentionComposer";
import { mentionedIds } from "./mentions";
import { ThreadListItem } from "./ThreadParts";
import { FORMATTING_HINT, ThreadView } from "./ThreadView";

export interface ThreadPanelProps {
  studyId: string;
  /** What the threads are about: a trait, a taxon, a value (taxon + trait), an override, a run or a comparison. */
  target: ThreadTargetInput;
  /** The target in words, e.g. "Body size of Vessiraspis minor". */
  targetLabel: string;
  /** Opens this thread at once (e.g. from a link). */
  initialThreadId?: string;
  /** Shown after "About …" inside a thread. */
  targetAction?: (target: ThreadTarget) => ReactNode;
}

type View = { kind: "list" } | { kind: "thread"; id: string } | { kind: "new" };

/**
 * The threads about one target, for any screen to embed: the list (open first), one thread with
 * its posts and replies, and a form to start a new one.
 */
export function ThreadPanel({ studyId, target, targetLabel, initialThreadId, targetAction }: ThreadPanelProps) {
  const study = useCurrentStudy();
  const [view, setView] = useState<View>(initialThreadId ? { kind: "thread", id: initialThreadId } : { kind: "list" });
  const threads = useThreads(studyId, { targetType: target.type, targetId: target.id, traitId: target.traitId, status: "all", pageSize: 100 });
  const mayPost = can(study.role, "threads.post");
  const backRef = useRef<HTMLButtonElement>(null);

  useEffect(() => {
    if (view.kind !== "list") backRef.current?.focus();
  }, [view]);

  if (view.kind === "thread") {
    return (
      <div>
        <BackButton buttonRef={backRef} onClick={() => setView({ kind: "list" })} />
        <ThreadView studyId={studyId} threadId={view.id} headingLevel={3} targetAction={targetAction} />
      </div>
    );
  }
  if (view.kind === "new") {
    return (
      <div>
        <BackButton buttonRef={backRef} onClick={() => setView({ kind: "list" })} />
        <NewThreadForm studyId={studyId} target={target} targetLabel={targetLabel} onCreated={(thread) => setView({ kind: "thread", id: thread.id })} onCancel={() => setView({ kind: "list" })} />
      </div>
    );
  }

  const rows = threads.data ? [...threads.data.rows].sort((a, b) => (a.status === b.status ? 0 : a.status === "open" ? -1 : 1)) : [];
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <p className="text-sm text-stone-600" aria-live="polite">
          {threads.data ? `${threads.data.counts.open} open · ${threads.data.counts.resolved} resolved` : "\u00a0"}
        </p>
        {mayPost && (
          <Button size="sm" onClick={() => setView({ kind: "new" })}>
            Start a thread
          </Button>
        )}
      </div>
      {threads.isPending && <LoadingState label="Loading the threads" lines={2} />}
      {threads.isError && <ErrorState error={threads.error} title="The threads could not be loaded" onRetry={() => void threads.refetch()} />}
      {threads.isSuccess && rows.length === 0 && (
        <div className="rounded-lg border border-dashed border-stone-300 px-4 py-6 text-center">
          <p className="font-medium text-stone-800">No thread about {targetLabel} yet.</p>
          <p className="mt-1 text-sm text-stone-600">
            {mayPost ? "Ask a question or record a doubt; mention a member with @ to bring them in." : `As ${ROLE_LABELS[study.role]} you can read threads; other roles start them.`}
          </p>
        </div>
      )}
      {rows.length > 0 && (
        <ul className="divide-y divide-stone-100 rounded-lg border border-stone-200" aria-label={`Threads about ${targetLabel}`}>
          {rows.map((thread) => (
            <li key={thread.id} className="px-4 py-3">
              <ThreadListItem
                thread={thread}
                showTarget={false}
                title={
                  <button type="button" className={cx("rounded text-left hover:text-accent-700 hover:underline", focusRing)} onClick={() => setView({ kind: "thread", id: thread.id })}>
                    {thread.title}
                  </button>
                }
              />
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}

function BackButton({ onClick, buttonRef }: { onClick: () => void; buttonRef: RefObject<HTMLButtonElement | null> }) {
  return (
    <button ref={buttonRef} type="button" onClick={onClick} className={cx("mb-4 rounded text-sm font-medium text-stone-600 hover:text-stone-900", focusRing)}>
      ← All threads about this
    </button>
  );
}

interface NewThreadFormProps {
  studyId: string;
  target: ThreadTargetInput;
  targetLabel: string;
  onCreated: (thread: ThreadDetail) => void;
  onCancel: () => void;
}

/** A new thread: an optional title and the first post, checked with the API's own schema. */
export function NewThreadForm({ studyId, target, targetLabel, onCreated, onCancel }: NewThreadFormProps) {
  const [title, setTitle] = useState("");
  const [body, setBody] = useState("");
  const [errors, setErrors] = useState<FieldErrors>({});
  const create = useCreateThread(studyId);
  const members = useMentionableMembers(studyId);
  const mentionable = useMemo(() => (members.data ?? []).map((m) => ({ id: m.userId, name: m.name })), [members.data]);

  const submit = () => {
    const parsed = threadCreateSchema.safeParse({ target, title: title.trim() || undefined, body, mentions: mentionedIds(body, mentionable) });
    if (!parsed.success) {
      setErrors(issuesToFieldErrors(parsed.error));
      return;
    }
    setErrors({});
    create.mutate(parsed.data, {
      onSuccess: onCreated,
      onError: (error) => {
        if (isApiError(error)) setErrors(error.fields);
      },
    });
  };
  const fieldsShown = ["title", "body"];
  const otherError = Object.entries(errors).find(([key]) => !fieldsShown.includes(key))?.[1];

  return (
    <form
      aria-label="Start a thread"
      noValidate
      className="space-y-4"
      onSubmit={(event) => {
        event.preventDefault();
        submit();
      }}
    >
      <p className="text-[15px] text-stone-700">
        About <span className="font-medium text-stone-900">{targetLabel}</span>
      </p>
      <FormError message={otherError ?? (create.error && !(isApiError(create.error) && Object.keys(create.error.fields).length) ? errorMessage(create.error) : null)} />
      <TextField
        label="Title"
        optional
        name="title"
        maxLength={THREAD_TITLE_MAX}
        hint="Defaults to the first line of the post."
        value={title}
        error={errors.title}
        onChange={(event) => setTitle(event.target.value)}
      />
      <MentionComposer
        label="Post"
        name="body"
        value={body}
        onChange={(next) => {
          setBody(next);
          if (errors.body)
            setErrors((current) => {
              const next = { ...current };
              delete next.body;
              return next;
            });
        }}
        members={mentionable}
        error={errors.body}
        hint={FORMATTING_HINT}
        rows={5}
        onSubmitShortcut={submit}
      />
      <div className="flex flex-wrap justify-end gap-2">
        <Button variant="secondary" onClick={onCancel} disabled={create.isPending}>
          Cancel
        </Button>
        <Button type="submit" busy={create.isPending}>
          Start thread
        </Button>
      </div>
    </form>
  );
}
