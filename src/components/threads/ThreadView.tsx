import { useEffect, useId, useMemo, useState, type ReactNode } from "react";
import { can, ROLE_LABELS } from "@shared/roles";
import { canResolveThread, postCreateSchema, type ThreadDetail, type ThreadTarget } from "@shared/schemas/threads";
import { Avatar } from "../Avatar";
import { Button } from "../Button";
import { ErrorState } from "../ErrorState";
import { cx } from "../../lib/cx";
import { LoadingState } from "../LoadingState";
import { FormError, Notice } from "../Notice";
import { useToast } from "../Toast";
import { errorMessage, isApiError } from "../../lib/api";
import { useCurrentStudy } from "../../lib/currentStudy";
import { formatDateTime } from "../../lib/format";
import { useMe } from "../../lib/session";
import { useMarkThreadRead, useMentionableMembers, useReopenThread, useReply, useResolveThread, useThread } from "./api";
import { MarkdownText } from "./MarkdownText";
import { MentionComposer } from "./MentionComposer";
import { mentionedIds } from "./mentions";
import { DecisionLine, ThreadStatusBadge } from "./ThreadParts";

export const FORMATTING_HINT = "**bold**, *italic*, `code`, links and lists work; type @ to mention a member; Ctrl+Enter sends.";

interface ThreadViewProps {
  studyId: string;
  threadId: string;
  headingLevel?: 1 | 2 | 3;
  /** Shown after "About …": e.g. a link to where the target lives. */
  targetAction?: (target: ThreadTarget) => ReactNode;
}

/** A thread: its posts, a reply box with mentions, and resolving (with a decision) or reopening. */
export function ThreadView({ studyId, threadId, headingLevel = 2, targetAction }: ThreadViewProps) {
  const thread = useThread(studyId, threadId);
  const markRead = useMarkThreadRead();
  const { mutate: markThreadRead } = markRead;

  // Reading a thread reads the mentions of you in it.
  useEffect(() => {
    if (thread.isSuccess) markThreadRead(threadId);
  }, [thread.isSuccess, threadId, markThreadRead]);

  if (thread.isPending) return <LoadingState label="Loading the thread" lines={4} />;
  if (thread.isError) {
    // A mistyped address answers 400 about the id; say it in words.
    const malformed = isApiError(thread.error) && thread.error.status === 400 && "threadId" in thread.error.fields;
    const gone = isApiError(thread.error) && thread.error.status === 404;
    return (
      <ErrorState
        error={malformed ? new Error("This address does not point to a thread. Check the link, or open the thread from the Threads screen.") : thread.error}
        title="This thread could not be loaded"
        onRetry={malformed || gone ? undefined : () => void thread.refetch()}
      />
    );
  }
  return <LoadedThread studyId={studyId} thread={thread.data} headingLevel={headingLevel} targetAction={targetAction} />;
}

function LoadedThread({ studyId, thread, headingLevel, targetAction }: { studyId: string; thread: ThreadDetail; headingLevel: 1 | 2 | 3; targetAction?: (target: ThreadTarget) => ReactNode }) {
  const study = useCurrentStudy();
  const me = useMe();
  const Heading = `h${headingLevel}` as const;
  const userId = me.data?.user.id ?? "";
  const mayPost = can(study.role, "threads.post");
  const mayResolve = canResolveThread(study.role, userId, thread);

  return (
    <article aria-labelledby={`thread-${thread.id}-title`} className="space-y-5" data-thread-view={thread.id}>
      <header>
        <div className="flex flex-wrap items-center gap-2">
          <ThreadStatusBadge status={thread.status} />
          <span className="text-sm text-stone-500">
            Opened by {thread.author?.name ?? "a former member"} · <time dateTime={thread.createdAt}>{formatDateTime(thread.createdAt)}</time>
          </span>
        </div>
        <Heading
          id={`thread-${thread.id}-title`}
          className={cx("mt-2 font-semibold tracking-tight text-balance text-stone-900", headingLevel === 1 ? "text-2xl sm:text-[28px] sm:leading-tight" : "text-lg")}
        >
          {thread.title}
        </Heading>
        <p className="mt-1 text-[15px] text-stone-600">
          About <span className="font-medium text-stone-800">{thread.target.label}</span>
          {thread.target.missing && <span> (no longer in the study)</span>}
          {targetAction && !thread.target.missing && <> · {targetAction(thread.target)}</>}
        </p>
      </header>

      <ol className="space-y-4" aria-label="Posts, oldest first">
        {thread.posts.map((post) => (
          <li key={post.id} className="flex gap-3" data-post={post.id}>
            <Avatar name={post.author?.name ?? "?"} />
            <div className="min-w-0 flex-1 rounded-lg border border-stone-200 bg-white px-4 py-3">
              <p className="mb-1 text-sm text-stone-500">
                <span className="font-semibold text-stone-800">{post.author?.name ?? "A former member"}</span> ·{" "}
                <time dateTime={post.createdAt}>{formatDateTime(post.createdAt)}</time>
              </p>
              <MarkdownText source={post.body} mentionNames={post.mentions.map((m) => m.name)} />
            </div>
          </li>
        ))}
      </ol>

      <Resolution studyId={studyId} thread={thread} mayResolve={mayResolve} />

      {mayPost ? (
        <ReplyForm studyId={studyId} thread={thread} />
      ) : (
        <Notice>As {ROLE_LABELS[study.role]} you can read threads. Reviewers, coders, analysts and study leads post in them.</Notice>
      )}
    </article>
  );
}

