import { useSearchParams } from "react-router-dom";
import { THREAD_TARGET_LABELS, THREAD_TARGET_TYPES, type ThreadTargetType } from "@shared/schemas/threads";
import { Button } from "../../components/Button";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { PageHeader } from "../../components/PageHeader";
import { Select } from "../../components/Select";
import { TextLink } from "../../components/TextLink";
import { useMentionableMembers, useThreads, type ThreadListFilters } from "../../components/threads/api";
import { ThreadListItem } from "../../components/threads/ThreadParts";
import { useCurrentStudy } from "../../lib/currentStudy";
import { formatCount } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useMe } from "../../lib/session";
import { useDocumentTitle } from "../../lib/useDocumentTitle";

const PAGE_SIZE = 25;
type StatusFilter = "open" | "resolved" | "all";
const STATUS_TABS: Array<{ value: StatusFilter; label: string }> = [
  { value: "open", label: "Open" },
  { value: "resolved", label: "Resolved" },
  { value: "all", label: "All" },
];

/** The filters live in the address, so a filtered list can be shared and the back button works. */
function useThreadFilters() {
  const [params, setParams] = useSearchParams();
  const status = (["open", "resolved", "all"].includes(params.get("status") ?? "") ? params.get("status") : "open") as StatusFilter;
  const targetType = THREAD_TARGET_TYPES.includes(params.get("about") as ThreadTargetType) ? (params.get("about") as ThreadTargetType) : "";
  const filters = {
    status,
    targetType,
    authorId: params.get("author") ?? "",
    mentioned: params.get("mentioning") ?? "",
    page: Math.max(1, Number(params.get("page")) || 1),
  };
  const set = (patch: Partial<Record<"status" | "about" | "author" | "mentioning" | "page", string>>) => {
    setParams(
      (current) => {
        const next = new URLSearchParams(current);
        for (const [key, value] of Object.entries(patch)) {
          if (value) next.set(key, value);
          else next.delete(key);
        }
        if (!("page" in patch)) next.delete("page");
        return next;
      },
      { replace: true },
    );
  };
  return { filters, set };
}

