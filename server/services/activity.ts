// The study's activity feed, newest first. Rows are written by the features themselves (imports,
// bulk edits, runs, threads, membership changes) in the same transaction as what they record.
import { count, desc, eq } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import { activity, users } from "../../db/schema/index";
import type { ActivityList, ActivityListQuery } from "../../shared/schemas/activity";

export interface ActivityEntry {
  studyId: string;
  userId: string | null;
  kind: string;
  summary: string;
  refType: string | null;
  refId: string | null;
}

/** Adds one row to a study's feed (pass the transaction of the change it records). */
export async function addActivity(tx: DbOrTx, entry: ActivityEntry): Promise<void> {
  await tx.insert(activity).values(entry);
}

export function createActivityService(db: Database) {
  return {
    async list(studyId: string, query: ActivityListQuery): Promise<ActivityList> {
      const [rows, [{ total }]] = await Promise.all([
        db
          .select({ row: activity, userName: users.name })
          .from(activity)
          .leftJoin(users, eq(users.id, activity.userId))
          .where(eq(activity.studyId, studyId))
          .orderBy(desc(activity.createdAt), desc(activity.id))
          .limit(query.pageSize)
          .offset((query.page - 1) * query.pageSize),
        db.select({ total: count() }).from(activity).where(eq(activity.studyId, studyId)),
      ]);
      return {
        rows: rows.map(({ row, userName }) => ({
          id: row.id,
          kind: row.kind,
          summary: row.summary,
          user: row.userId && userName !== null ? { id: row.userId, name: userName } : null,
          refType: row.refType,
          refId: row.refId,
          createdAt: row.createdAt.toISOString(),
        })),
        total,
        page: query.page,
        pageSize: query.pageSize,
      };
    },
  };
}
export type ActivityService = ReturnType<typeof createActivityService>;
