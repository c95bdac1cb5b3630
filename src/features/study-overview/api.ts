import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { ActivityList } from "@shared/schemas/activity";
import type { NotificationPreference, NotificationPreferenceList, NotificationPreferenceUpdateInput } from "@shared/schemas/notifications";
import type { Study, StudyUpdateInput } from "@shared/schemas/studies";
import type { TaxaPage } from "@shared/schemas/taxa";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";
import { studyApiPath } from "../../lib/queries/paths";

/** PATCH /api/studies/:studyId (owners). */
export function useUpdateStudy(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: StudyUpdateInput) => api.patch<Study>(studyApiPath(studyId), input),
    onSuccess: (study) => {
      queryClient.setQueryData(queryKeys.studies.detail(studyId), study);
      return queryClient.invalidateQueries({ queryKey: queryKeys.studies.list() });
    },
  });
}

/** DELETE /api/studies/:studyId (owners): the study and everything in it. */
export function useDeleteStudy(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.delete(studyApiPath(studyId)),
    onSuccess: () =>
      Promise.all([
        // Not refetched now (it would answer "not a member" while the page is still open);
        // marked stale so a later visit asks the server again.
        queryClient.invalidateQueries({ queryKey: queryKeys.studies.detail(studyId), refetchType: "none" }),
        queryClient.invalidateQueries({ queryKey: queryKeys.studies.list() }),
      ]),
  });
}

/** Entries per page of the activity feed. */
export const ACTIVITY_PAGE_SIZE = 10;

/** GET /api/studies/:studyId/activity?page&pageSize: the feed, newest first. */
export const activityQuery = (studyId: string, page: number) =>
  queryOptions({
    queryKey: queryKeys.activity.page(studyId, page),
    queryFn: ({ signal }) => api.get<ActivityList>(studyApiPath(studyId, `/activity?page=${page}&pageSize=${ACTIVITY_PAGE_SIZE}`), signal),
  });

export const useActivity = (studyId: string, page: number) => useQuery({ ...activityQuery(studyId, page), placeholderData: keepPreviousData });

/** GET /api/notification-preferences: the caller's e-mail choice for mentions, per study. */
export const mentionPreferencesQuery = () =>
  queryOptions({
    queryKey: queryKeys.notifications.preferences,
    queryFn: ({ signal }) => api.get<NotificationPreferenceList>("/notification-preferences", signal),
  });

export const useMentionPreferences = () => useQuery(mentionPreferencesQuery());

/** PUT /api/notification-preferences/:studyId */
export function useSetMentionPreference(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: NotificationPreferenceUpdateInput) => api.put<NotificationPreference>(`/notification-preferences/${encodeURIComponent(studyId)}`, input),
    onSuccess: (saved) =>
      queryClient.setQueryData<NotificationPreferenceList>(queryKeys.notifications.preferences, (list) =>
        list ? { preferences: list.preferences.map((p) => (p.studyId === saved.studyId ? saved : p)) } : list,
      ),
  });
}

/** GET /api/studies/:studyId/taxa?page=1&pageSize=1: only the total, to tell whether the study has taxa yet. */
export const taxaTotalQuery = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.taxa.page(studyId, "page=1&pageSize=1"),
    queryFn: ({ signal }) => api.get<TaxaPage>(studyApiPath(studyId, "/taxa?page=1&pageSize=1"), signal),
  });

export const useTaxaTotal = (studyId: string) => useQuery({ ...taxaTotalQuery(studyId), select: (page) => page.total });

/** GET /api/studies/:studyId/exports/template.csv: the study's import template (a plain download link). */
