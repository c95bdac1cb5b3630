import { useState } from "react";
import type { ActivityItem } from "@shared/schemas/activity";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { ErrorState } from "../../components/ErrorState";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { TextLink } from "../../components/TextLink";
import { formatCount, formatDateTime } from "../../lib/format";
import { paths } from "../../lib/paths";
import { ACTIVITY_PAGE_SIZE, useActivity } from "./api";


/** What part of the study an entry belongs to, from its kind. */
function areaOf(kind: string): { label: string; tone: string } {
  if (kind.startsWith("thread")) return { label: "Thread", tone: "bg-caution-50 text-caution-700 ring-caution-200" };
  if (kind.startsWith("member")) return { label: "Members", tone: "bg-stone-100 text-stone-700 ring-stone-200" };
  if (kind.startsWith("run")) return { label: "Run", tone: "bg-accent-100 text-accent-900 ring-accent-200" };
  if (kind.startsWith("modern") || kind.startsWith("comparison")) return { label: "Modern comparison", tone: "bg-accent-100 text-accent-900 ring-accent-200" };
  if (kind.startsWith("import") || kind.startsWith("bulk") || kind.startsWith("codebook")) return { label: "Trait table", tone: "bg-accent-50 text-accent-900 ring-accent-200" };
  return { label: "Study", tone: "bg-stone-100 text-stone-700 ring-stone-200" };
}

/** Where an entry leads, when that screen exists. */
function linkOf(studyId: string, item: ActivityItem): { to: string; label: string } | null {
  if (!item.refId) return null;
  switch (item.refType) {
    case "thread":
      return { to: paths.thread(studyId, item.refId), label: "Open the thread" };
    case "import":
      return { to: `${paths.study(studyId)}/imports`, label: "Imports" };
    case "batch":
      return { to: `${paths.study(studyId)}/table`, label: "Trait table" };
    case "membership":
      return { to: paths.studyMembers(studyId), label: "Members" };
    default:
      return null;
  }
}

/** The study's activity, newest first, a page at a time. */
export function ActivityFeed({ studyId }: { studyId: string }) {
  const [page, setPage] = useState(1);
  const feed = useActivity(studyId, page);
  const total = feed.data?.total ?? 0;
  const pageCount = Math.max(1, Math.ceil(total / ACTIVITY_PAGE_SIZE));

  return (
    <Card title="Recent activity" description="Imports, edits in bulk, runs, comparisons, threads and membership changes.">
      {feed.isPending && <LoadingState label="Loading the activity" lines={4} className="py-0" />}
      {feed.isError && !feed.data && <ErrorState error={feed.error} title="The activity could not be loaded" onRetry={() => void feed.refetch()} />}
      {feed.data && total === 0 && <p className="text-[15px] text-stone-500">Nothing has happened in this study yet. Imports, edits in bulk, runs and threads will show here.</p>}
      {feed.data && total > 0 && (
        <>
          <ol aria-label="Activity, newest first" className={cx("space-y-3", feed.isPlaceholderData && "opacity-60")}>
            {feed.data.rows.map((item) => {
              const area = areaOf(item.kind);
              const link = linkOf(studyId, item);
              const named = item.user && item.summary.startsWith(item.user.name);
              return (
                <li key={item.id} className="flex gap-3" data-activity={item.kind}>
                  <span className={cx("mt-0.5 inline-flex h-fit shrink-0 rounded-full px-2 py-0.5 text-xs font-semibold ring-1", area.tone)}>{area.label}</span>
                  <div className="min-w-0">
                    <p className="text-[15px] break-words text-stone-800">{item.summary}</p>
                    <p className="mt-0.5 text-sm text-stone-500">
                      {item.user && !named && <>{item.user.name} · </>}
                      <time dateTime={item.createdAt}>{formatDateTime(item.createdAt)}</time>
                      {link && (
                        <>
                          {" · "}
                          <TextLink to={link.to}>{link.label}</TextLink>
                        </>
                      )}
                    </p>
                  </div>
                </li>
              );
            })}
          </ol>
          {pageCount > 1 && (
            <nav aria-label="Pages of activity" className="mt-5 flex flex-wrap items-center justify-between gap-3 border-t border-stone-100 pt-4">
              <Button size="sm" variant="secondary" disabled={page <= 1} onClick={() => setPage((p) => p - 1)}>
                Newer
              </Button>
              <span className="text-sm text-stone-600 tabular-nums" aria-live="polite">
                Page {formatCount(page)} of {formatCount(pageCount)}
              </span>
              <Button size="sm" variant="secondary" disabled={page >= pageCount} onClick={() => setPage((p) => p + 1)}>
                Older
              </Button>
            </nav>
          )}
        </>
      )}
    </Card>
  );
}
