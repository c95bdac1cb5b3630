// Notifications of mentions: a row per mentioned member (the bell), and e-mail according to the
// member's choice for the study: each mention at once (a job sends it after the post is saved),
// a daily digest, or none. The digest is safe with several app processes: one transaction-scoped
// advisory lock lets one process at a time claim the waiting mentions, and a claimed mention is
// marked e-mailed, so no mention is sent twice and each person gets at most one digest a day.
import { and, count, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import { RepeatingTask } from "../jobs/repeatingTask";
import { memberships, notificationPreferences, notifications, studies, threadPosts, threads, users } from "../../db/schema/index";
import { markdownExcerpt } from "../../shared/markdown";
import type { NotificationList, NotificationListQuery, NotificationMode, NotificationPreference, NotificationPreferenceList } from "../../shared/schemas/notifications";
import { notFound } from "../domain/errors";
import type { JobQueue } from "../jobs/queue";
import type { Mailer } from "../mail/mailer";
import { mentionDigestMail, mentionMail, type DigestItem } from "../mail/templates";

export const MENTION_MAIL_JOB = "notifications.mention-mail";
export const DIGEST_JOB = "notifications.digest";
/** Digests go out once a day after this hour (UTC) and cover mentions made before it. */
export const DIGEST_HOUR_UTC = 7;
const DIGEST_CHECK_EVERY_MS = 15 * 60 * 1000;

interface MentionMailJob {
  notificationIds: string[];
  targetLabel: string;
}

/** The latest digest time at or before `now`: today at DIGEST_HOUR_UTC, or yesterday's when earlier. */
export function latestDigestCutoff(now: Date): Date {
  const cutoff = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate(), DIGEST_HOUR_UTC));
  if (cutoff.getTime() > now.getTime()) cutoff.setUTCDate(cutoff.getUTCDate() - 1);
  return cutoff;
}

export interface MentionInput {
  studyId: string;
  threadId: string;
  postId: string;
  authorName: string;
  threadTitle: string;
  body: string;
  userIds: string[];
}