export function ThreadsPage() {
  const study = useCurrentStudy();
  useDocumentTitle(`Threads · ${study.name}`);
  const me = useMe();
  const { filters, set } = useThreadFilters();
  const query: ThreadListFilters = {
    status: filters.status,
    targetType: filters.targetType || undefined,
    authorId: filters.authorId || undefined,
    mentioned: filters.mentioned || undefined,
    page: filters.page,
    pageSize: PAGE_SIZE,
  };
  const threads = useThreads(study.id, query);
  const members = useMentionableMembers(study.id);
  const people = members.data ?? [];
  const filtered = Boolean(filters.targetType || filters.authorId || filters.mentioned);
  const total = threads.data?.total ?? 0;
  const pageCount = Math.max(1, Math.ceil(total / PAGE_SIZE));
  const counts = threads.data?.counts;
  const myId = me.data?.user.id;

  const personOptions = (anyone: string) => [
    { value: "", label: anyone },
    ...(myId ? [{ value: myId, label: "Me" }] : []),
    ...people.filter((p) => p.userId !== myId).map((p) => ({ value: p.userId, label: p.name })),
  ];

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title="Threads"
        description="Questions and doubts about traits and their coding rules, taxa, single values, outcome overrides and runs. Open threads are marked in the trait table; a resolution can link the coding decision that settled it."
      />

      <div className="mb-5 flex flex-col gap-4 lg:flex-row lg:items-end lg:justify-between">
        <div role="group" aria-label="Status" className="inline-flex self-start rounded-lg border border-stone-300 bg-white p-0.5 shadow-sm">
          {STATUS_TABS.map((tab) => {
            const count = tab.value === "all" ? (counts ? counts.open + counts.resolved : null) : (counts?.[tab.value] ?? null);
            return (
              <button
                key={tab.value}
                type="button"
                aria-pressed={filters.status === tab.value}
                onClick={() => set({ status: tab.value === "open" ? "" : tab.value })}
                className={cx(
                  "rounded-md px-3 py-1.5 text-sm font-medium",
                  filters.status === tab.value ? "bg-accent-700 text-white" : "text-stone-700 hover:bg-stone-100",
                  focusRing,
                )}
              >
                {tab.label}
                {count !== null && <span className="ml-1.5 tabular-nums opacity-80">{formatCount(count)}</span>}
              </button>
            );
          })}
        </div>
        <div className="grid gap-3 sm:grid-cols-3 lg:w-[40rem]">
          <Select
            label="About"
            value={filters.targetType}
            onChange={(e) => set({ about: e.target.value })}
            options={[{ value: "", label: "Anything" }, ...THREAD_TARGET_TYPES.map((t) => ({ value: t, label: THREAD_TARGET_LABELS[t] }))]}
          />
          <Select label="Opened by" value={filters.authorId} onChange={(e) => set({ author: e.target.value })} options={personOptions("Anyone")} />
          <Select label="Mentioning" value={filters.mentioned} onChange={(e) => set({ mentioning: e.target.value })} options={personOptions("Anyone or no one")} />
        </div>
      </div>

      {threads.isPending && <LoadingState label="Loading the threads" lines={5} />}
      {threads.isError && <ErrorState error={threads.error} title="The threads could not be loaded" onRetry={() => void threads.refetch()} />}

      {threads.isSuccess && total === 0 && !filtered && (
        <EmptyState
          title={filters.status === "resolved" ? "No resolved threads yet" : filters.status === "open" ? "No open threads" : "No threads yet"}
          description={
            <>
              Threads start where the question is: the history of a cell in the{" "}
              <TextLink to={`${paths.study(study.id)}/table`}>trait table</TextLink>, a trait in the <TextLink to={`${paths.study(study.id)}/codebook`}>codebook</TextLink>, or
              an outcome override on the <TextLink to={`${paths.study(study.id)}/boundary`}>boundary</TextLink> screen.
            </>
          }
          action={
            filters.status !== "all" ? (
              <Button variant="secondary" onClick={() => set({ status: "all" })}>
                Show all threads
              </Button>
            ) : undefined
          }
        />
      )}
      {threads.isSuccess && total === 0 && filtered && (
        <EmptyState
          title="No threads match these filters"
          description="Change a filter or clear them to see more threads."
          action={
            <Button variant="secondary" onClick={() => set({ about: "", author: "", mentioning: "" })}>
              Clear filters
            </Button>
          }
        />
      )}

      {threads.isSuccess && total > 0 && (
        <>
          <ul className="divide-y divide-stone-100 rounded-xl border border-stone-200 bg-white shadow-[0_1px_2px_rgb(28_25_23/0.04)]" aria-label="Threads">
            {threads.data.rows.map((thread) => (
              <li key={thread.id} className="px-5 py-4">
                <ThreadListItem thread={thread} title={<TextLink to={paths.thread(study.id, thread.id)}>{thread.title}</TextLink>} />
              </li>
            ))}
          </ul>
          <nav aria-label="Pages of threads" className="mt-4 flex flex-wrap items-center justify-between gap-3">
            <p className="text-sm text-stone-600 tabular-nums">
              Threads {formatCount((filters.page - 1) * PAGE_SIZE + 1)}–{formatCount(Math.min(total, filters.page * PAGE_SIZE))} of {formatCount(total)}
            </p>
            <div className="flex items-center gap-2">
              <Button size="sm" variant="secondary" disabled={filters.page <= 1} onClick={() => set({ page: String(filters.page - 1) })}>
                Previous
              </Button>
              <span className="text-sm text-stone-700 tabular-nums">
                Page {formatCount(filters.page)} of {formatCount(pageCount)}
              </span>
              <Button size="sm" variant="secondary" disabled={filters.page >= pageCount} onClick={() => set({ page: String(filters.page + 1) })}>
                Next
              </Button>
            </div>
          </nav>
        </>
      )}
    </>
  );
}
