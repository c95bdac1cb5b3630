// The study's activity feed: imports, coding decisions made in bulk, runs, comparisons, thread
// activity and membership changes, newest first.
import { z } from "zod";
import { isoDateSchema } from "./common";
import { personRefSchema } from "./threads";

export const ACTIVITY_MAX_PAGE_SIZE = 100;

export const activityItemSchema = z
  .object({
    id: z.uuid(),
    kind: z.string().meta({ description: "e.g. import_committed, bulk_edit, run.started, thread.opened, thread.resolved, member.joined, member.role_changed" }),
    summary: z.string(),
    user: personRefSchema.nullable().meta({ description: "Who did it (null for the system or a deleted account)" }),
    refType: z.string().nullable().meta({ description: "What it is about: import, batch, run, thread, membership, study..." }),
    refId: z.uuid().nullable(),
    createdAt: isoDateSchema,
  })
  .meta({ id: "ActivityItem" });
export type ActivityItem = z.infer<typeof activityItemSchema>;

const pageMessage = "page must be a whole number from 1";
const sizeMessage = `pageSize must be a whole number from 1 to ${ACTIVITY_MAX_PAGE_SIZE}`;

export const activityListQuerySchema = z.object({
  page: z.coerce.number({ message: pageMessage }).int(pageMessage).min(1, pageMessage).default(1),
  pageSize: z.coerce.number({ message: sizeMessage }).int(sizeMessage).min(1, sizeMessage).max(ACTIVITY_MAX_PAGE_SIZE, sizeMessage).default(15),
});
export type ActivityListQuery = z.output<typeof activityListQuerySchema>;

export const activityListSchema = z
  .object({ rows: z.array(activityItemSchema).meta({ description: "Newest first" }), total: z.number().int(), page: z.number().int(), pageSize: z.number().int() })
  .meta({ id: "ActivityList" });
export type ActivityList = z.infer<typeof activityListSchema>;
