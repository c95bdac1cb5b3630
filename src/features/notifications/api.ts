// The bell's API hooks: one per endpoint, keys from src/lib/queryKeys.ts.
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { z } from "zod";
import type { NotificationList, notificationsReadResultSchema } from "@shared/schemas/notifications";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";

type ReadResult = z.infer<typeof notificationsReadResultSchema>;

/** New mentions show up without a reload: the list is asked again every minute while the app is open. */
const POLL_MS = 60_000;

/** GET /api/notifications?page&pageSize: the newest notifications and the unread count. */
export function useNotifications(pageSize = 10) {
  const query = `pageSize=${pageSize}`;
  return useQuery({
    queryKey: queryKeys.notifications.list(query),
    queryFn: ({ signal }) => api.get<NotificationList>(`/notifications?${query}`, signal),
    refetchInterval: POLL_MS,
  });
}

/** POST /api/notifications/:notificationId/read */
export function useMarkNotificationRead() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (notificationId: string) => api.post<ReadResult>(`/notifications/${encodeURIComponent(notificationId)}/read`),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.notifications.all }),
  });
}

/** POST /api/notifications/read-all */
export function useMarkAllNotificationsRead() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<ReadResult>("/notifications/read-all", {}),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.notifications.all }),
  });
}