function Resolution({ studyId, thread, mayResolve }: { studyId: string; thread: ThreadDetail; mayResolve: boolean }) {
  const [choosing, setChoosing] = useState(false);
  // Until a choice is made, the newest related decision is proposed (it follows a refreshed list).
  const [chosen, setChosen] = useState<string | null>(null);
  const decisionId = chosen ?? thread.relatedDecisions[0]?.id ?? "";
  const setDecisionId = (id: string) => setChosen(id);
  const resolve = useResolveThread(studyId, thread.id);
  const reopen = useReopenThread(studyId, thread.id);
  const toast = useToast();
  const groupName = useId();

  if (thread.status === "resolved") {
    return (
      <section aria-label="Resolution" className="rounded-lg border border-accent-200 bg-accent-50/70 px-4 py-3">
        <p className="text-[15px] text-accent-900">
          <span className="font-semibold">Resolved</span>
          {thread.resolvedBy && <> by {thread.resolvedBy.name}</>}
          {thread.resolvedAt && (
            <>
              {" "}
              · <time dateTime={thread.resolvedAt}>{formatDateTime(thread.resolvedAt)}</time>
            </>
          )}
        </p>
        {thread.resolutionDecision ? (
          <div className="mt-2">
            <p className="text-sm font-medium text-stone-600">Settled by the coding decision</p>
            <DecisionLine decision={thread.resolutionDecision} className="mt-1" />
          </div>
        ) : (
          <p className="mt-1 text-sm text-stone-600">No coding decision was linked.</p>
        )}
        <FormError message={reopen.error ? errorMessage(reopen.error) : null} className="mt-2" />
        {mayResolve && (
          <Button
            variant="secondary"
            size="sm"
            className="mt-3"
            busy={reopen.isPending}
            onClick={() => reopen.mutate(undefined, { onSuccess: () => toast.show("The thread is open again.") })}
          >
            Reopen thread
          </Button>
        )}
      </section>
    );
  }

  if (!mayResolve) return null;
  if (!choosing) {
    return (
      <div>
        <Button
          variant="secondary"
          size="sm"
          onClick={() => {
            resolve.reset();
            setChosen(null);
            setChoosing(true);
          }}
        >
          Resolve…
        </Button>
      </div>
    );
  }
  return (
    <form
      aria-label="Resolve the thread"
      className="rounded-lg border border-stone-200 bg-stone-50 px-4 py-4"
      onSubmit={(event) => {
        event.preventDefault();
        resolve.mutate(
          { decisionId: decisionId || null },
          {
            onSuccess: () => {
              setChoosing(false);
              toast.show("The thread is resolved.");
            },
          },
        );
      }}
    >
      <fieldset>
        <legend className="text-[15px] font-semibold text-stone-900">Link the coding decision that settled it (optional)</legend>
        {thread.relatedDecisions.length === 0 && (
          <p className="mt-1 text-sm text-stone-600">
            No coding decision about {thread.target.label} is recorded yet. Resolve without a link, or make the change (with its reason) first and come back.
          </p>
        )}
        <div className="mt-3 space-y-2">
          <label className="flex items-start gap-2 text-[15px] text-stone-800">
            <input type="radio" name={groupName} className="mt-1 size-4 accent-accent-600" checked={decisionId === ""} onChange={() => setDecisionId("")} />
            No decision: resolved by the discussion itself
          </label>
          {thread.relatedDecisions.map((decision) => (
            <label key={decision.id} className="flex items-start gap-2">
              <input type="radio" name={groupName} className="mt-1 size-4 accent-accent-600" checked={decisionId === decision.id} onChange={() => setDecisionId(decision.id)} />
              <DecisionLine decision={decision} />
            </label>
          ))}
        </div>
      </fieldset>
      <FormError message={resolve.error ? errorMessage(resolve.error) : null} className="mt-3" />
      <div className="mt-4 flex flex-wrap justify-end gap-2">
        <Button variant="secondary" size="sm" onClick={() => setChoosing(false)} disabled={resolve.isPending}>
          Cancel
        </Button>
        <Button type="submit" size="sm" busy={resolve.isPending}>
          Resolve thread
        </Button>
      </div>
    </form>
  );
}

function ReplyForm({ studyId, thread }: { studyId: string; thread: ThreadDetail }) {
  const [body, setBody] = useState("");
  const [fieldError, setFieldError] = useState<string | undefined>();
  const reply = useReply(studyId, thread.id);
  const members = useMentionableMembers(studyId);
  const mentionable = useMemo(() => (members.data ?? []).map((m) => ({ id: m.userId, name: m.name })), [members.data]);

  const send = () => {
    const parsed = postCreateSchema.safeParse({ body, mentions: mentionedIds(body, mentionable) });
    if (!parsed.success) {
      setFieldError(parsed.error.issues[0]?.message);
      return;
    }
    setFieldError(undefined);
    reply.mutate(parsed.data, {
      onSuccess: () => setBody(""),
      onError: (error) => {
        if (isApiError(error) && error.fields.body) setFieldError(error.fields.body);
      },
    });
  };

  return (
    <form
      aria-label="Reply"
      noValidate
      className="space-y-3"
      onSubmit={(event) => {
        event.preventDefault();
        send();
      }}
    >
      <FormError message={reply.error && !(isApiError(reply.error) && reply.error.fields.body) ? errorMessage(reply.error) : null} />
      <MentionComposer
        label="Reply"
        name="body"
        value={body}
        onChange={(next) => {
          setBody(next);
          setFieldError(undefined);
        }}
        members={mentionable}
        error={fieldError}
        hint={FORMATTING_HINT}
        rows={3}
        onSubmitShortcut={send}
      />
      <div className="flex justify-end">
        <Button type="submit" busy={reply.isPending}>
          Post reply
        </Button>
      </div>
    </form>
  );
}
