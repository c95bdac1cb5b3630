// Small pieces every thread view shares: the status badge, a coding decision in one line, and a
// thread's line in a list.
import type { ReactNode } from "react";
import type { DecisionBrief, ThreadStatus, ThreadSummary } from "@shared/schemas/threads";
import { cx } from "../../lib/cx";
import { formatDateTime, pluralize } from "../../lib/format";

export function ThreadStatusBadge({ status, className }: { status: ThreadStatus; className?: string }) {
  return (
    <span
      data-thread-status={status}
      className={cx(
        "inline-flex items-center gap-1.5 rounded-full px-2 py-0.5 text-xs font-semibold tracking-wide",
        status === "open" ? "bg-caution-50 text-caution-700 ring-1 ring-caution-200" : "bg-accent-50 text-accent-900 ring-1 ring-accent-200",
        className,
      )}
    >
      <span className={cx("size-1.5 rounded-full", status === "open" ? "bg-caution-700" : "bg-accent-600")} aria-hidden="true" />
      {status === "open" ? "Open" : "Resolved"}
    </span>
  );
}

const ACTION_WORDS: Record<string, string> = {
  create: "Recorded",
  update: "Changed",
  delete: "Deleted",
  restore: "Restored",
  revert: "Reverted",
  override: "Overridden",
};

/** "Body size of Vessiraspis minor: 120 mm → 12 mm", with the reason, who and when. */
export function DecisionLine({ decision, className }: { decision: DecisionBrief; className?: string }) {
  const change =
    decision.oldText || decision.newText ? (
      <>
        {": "}
        <span className="font-medium">{decision.oldText || "no value"}</span> <span aria-hidden="true">→</span>
        <span className="sr-only">to</span> <span className="font-medium">{decision.newText || "no value"}</span>
      </>
    ) : null;
  return (
    <span className={cx("block text-[15px] text-stone-800", className)} data-decision={decision.id}>
      <span className="font-semibold">{ACTION_WORDS[decision.action] ?? decision.action}</span> {decision.subject}
      {change}
      {decision.reason && <span className="mt-0.5 block text-sm text-stone-600">“{decision.reason}”</span>}
      <span className="mt-0.5 block text-sm text-stone-500">
        {decision.user?.name ?? "someone no longer in the study"} · <time dateTime={decision.createdAt}>{formatDateTime(decision.createdAt)}</time>
      </span>
    </span>
  );
}

/** One thread in a list: title, status, target, last post. `title` is usually a link or a button. */
export function ThreadListItem({ thread, title, showTarget = true }: { thread: ThreadSummary; title: ReactNode; showTarget?: boolean }) {
  return (
    <div className="min-w-0" data-thread={thread.id}>
      <div className="flex flex-wrap items-center gap-2">
        <ThreadStatusBadge status={thread.status} />
        <span className="min-w-0 font-semibold text-stone-900">{title}</span>
      </div>
      {showTarget && (
        <p className="mt-1 text-sm text-stone-600">
          About {thread.target.label}
          {thread.target.missing && <span className="text-stone-500"> (no longer in the study)</span>}
        </p>
      )}
      {thread.lastPost && <p className="mt-1 line-clamp-2 text-sm text-stone-600">{thread.lastPost.excerpt}</p>}
      <p className="mt-1 text-sm text-stone-500">
        {pluralize(thread.postCount, "post")} · opened by {thread.author?.name ?? "a former member"} · last activity{" "}
        <time dateTime={thread.updatedAt}>{formatDateTime(thread.updatedAt)}</time>
        {thread.status === "resolved" && thread.resolvedBy && <> · resolved by {thread.resolvedBy.name}</>}
      </p>
    </div>
  );
}