export function createNotificationService(db: Database, mailer: Mailer, appUrl: string, jobs: JobQueue) {
  const threadLink = (studyId: string, threadId: string) => `${appUrl}/studies/${studyId}/threads/${threadId}`;
  const settingsLink = (studyId: string) => `${appUrl}/studies/${studyId}#mention-emails`;

  async function unreadCount(userId: string): Promise<number> {
    const [row] = await db
      .select({ n: count() })
      .from(notifications)
      .innerJoin(memberships, and(eq(memberships.userId, notifications.userId), eq(memberships.studyId, notifications.studyId)))
      .where(and(eq(notifications.userId, userId), isNull(notifications.readAt)));
    return row.n;
  }

  /** Sends the given mentions' e-mails now (those not sent yet); a failed send is left for a later try. */
  async function deliverMentions(ids: string[], targetLabel: string): Promise<number> {
    if (ids.length === 0) return 0;
    const claimed = await db
      .update(notifications)
      .set({ emailedAt: sql`now()` })
      .where(and(inArray(notifications.id, ids), isNull(notifications.emailedAt)))
      .returning({ id: notifications.id });
    if (claimed.length === 0) return 0;
    const rows = await mentionDetails(claimed.map((c) => c.id));
    let sent = 0;
    for (const row of rows) {
      const mail = mentionMail({
        author: row.authorName ?? "A member",
        studyName: row.studyName,
        threadTitle: row.threadTitle,
        targetLabel,
        excerpt: markdownExcerpt(row.body, 600),
        link: threadLink(row.studyId, row.threadId),
        settingsLink: settingsLink(row.studyId),
      });
      try {
        await mailer.send({ to: row.email, ...mail });
        sent++;
      } catch (err) {
        console.error(`mention e-mail to ${row.email} failed: ${(err as Error).message}`);
        await db.update(notifications).set({ emailedAt: null }).where(eq(notifications.id, row.id));
      }
    }
    return sent;
  }

  async function mentionDetails(ids: string[]) {
    const author = sql<string | null>`(SELECT name FROM users a WHERE a.id = ${threadPosts.authorId})`;
    return db
      .select({
        id: notifications.id,
        userId: notifications.userId,
        email: users.email,
        studyId: notifications.studyId,
        studyName: studies.name,
        threadId: threads.id,
        threadTitle: threads.title,
        body: threadPosts.body,
        authorName: author,
        createdAt: notifications.createdAt,
      })
      .from(notifications)
      .innerJoin(users, eq(users.id, notifications.userId))
      .innerJoin(studies, eq(studies.id, notifications.studyId))
      .innerJoin(threads, eq(threads.id, notifications.threadId))
      .innerJoin(threadPosts, eq(threadPosts.id, notifications.postId))
      .where(inArray(notifications.id, ids))
      .orderBy(notifications.createdAt);
  }

  /**
   * Every daily digest due at `now`: the unread, un-e-mailed mentions made before the latest
   * digest time, for members whose preference in that study is "digest"; one e-mail per person.
   */
  async function sendDigests(now: Date): Promise<{ people: number; mentions: number }> {
    const cutoff = latestDigestCutoff(now);
    const claimed = await db.transaction(async (tx) => {
      const lock = await tx.execute(sql`SELECT pg_try_advisory_xact_lock(hashtext('stratasieve.mention-digest')) AS got`);
      if (!(lock.rows[0] as { got: boolean }).got) return null;
      const res = await tx.execute(sql`
        UPDATE notifications n SET emailed_at = ${now.toISOString()}::timestamptz
        FROM notification_preferences p, memberships m
        WHERE p.user_id = n.user_id AND p.study_id = n.study_id AND p.mode = 'digest'
          AND m.user_id = n.user_id AND m.study_id = n.study_id
          AND n.kind = 'mention' AND n.thread_id IS NOT NULL AND n.post_id IS NOT NULL
          AND n.emailed_at IS NULL AND n.read_at IS NULL
          AND n.created_at < ${cutoff.toISOString()}::timestamptz
        RETURNING n.id`);
      return (res.rows as Array<{ id: string }>).map((r) => r.id);
    });
    if (!claimed || claimed.length === 0) return { people: 0, mentions: 0 };
    const rows = await mentionDetails(claimed);
    const byPerson = new Map<string, typeof rows>();
    for (const row of rows) byPerson.set(row.userId, [...(byPerson.get(row.userId) ?? []), row]);
    let people = 0;
    let mentions = 0;
    for (const items of byPerson.values()) {
      const digestItems: DigestItem[] = items.map((row) => ({
        studyName: row.studyName,
        threadTitle: row.threadTitle,
        author: row.authorName ?? "A member",
        excerpt: markdownExcerpt(row.body, 280),
        link: threadLink(row.studyId, row.threadId),
        at: row.createdAt,
      }));
      try {
        await mailer.send({ to: items[0].email, ...mentionDigestMail({ items: digestItems, settingsLink: settingsLink(items[0].studyId) }) });
        people++;
        mentions += items.length;
      } catch (err) {
        console.error(`digest e-mail to ${items[0].email} failed: ${(err as Error).message}`);
        await db.update(notifications).set({ emailedAt: null }).where(inArray(notifications.id, items.map((i) => i.id)));
      }
    }
    return { people, mentions };
  }

  const clock = new RepeatingTask("digest check not queued", () => jobs.send(DIGEST_JOB, { at: new Date().toISOString() }), DIGEST_CHECK_EVERY_MS);

  return {
    /**
     * Writes one notification per mentioned member (inside the post's transaction); returns the
     * ids to e-mail at once (members whose preference is "immediate", the default).
     */
    async recordMentions(tx: DbOrTx, input: MentionInput): Promise<string[]> {
      if (input.userIds.length === 0) return [];
      const summary = `${input.authorName} mentioned you in “${input.threadTitle}”: ${markdownExcerpt(input.body, 140)}`;
      const rows = await tx
        .insert(notifications)
        .values(input.userIds.map((userId) => ({ userId, studyId: input.studyId, threadId: input.threadId, postId: input.postId, kind: "mention", summary })))
        .returning({ id: notifications.id, userId: notifications.userId });
      const prefs = await tx
        .select({ userId: notificationPreferences.userId, mode: notificationPreferences.mode })
        .from(notificationPreferences)
        .where(and(eq(notificationPreferences.studyId, input.studyId), inArray(notificationPreferences.userId, input.userIds)));
      const mode = new Map(prefs.map((p) => [p.userId, p.mode]));
      return rows.filter((r) => (mode.get(r.userId) ?? "immediate") === "immediate").map((r) => r.id);
    },

    /** After the post is committed: hands the e-mails to the job queue, or sends them here when the queue refuses. */
    async mailMentions(ids: string[], targetLabel: string): Promise<void> {
      if (ids.length === 0) return;
      try {
        await jobs.send<MentionMailJob>(MENTION_MAIL_JOB, { notificationIds: ids, targetLabel });
      } catch (err) {
        console.error(`mention e-mails not queued (${(err as Error).message}); sending them now`);
        await deliverMentions(ids, targetLabel).catch((e: Error) => console.error(`mention e-mails failed: ${e.message}`));
      }
    },

    deliverMentions,
    sendDigests,

    /** The caller's notifications in the studies they still belong to, newest first. */
    async list(userId: string, query: NotificationListQuery): Promise<NotificationList> {
      const where = and(eq(notifications.userId, userId), query.unread ? isNull(notifications.readAt) : undefined);
      const base = db
        .select({ n: notifications, studyName: studies.name })
        .from(notifications)
        .innerJoin(memberships, and(eq(memberships.userId, notifications.userId), eq(memberships.studyId, notifications.studyId)))
        .innerJoin(studies, eq(studies.id, notifications.studyId))
        .where(where);
      const [rows, [{ total }], unread] = await Promise.all([
        base.orderBy(desc(notifications.createdAt), desc(notifications.id)).limit(query.pageSize).offset((query.page - 1) * query.pageSize),
        db
          .select({ total: count() })
          .from(notifications)
          .innerJoin(memberships, and(eq(memberships.userId, notifications.userId), eq(memberships.studyId, notifications.studyId)))
          .where(where),
        unreadCount(userId),
      ]);
      return {
        rows: rows.map(({ n, studyName }) => ({
          id: n.id,
          kind: n.kind,
          studyId: n.studyId,
          studyName,
          threadId: n.threadId,
          summary: n.summary,
          read: n.readAt !== null,
          createdAt: n.createdAt.toISOString(),
        })),
        total,
        unreadCount: unread,
        page: query.page,
        pageSize: query.pageSize,
      };
    },

    async markRead(userId: string, notificationId: string): Promise<{ marked: number; unreadCount: number }> {
      const [row] = await db.select({ readAt: notifications.readAt }).from(notifications).where(and(eq(notifications.id, notificationId), eq(notifications.userId, userId)));
      if (!row) throw notFound("This notification does not exist or is not yours.");
      const marked = row.readAt
        ? 0
        : (await db.update(notifications).set({ readAt: sql`now()` }).where(and(eq(notifications.id, notificationId), isNull(notifications.readAt))).returning({ id: notifications.id })).length;
      return { marked, unreadCount: await unreadCount(userId) };
    },

    async markAllRead(userId: string, scope: { studyId?: string; threadId?: string }): Promise<{ marked: number; unreadCount: number }> {
      const marked = await db
        .update(notifications)
        .set({ readAt: sql`now()` })
        .where(
          and(
            eq(notifications.userId, userId),
            isNull(notifications.readAt),
            scope.studyId ? eq(notifications.studyId, scope.studyId) : undefined,
            scope.threadId ? eq(notifications.threadId, scope.threadId) : undefined,
          ),
        )
        .returning({ id: notifications.id });
      return { marked: marked.length, unreadCount: await unreadCount(userId) };
    },

    /** One preference per study the person belongs to ("immediate" unless they changed it). */
    async preferences(userId: string): Promise<NotificationPreferenceList> {
      const rows = await db
        .select({ studyId: studies.id, studyName: studies.name, mode: notificationPreferences.mode })
        .from(memberships)
        .innerJoin(studies, eq(studies.id, memberships.studyId))
        .leftJoin(notificationPreferences, and(eq(notificationPreferences.userId, memberships.userId), eq(notificationPreferences.studyId, memberships.studyId)))
        .where(eq(memberships.userId, userId))
        .orderBy(studies.name);
      return { preferences: rows.map((r) => ({ studyId: r.studyId, studyName: r.studyName, mode: (r.mode ?? "immediate") as NotificationMode })) };
    },

    async setPreference(userId: string, studyId: string, mode: NotificationMode): Promise<NotificationPreference> {
      await db
        .insert(notificationPreferences)
        .values({ userId, studyId, mode })
        .onConflictDoUpdate({ target: [notificationPreferences.userId, notificationPreferences.studyId], set: { mode } });
      const [study] = await db.select({ name: studies.name }).from(studies).where(eq(studies.id, studyId));
      return { studyId, studyName: study?.name ?? "", mode };
    },

    /** Every process checks for due digests now and then; the lock and the e-mailed marks keep it to one send. */
    startDigestClock: () => clock.start(),
    stopDigestClock: () => clock.stop(),
  };
}
export type NotificationService = ReturnType<typeof createNotificationService>;

/**
 * Declares the mention-mail and digest job kinds and the handlers this process works them with.
 * Call it where the process starts, before the queue starts (beside registerRunJob).
 */
export function registerNotificationJobs(queue: JobQueue, service: Pick<NotificationService, "deliverMentions" | "sendDigests">): void {
  queue.register<MentionMailJob>(MENTION_MAIL_JOB, async (data) => {
    await service.deliverMentions(data.notificationIds, data.targetLabel);
  });
  queue.register<{ at: string }>(DIGEST_JOB, async () => {
    await service.sendDigests(new Date());
  });
}
