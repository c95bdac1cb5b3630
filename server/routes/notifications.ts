import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import {
  notificationListQuerySchema,
  notificationListSchema,
  notificationParamsSchema,
  notificationPreferenceListSchema,
  notificationPreferenceSchema,
  notificationPreferenceUpdateSchema,
  notificationsReadAllSchema,
  notificationsReadResultSchema,
} from "../../shared/schemas/notifications";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function notificationsRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { notifications } = ctx.services;

  api.add({
    method: "get",
    path: "/notifications",
    operationId: "listNotifications",
    summary: "The caller's notifications (mentions) in the studies they belong to, newest first, with the unread count",
    tags: ["notifications"],
    access: "user",
    query: notificationListQuerySchema,
    response: { status: 200, schema: notificationListSchema },
    handler: ({ user, query }) => notifications.list(user!.id, query),
  });

  api.add({
    method: "post",
    path: "/notifications/:notificationId/read",
    operationId: "markNotificationRead",
    summary: "Mark one of the caller's notifications read",
    tags: ["notifications"],
    access: "user",
    params: notificationParamsSchema,
    response: { status: 200, schema: notificationsReadResultSchema },
    handler: ({ user, params }) => notifications.markRead(user!.id, params.notificationId),
  });

  api.add({
    method: "post",
    path: "/notifications/read-all",
    operationId: "markAllNotificationsRead",
    summary: "Mark the caller's notifications read: all, one study's or one thread's",
    tags: ["notifications"],
    access: "user",
    body: notificationsReadAllSchema,
    response: { status: 200, schema: notificationsReadResultSchema },
    handler: ({ user, body }) => notifications.markAllRead(user!.id, body),
  });

  api.add({
    method: "get",
    path: "/notification-preferences",
    operationId: "getNotificationPreferences",
    summary: "How the caller hears of mentions by e-mail, per study: at once, a daily digest, or none",
    tags: ["notifications"],
    access: "user",
    response: { status: 200, schema: notificationPreferenceListSchema },
    handler: ({ user }) => notifications.preferences(user!.id),
  });

  api.add({
    method: "put",
    path: "/notification-preferences/:studyId",
    operationId: "setNotificationPreferences",
    summary: "Choose how mentions in one study reach the caller by e-mail",
    tags: ["notifications"],
    access: "study.read",
    params: studyParamsSchema,
    body: notificationPreferenceUpdateSchema,
    response: { status: 200, schema: notificationPreferenceSchema },
    handler: ({ user, params, body }) => notifications.setPreference(user!.id, params.studyId, body.mode),
  });

  return api;
}
