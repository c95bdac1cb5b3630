// Notifications: in-app notices of mentions (listed under the bell in the top bar), and how each
// person hears of them by e-mail in each study: at once, in a daily digest, or not at all.
import { z } from "zod";
import { isoDateSchema, uuidSchema } from "./common";

export const NOTIFICATION_MODES = ["immediate", "digest", "none"] as const;
export type NotificationMode = (typeof NOTIFICATION_MODES)[number];

export const NOTIFICATION_MODE_LABELS: Record<NotificationMode, string> = {
  immediate: "E-mail each mention at once",
  digest: "One e-mail a day with every mention",
  none: "No e-mail (the bell only)",
};

export const NOTIFICATIONS_MAX_PAGE_SIZE = 50;

export const notificationSchema = z
  .object({
    id: z.uuid(),
    kind: z.string().meta({ description: "mention" }),
    studyId: z.uuid(),
    studyName: z.string(),
    threadId: z.uuid().nullable(),
    summary: z.string().meta({ description: "Who mentioned whom where, with an excerpt of the post" }),
    read: z.boolean(),
    createdAt: isoDateSchema,
  })
  .meta({ id: "Notification" });
export type Notification = z.infer<typeof notificationSchema>;

const pageMessage = "page must be a whole number from 1";
const sizeMessage = `pageSize must be a whole number from 1 to ${NOTIFICATIONS_MAX_PAGE_SIZE}`;

export const notificationListQuerySchema = z.object({
  unread: z
    .enum(["true", "false"], { message: "unread must be true or false" })
    .transform((v) => v === "true")
    .optional()
    .meta({ description: "true: only notifications not yet read" }),
  page: z.coerce.number({ message: pageMessage }).int(pageMessage).min(1, pageMessage).default(1),
  pageSize: z.coerce.number({ message: sizeMessage }).int(sizeMessage).min(1, sizeMessage).max(NOTIFICATIONS_MAX_PAGE_SIZE, sizeMessage).default(20),
});
export type NotificationListQuery = z.output<typeof notificationListQuerySchema>;

export const notificationListSchema = z
  .object({
    rows: z.array(notificationSchema).meta({ description: "Newest first" }),
    total: z.number().int(),
    unreadCount: z.number().int().meta({ description: "Unread notifications in every study" }),
    page: z.number().int(),
    pageSize: z.number().int(),
  })
  .meta({ id: "NotificationList" });
export type NotificationList = z.infer<typeof notificationListSchema>;

export const notificationParamsSchema = z.object({ notificationId: uuidSchema });

export const notificationsReadAllSchema = z
  .strictObject({
    studyId: uuidSchema.optional().meta({ description: "Only this study's notifications" }),
    threadId: uuidSchema.optional().meta({ description: "Only this thread's notifications (e.g. when the thread is opened)" }),
  })
  .meta({ id: "NotificationsReadAll" });

export const notificationsReadResultSchema = z.object({ marked: z.number().int(), unreadCount: z.number().int() }).meta({ id: "NotificationsRead" });

export const notificationModeSchema = z.enum(NOTIFICATION_MODES, { message: `Mode must be one of ${NOTIFICATION_MODES.join(", ")}` });

export const notificationPreferenceSchema = z
  .object({ studyId: z.uuid(), studyName: z.string(), mode: notificationModeSchema })
  .meta({ id: "NotificationPreference" });
export type NotificationPreference = z.infer<typeof notificationPreferenceSchema>;

export const notificationPreferenceListSchema = z
  .object({ preferences: z.array(notificationPreferenceSchema).meta({ description: "One per study the caller belongs to; immediate unless changed" }) })
  .meta({ id: "NotificationPreferenceList" });
export type NotificationPreferenceList = z.infer<typeof notificationPreferenceListSchema>;

export const notificationPreferenceUpdateSchema = z.strictObject({ mode: notificationModeSchema }).meta({ id: "NotificationPreferenceUpdate" });
export type NotificationPreferenceUpdateInput = z.input<typeof notificationPreferenceUpdateSchema>;
