// The thread panel's API hooks (one per endpoint), shared by every screen that embeds threads.
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { z } from "zod";
import type { PostCreateInput, ThreadCreateInput, ThreadDetail, ThreadList, ThreadResolveInput } from "@shared/schemas/threads";
import type { notificationsReadResultSchema } from "@shared/schemas/notifications";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";
import { membersQuery } from "../../lib/queries/members";
import { studyApiPath } from "../../lib/queries/paths";

type ReadResult = z.infer<typeof notificationsReadResultSchema>;

const threadsPath = (studyId: string) => studyApiPath(studyId, "/threads");

export interface ThreadListFilters {
  status?: "open" | "resolved" | "all";
  targetType?: string;
  targetId?: string;
  traitId?: string;
  authorId?: string;
  mentioned?: string;
  page?: number;
  pageSize?: number;
}

export function threadQueryString(filters: ThreadListFilters): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(filters)) if (value !== undefined && value !== "") params.set(key, String(value));
  return params.toString();
}

/** GET /api/studies/:studyId/threads?status&targetType&targetId&traitId&authorId&mentioned&page&pageSize */
export function useThreads(studyId: string, filters: ThreadListFilters, enabled = true) {
  const query = threadQueryString(filters);
  return useQuery({
    queryKey: queryKeys.threads.list(studyId, query),
    queryFn: ({ signal }) => api.get<ThreadList>(`${threadsPath(studyId)}?${query}`, signal),
    enabled,
  });
}

/**
 * GET /api/studies/:studyId/threads/:threadId: posts, resolution and the decisions it can link.
 * Always asked afresh on opening (a value may have changed since), and now and then while open.
 */
export function useThread(studyId: string, threadId: string) {
  return useQuery({
    queryKey: queryKeys.threads.detail(studyId, threadId),
    queryFn: ({ signal }) => api.get<ThreadDetail>(`${threadsPath(studyId)}/${encodeURIComponent(threadId)}`, signal),
    staleTime: 0,
    refetchInterval: 30_000,
  });
}

/** GET /api/studies/:studyId/members: who can be mentioned (the same cache as the Members screen). */
export function useMentionableMembers(studyId: string) {
  return useQuery({ ...membersQuery(studyId), select: (data) => data.members });
}

/** After any change to a thread: the lists, the trait table's marks and the activity feed follow. */
function useThreadChanged(studyId: string) {
  const queryClient = useQueryClient();
  return (thread: ThreadDetail) => {
    queryClient.setQueryData(queryKeys.threads.detail(studyId, thread.id), thread);
    return Promise.all([
      queryClient.invalidateQueries({ queryKey: [...queryKeys.threads.all(studyId), "list"] }),
      queryClient.invalidateQueries({ queryKey: queryKeys.taxa.all(studyId) }),
      queryClient.invalidateQueries({ queryKey: queryKeys.activity.all(studyId) }),
    ]);
  };
}

/** POST /api/studies/:studyId/threads: a new thread with its first post. */
export function useCreateThread(studyId: string) {
  const changed = useThreadChanged(studyId);
  return useMutation({
    mutationFn: (input: ThreadCreateInput) => api.post<ThreadDetail>(threadsPath(studyId), input),
    onSuccess: changed,
  });
}

/** POST /api/studies/:studyId/threads/:threadId/posts */
export function useReply(studyId: string, threadId: string) {
  const changed = useThreadChanged(studyId);
  return useMutation({
    mutationFn: (input: PostCreateInput) => api.post<ThreadDetail>(`${threadsPath(studyId)}/${encodeURIComponent(threadId)}/posts`, input),
    onSuccess: changed,
  });
}

/** POST /api/studies/:studyId/threads/:threadId/resolve, optionally linking a coding decision. */
export function useResolveThread(studyId: string, threadId: string) {
  const changed = useThreadChanged(studyId);
  return useMutation({
    mutationFn: (input: ThreadResolveInput) => api.post<ThreadDetail>(`${threadsPath(studyId)}/${encodeURIComponent(threadId)}/resolve`, input),
    onSuccess: changed,
  });
}

/** POST /api/studies/:studyId/threads/:threadId/reopen */
export function useReopenThread(studyId: string, threadId: string) {
  const changed = useThreadChanged(studyId);
  return useMutation({
    mutationFn: () => api.post<ThreadDetail>(`${threadsPath(studyId)}/${encodeURIComponent(threadId)}/reopen`),
    onSuccess: changed,
  });
}

/** POST /api/notifications/read-all { threadId }: reading a thread reads its mentions of you. */
export function useMarkThreadRead() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (threadId: string) => api.post<ReadResult>("/notifications/read-all", { threadId }),
    onSuccess: (result) => (result.marked > 0 ? queryClient.invalidateQueries({ queryKey: queryKeys.notifications.all }) : undefined),
  });
}
