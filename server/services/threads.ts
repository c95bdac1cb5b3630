// Threads about coding decisions and results. A thread is attached to a target of the study (a
// trait, a taxon, one trait value, an outcome override, a run or a comparison), holds posts in
// light markdown stored verbatim, and is open or resolved; a resolution may link the coding
// decision that settled it. Mentions notify members (see ./notifications.ts); opening, replying,
// resolving and reopening are written to the study's activity feed in the same transaction. What a
// thread is about (its target's label, the decisions that concern it) is read by ./threadTargets.ts.
import { and, count, desc, eq, inArray, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type { Database, DbOrTx } from "../db";
import { codingDecisions, memberships, threadPosts, threads, users } from "../../db/schema/index";
import { markdownExcerpt } from "../../shared/markdown";
import type { StudyRole } from "../../shared/roles";
import {
  canResolveThread,
  titleFromBody,
  type PersonRef,
  type ThreadDetail,
  type ThreadList,
  type ThreadListQuery,
  type ThreadSummary,
  type ThreadTargetType,
} from "../../shared/schemas/threads";
import { conflict, forbidden, invalidInput, notFound } from "../domain/errors";
import { addActivity } from "./activity";
import type { NotificationService } from "./notifications";
import { decisionBriefs, describeTargets, keyOf, relatedDecisions } from "./threadTargets";

interface Person {
  id: string;
  name: string;
}

type ThreadRow = typeof threads.$inferSelect;

export function createThreadService(db: Database, notifications: NotificationService) {
  const resolver = alias(users, "resolver");

  async function summarize(studyId: string, rows: Array<{ thread: ThreadRow; authorName: string | null; resolverName: string | null }>): Promise<ThreadSummary[]> {
    if (rows.length === 0) return [];
    const ids = rows.map((r) => r.thread.id);
    const [targets, lastPosts] = await Promise.all([
      describeTargets(
        db,
        studyId,
        rows.map((r) => ({ type: r.thread.targetType, id: r.thread.targetId, traitId: r.thread.traitId })),
      ),
      db
        .selectDistinctOn([threadPosts.threadId], {
          threadId: threadPosts.threadId,
          authorId: threadPosts.authorId,
          authorName: users.name,
          body: threadPosts.body,
          createdAt: threadPosts.createdAt,
          postCount: sql<number>`count(*) OVER (PARTITION BY ${threadPosts.threadId})`.mapWith(Number),
        })
        .from(threadPosts)
        .leftJoin(users, eq(users.id, threadPosts.authorId))
        .where(inArray(threadPosts.threadId, ids))
        .orderBy(threadPosts.threadId, desc(threadPosts.createdAt), desc(threadPosts.id)),
    ]);
    const last = new Map(lastPosts.map((p) => [p.threadId, p]));
    return rows.map(({ thread, authorName, resolverName }) => {
      const post = last.get(thread.id);
      return {
        id: thread.id,
        title: thread.title,
        status: thread.status === "resolved" ? "resolved" : "open",
        target: targets.get(keyOf({ type: thread.targetType, id: thread.targetId, traitId: thread.traitId }))!,
        author: thread.createdBy && authorName !== null ? { id: thread.createdBy, name: authorName } : null,
        createdAt: thread.createdAt.toISOString(),
        updatedAt: thread.updatedAt.toISOString(),
        postCount: post?.postCount ?? 0,
        lastPost: post
          ? { author: post.authorId && post.authorName !== null ? { id: post.authorId, name: post.authorName } : null, createdAt: post.createdAt.toISOString(), excerpt: markdownExcerpt(post.body, 200) }
          : null,
        resolvedAt: thread.resolvedAt ? thread.resolvedAt.toISOString() : null,
        resolvedBy: thread.resolvedBy && resolverName !== null ? { id: thread.resolvedBy, name: resolverName } : null,
      };
    });
  }

  function threadQuery() {
    return db
      .select({ thread: threads, authorName: users.name, resolverName: resolver.name })
      .from(threads)
      .leftJoin(users, eq(users.id, threads.createdBy))
      .leftJoin(resolver, eq(resolver.id, threads.resolvedBy));
  }

  async function threadRow(studyId: string, threadId: string) {
    const [row] = await threadQuery().where(and(eq(threads.studyId, studyId), eq(threads.id, threadId)));
    if (!row) throw notFound("This thread does not exist in this study. It may have been deleted with its target.");
    return row;
  }

  async function detail(studyId: string, threadId: string): Promise<ThreadDetail> {
    const row = await threadRow(studyId, threadId);
    const [summary] = await summarize(studyId, [row]);
    const posts = await db
      .select({ post: threadPosts, authorName: users.name })
      .from(threadPosts)
      .leftJoin(users, eq(users.id, threadPosts.authorId))
      .where(eq(threadPosts.threadId, threadId))
      .orderBy(threadPosts.createdAt, threadPosts.id);
    const mentionIds = [...new Set(posts.flatMap((p) => p.post.mentions))];
    const mentioned = mentionIds.length ? await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, mentionIds)) : [];
    const names = new Map(mentioned.map((u) => [u.id, u.name]));
    const [resolution, related] = await Promise.all([
      row.thread.resolutionDecisionId ? decisionBriefs(db, studyId, eq(codingDecisions.id, row.thread.resolutionDecisionId), 1) : Promise.resolve([]),
      relatedDecisions(db, studyId, summary.target),
    ]);
    return {
      ...summary,
      posts: posts.map(({ post, authorName }) => ({
        id: post.id,
        author: post.authorId && authorName !== null ? { id: post.authorId, name: authorName } : null,
        body: post.body,
        mentions: post.mentions.filter((id) => names.has(id)).map((id): PersonRef => ({ id, name: names.get(id)! })),
        createdAt: post.createdAt.toISOString(),
      })),
      resolutionDecision: resolution[0] ?? null,
      relatedDecisions: related,
    };
  }

  /** The mentioned ids, once each, all members of the study (else a 400 naming the field). */
  async function checkMentions(studyId: string, ids: string[]): Promise<string[]> {
    const unique = [...new Set(ids)];
    if (unique.length === 0) return [];
    const found = await db
      .select({ userId: memberships.userId })
      .from(memberships)
      .where(and(eq(memberships.studyId, studyId), inArray(memberships.userId, unique)));
    const members = new Set(found.map((m) => m.userId));
    const strangers = unique.filter((id) => !members.has(id));
    if (strangers.length) {
      throw invalidInput(`Only members of the study can be mentioned; ${strangers.length === 1 ? "one mentioned id is" : `${strangers.length} mentioned ids are`} not a member.`, {
        mentions: `Not a member of this study: ${strangers.join(", ")}`,
      });
    }
    return unique;
  }

  /** Writes a post and its mentions' notifications; returns the notification ids to e-mail at once. */
  async function writePost(tx: DbOrTx, args: { studyId: string; thread: { id: string; title: string }; author: Person; body: string; mentions: string[] }): Promise<string[]> {
    const [post] = await tx
      .insert(threadPosts)
      .values({ threadId: args.thread.id, authorId: args.author.id, body: args.body, mentions: args.mentions })
      .returning({ id: threadPosts.id });
    return notifications.recordMentions(tx, {
      studyId: args.studyId,
      threadId: args.thread.id,
      postId: post.id,
      authorName: args.author.name,
      threadTitle: args.thread.title,
      body: args.body,
      // Mentioning oneself is allowed in the text but notifies no one.
      userIds: args.mentions.filter((id) => id !== args.author.id),
    });
  }

  function mayResolve(role: StudyRole | null, user: Person, thread: ThreadRow): void {
    if (!canResolveThread(role, user.id, { author: thread.createdBy ? { id: thread.createdBy, name: "" } : null })) {
      throw forbidden("Only the person who opened this thread, a coder or the study lead can resolve or reopen it.");
    }
  }

  return {
    detail,

    async list(studyId: string, query: ThreadListQuery): Promise<ThreadList> {
      const filters: Array<SQL | undefined> = [
        eq(threads.studyId, studyId),
        query.targetType ? eq(threads.targetType, query.targetType) : undefined,
        query.targetId ? eq(threads.targetId, query.targetId) : undefined,
        query.traitId ? eq(threads.traitId, query.traitId) : undefined,
        query.authorId ? eq(threads.createdBy, query.authorId) : undefined,
        query.mentioned
          ? sql`EXISTS (SELECT 1 FROM thread_posts p WHERE p.thread_id = ${threads.id} AND ${query.mentioned}::uuid = ANY(p.mentions))`
          : undefined,
      ];
      const statusFilter = query.status === "all" ? undefined : eq(threads.status, query.status);
      const [rows, [{ total }], byStatus] = await Promise.all([
        threadQuery()
          .where(and(...filters, statusFilter))
          .orderBy(desc(threads.updatedAt), desc(threads.id))
          .limit(query.pageSize)
          .offset((query.page - 1) * query.pageSize),
        db.select({ total: count() }).from(threads).where(and(...filters, statusFilter)),
        db.select({ status: threads.status, n: count() }).from(threads).where(and(...filters)).groupBy(threads.status),
      ]);
      const counts = { open: 0, resolved: 0 };
      for (const s of byStatus) if (s.status === "open" || s.status === "resolved") counts[s.status] = s.n;
      return { rows: await summarize(studyId, rows), total, page: query.page, pageSize: query.pageSize, counts };
    },

    async create(
      studyId: string,
      user: Person,
      input: { target: { type: ThreadTargetType; id: string; traitId?: string }; title?: string; body: string; mentions: string[] },
    ): Promise<ThreadDetail> {
      const key = { type: input.target.type, id: input.target.id, traitId: input.target.traitId ?? null };
      const target = (await describeTargets(db, studyId, [key])).get(keyOf(key))!;
      if (target.missing) {
        const what = { trait: "trait", taxon: "taxon", value: "taxon and trait", override: "outcome override", run: "run", comparison: "comparison" }[input.target.type];
        throw invalidInput(`The thread's target was not found: no ${what} of this study has this id.`, {
          [input.target.type === "value" && target.label.startsWith("a deleted trait") ? "target.traitId" : "target.id"]: `No ${what} of this study has this id`,
        });
      }
      const mentions = await checkMentions(studyId, input.mentions);
      const title = input.title?.trim() || titleFromBody(input.body);
      const { threadId, mailIds } = await db.transaction(async (tx) => {
        const [thread] = await tx
          .insert(threads)
          .values({ studyId, targetType: key.type, targetId: key.id, traitId: key.traitId, title, createdBy: user.id })
          .returning({ id: threads.id });
        const ids = await writePost(tx, { studyId, thread: { id: thread.id, title }, author: user, body: input.body, mentions });
        await addActivity(tx, { studyId, userId: user.id, kind: "thread.opened", summary: `${user.name} opened “${title}” about ${target.label}`, refType: "thread", refId: thread.id });
        return { threadId: thread.id, mailIds: ids };
      });
      await notifications.mailMentions(mailIds, target.label);
      return detail(studyId, threadId);
    },

    async post(studyId: string, threadId: string, user: Person, input: { body: string; mentions: string[] }): Promise<ThreadDetail> {
      const { thread } = await threadRow(studyId, threadId);
      const mentions = await checkMentions(studyId, input.mentions);
      const mailIds = await db.transaction(async (tx) => {
        const ids = await writePost(tx, { studyId, thread, author: user, body: input.body, mentions });
        await tx.update(threads).set({ updatedAt: sql`now()` }).where(eq(threads.id, threadId));
        await addActivity(tx, { studyId, userId: user.id, kind: "thread.replied", summary: `${user.name} replied in “${thread.title}”`, refType: "thread", refId: threadId });
        return ids;
      });
      if (mailIds.length) {
        const key = { type: thread.targetType, id: thread.targetId, traitId: thread.traitId };
        const target = (await describeTargets(db, studyId, [key])).get(keyOf(key))!;
        await notifications.mailMentions(mailIds, target.label);
      }
      return detail(studyId, threadId);
    },

    async resolve(studyId: string, threadId: string, user: Person, role: StudyRole | null, decisionId: string | null): Promise<ThreadDetail> {
      const current = await threadRow(studyId, threadId);
      mayResolve(role, user, current.thread);
      if (decisionId) {
        const [decision] = await db
          .select({ id: codingDecisions.id })
          .from(codingDecisions)
          .where(and(eq(codingDecisions.studyId, studyId), eq(codingDecisions.id, decisionId)));
        if (!decision) throw invalidInput("The linked coding decision was not found in this study.", { decisionId: "No coding decision of this study has this id" });
      }
      await db.transaction(async (tx) => {
        const changed = await tx
          .update(threads)
          .set({ status: "resolved", resolvedAt: sql`now()`, resolvedBy: user.id, resolutionDecisionId: decisionId, updatedAt: sql`now()` })
          .where(and(eq(threads.id, threadId), eq(threads.status, "open")))
          .returning({ id: threads.id });
        if (changed.length === 0) {
          const by = current.resolverName ? ` by ${current.resolverName}` : "";
          throw conflict(`This thread is already resolved${by}. Reload it to see the resolution.`);
        }
        await addActivity(tx, {
          studyId,
          userId: user.id,
          kind: "thread.resolved",
          summary: `${user.name} resolved “${current.thread.title}”${decisionId ? ", linking the coding decision that settled it" : ""}`,
          refType: "thread",
          refId: threadId,
        });
      });
      return detail(studyId, threadId);
    },

    async reopen(studyId: string, threadId: string, user: Person, role: StudyRole | null): Promise<ThreadDetail> {
      const current = await threadRow(studyId, threadId);
      mayResolve(role, user, current.thread);
      await db.transaction(async (tx) => {
        const changed = await tx
          .update(threads)
          .set({ status: "open", resolvedAt: null, resolvedBy: null, resolutionDecisionId: null, updatedAt: sql`now()` })
          .where(and(eq(threads.id, threadId), eq(threads.status, "resolved")))
          .returning({ id: threads.id });
        if (changed.length === 0) throw conflict("This thread is already open.");
        await addActivity(tx, { studyId, userId: user.id, kind: "thread.reopened", summary: `${user.name} reopened “${current.thread.title}”`, refType: "thread", refId: threadId });
      });
      return detail(studyId, threadId);
    },
  };
}
export type ThreadService = ReturnType<typeof createThreadService>;
