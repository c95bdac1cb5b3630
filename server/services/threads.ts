// Threads about coding decisions and results. A thread is attached to a target of the study (a
// trait, a taxon, one trait value, an outcome override, a run or a comparison), holds posts in
// light markdown stored verbatim, and is open or resolved; a resolution may link the coding
// decision that settled it. Mentions notify members (see ./notifications.ts); opening, replying,
// resolving and reopening are written to the study's activity feed in the same transaction.
import { and, count, desc, eq, inArray, or, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type { Database, DbOrTx } from "../db";
import { codingDecisions, comparisons, memberships, outcomeOverrides, runs, taxa, threadPosts, threads, traits, users } from "../../db/schema/index";
import { markdownExcerpt } from "../../shared/markdown";
import type { StudyRole } from "../../shared/roles";
import {
  canResolveThread,
  titleFromBody,
  type DecisionBrief,
  type PersonRef,
  type ThreadDetail,
  type ThreadList,
  type ThreadListQuery,
  type ThreadSummary,
  type ThreadTarget,
  type ThreadTargetType,
} from "../../shared/schemas/threads";
import type { TraitState } from "../../shared/codebook";
import { badRequest, conflict, forbidden, notFound } from "../http/errors";
import { addActivity } from "./activity";
import type { NotificationService } from "./notifications";

interface Person {
  id: string;
  name: string;
}

type ThreadRow = typeof threads.$inferSelect;

interface TargetKey {
  type: string;
  id: string;
  traitId: string | null;
}

const keyOf = (t: TargetKey) => `${t.type}:${t.id}:${t.traitId ?? ""}`;

const OUTCOME_WORDS: Record<string, string> = { survivor: "survivor", victim: "victim", excluded: "not at risk" };

const formatNumber = (n: number) => (Number.isInteger(n) ? String(n) : String(Number(n.toPrecision(10))));

interface TraitInfo {
  label: string;
  kind: string;
  states: TraitState[];
  unit: string | null;
}

/** A stored value for people: a state's label, a number with its unit, a range end with its interval. */
function valueText(field: string, value: unknown, trait: TraitInfo | undefined): string {
  if (value === null || value === undefined || value === "") return "";
  if (trait) {
    if (trait.kind === "numeric" && typeof value === "number") return `${formatNumber(value)}${trait.unit ? ` ${trait.unit}` : ""}`;
    const state = trait.states.find((s) => s.code === value);
    return state ? state.label : String(value);
  }
  if ((field === "fad" || field === "lad") && typeof value === "object") {
    const end = value as { ma?: number; interval?: string | null };
    const ma = typeof end.ma === "number" ? `${formatNumber(end.ma)} Ma` : "";
    return end.interval ? (ma ? `${end.interval} · ${ma}` : end.interval) : ma;
  }
  if (field === "outcome" && typeof value === "string") return OUTCOME_WORDS[value] ?? value;
  if (typeof value === "object") return JSON.stringify(value);
  return String(value);
}

const FIELD_WORDS: Record<string, string> = {
  name: "Name",
  higherTaxon: "Higher taxon",
  notes: "Notes",
  fad: "First appearance",
  lad: "Last appearance",
  outcome: "Outcome",
};

export function createThreadService(db: Database, notifications: NotificationService) {
  const resolver = alias(users, "resolver");

  /** Labels of targets, read in one query per kind of target. */
  async function describeTargets(studyId: string, keys: TargetKey[]): Promise<Map<string, ThreadTarget>> {
    const ids = (type: string) => [...new Set(keys.filter((k) => k.type === type).map((k) => k.id))];
    const traitIds = [...new Set([...ids("trait"), ...keys.filter((k) => k.type === "value" && k.traitId).map((k) => k.traitId!)])];
    const taxonIds = [...new Set([...ids("taxon"), ...ids("value")])];
    const [traitRows, taxonRows, overrideRows, runRows, comparisonRows] = await Promise.all([
      traitIds.length ? db.select({ id: traits.id, label: traits.label }).from(traits).where(and(eq(traits.studyId, studyId), inArray(traits.id, traitIds))) : [],
      taxonIds.length
        ? db.select({ id: taxa.id, name: taxa.name, deletedAt: taxa.deletedAt }).from(taxa).where(and(eq(taxa.studyId, studyId), inArray(taxa.id, taxonIds)))
        : [],
      ids("override").length
        ? db
            .select({ id: outcomeOverrides.id, taxonId: outcomeOverrides.taxonId, taxonName: taxa.name, outcome: outcomeOverrides.outcome, boundaryMa: outcomeOverrides.boundaryMa, revokedAt: outcomeOverrides.revokedAt })
            .from(outcomeOverrides)
            .innerJoin(taxa, eq(taxa.id, outcomeOverrides.taxonId))
            .where(and(eq(outcomeOverrides.studyId, studyId), inArray(outcomeOverrides.id, ids("override"))))
        : [],
      ids("run").length ? db.select({ id: runs.id, name: runs.name }).from(runs).where(and(eq(runs.studyId, studyId), inArray(runs.id, ids("run")))) : [],
      ids("comparison").length
        ? db.select({ id: comparisons.id, name: comparisons.name }).from(comparisons).where(and(eq(comparisons.studyId, studyId), inArray(comparisons.id, ids("comparison"))))
        : [],
    ]);
    const trait = new Map(traitRows.map((r) => [r.id, r]));
    const taxon = new Map(taxonRows.map((r) => [r.id, r]));
    const override = new Map(overrideRows.map((r) => [r.id, r]));
    const run = new Map(runRows.map((r) => [r.id, r]));
    const comparison = new Map(comparisonRows.map((r) => [r.id, r]));

    const out = new Map<string, ThreadTarget>();
    for (const key of keys) {
      const base = { type: key.type as ThreadTargetType, id: key.id, traitId: key.traitId };
      let described: ThreadTarget;
      switch (key.type) {
        case "trait": {
          const t = trait.get(key.id);
          described = { ...base, label: t ? t.label : "a trait that was deleted", taxonId: null, missing: !t };
          break;
        }
        case "taxon": {
          const t = taxon.get(key.id);
          described = { ...base, label: t ? t.name : "a taxon that was deleted", taxonId: key.id, missing: !t || t.deletedAt !== null };
          break;
        }
        case "value": {
          const t = taxon.get(key.id);
          const tr = key.traitId ? trait.get(key.traitId) : undefined;
          described = {
            ...base,
            label: `${tr ? tr.label : "a deleted trait"} of ${t ? t.name : "a deleted taxon"}`,
            taxonId: key.id,
            missing: !t || t.deletedAt !== null || !tr,
          };
          break;
        }
        case "override": {
          const o = override.get(key.id);
          const where = o?.boundaryMa === null || o?.boundaryMa === undefined ? "at any boundary" : `at ${formatNumber(o.boundaryMa)} Ma`;
          described = o
            ? { ...base, label: `Outcome of ${o.taxonName} set to ${OUTCOME_WORDS[o.outcome] ?? o.outcome} ${where}${o.revokedAt ? " (revoked)" : ""}`, taxonId: o.taxonId, missing: false }
            : { ...base, label: "an outcome override that was deleted", taxonId: null, missing: true };
          break;
        }
        case "run": {
          const r = run.get(key.id);
          described = { ...base, label: r ? `the run “${r.name}”` : "a run that was deleted", taxonId: null, missing: !r };
          break;
        }
        default: {
          const c = comparison.get(key.id);
          described = { ...base, label: c ? `the comparison “${c.name}”` : "a comparison that was deleted", taxonId: null, missing: !c };
        }
      }
      out.set(keyOf(key), described);
    }
    return out;
  }

  /** Coding decisions for people, by a condition on coding_decisions; newest first. */
  async function decisionBriefs(studyId: string, where: SQL | undefined, limit: number): Promise<DecisionBrief[]> {
    const rows = await db
      .select({
        d: codingDecisions,
        taxonName: taxa.name,
        trait: { label: traits.label, kind: traits.kind, states: traits.states, unit: traits.unit },
        userName: users.name,
      })
      .from(codingDecisions)
      .leftJoin(taxa, eq(taxa.id, codingDecisions.taxonId))
      .leftJoin(traits, eq(traits.id, codingDecisions.traitId))
      .leftJoin(users, eq(users.id, codingDecisions.userId))
      .where(and(eq(codingDecisions.studyId, studyId), where))
      .orderBy(desc(codingDecisions.createdAt), desc(codingDecisions.id))
      .limit(limit);
    return rows.map(({ d, taxonName, trait, userName }) => {
      const traitInfo = d.traitId && trait?.label ? (trait as TraitInfo) : undefined;
      const of = taxonName ? ` of ${taxonName}` : "";
      const subject = traitInfo ? `${traitInfo.label}${of}` : d.field === "taxon" ? (taxonName ?? "A taxon") : `${FIELD_WORDS[d.field] ?? d.field}${of}`;
      return {
        id: d.id,
        action: d.action,
        subject,
        oldText: d.field === "taxon" ? "" : valueText(d.field, d.oldValue, traitInfo),
        newText: d.field === "taxon" ? "" : valueText(d.field, d.newValue, traitInfo),
        reason: d.reason,
        user: d.userId && userName !== null ? { id: d.userId, name: userName } : null,
        createdAt: d.createdAt.toISOString(),
      };
    });
  }

  /** What a resolution of a thread on this target can link: recent decisions about it. */
  async function relatedDecisions(studyId: string, target: ThreadTarget): Promise<DecisionBrief[]> {
    switch (target.type) {
      case "value":
        // The value's own changes, and the taxon's creation (an import) or restoration that set it.
        return decisionBriefs(
          studyId,
          and(eq(codingDecisions.taxonId, target.id), or(eq(codingDecisions.traitId, target.traitId!), eq(codingDecisions.field, "taxon"))),
          10,
        );
      case "taxon":
        return decisionBriefs(studyId, eq(codingDecisions.taxonId, target.id), 10);
      case "trait":
        return decisionBriefs(studyId, eq(codingDecisions.traitId, target.id), 10);
      case "override":
        return target.taxonId ? decisionBriefs(studyId, and(eq(codingDecisions.taxonId, target.taxonId), eq(codingDecisions.field, "outcome")), 10) : [];
      default:
        return [];
    }
  }

  async function summarize(studyId: string, rows: Array<{ thread: ThreadRow; authorName: string | null; resolverName: string | null }>): Promise<ThreadSummary[]> {
    if (rows.length === 0) return [];
    const ids = rows.map((r) => r.thread.id);
    const [targets, lastPosts] = await Promise.all([
      describeTargets(
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
      row.thread.resolutionDecisionId ? decisionBriefs(studyId, eq(codingDecisions.id, row.thread.resolutionDecisionId), 1) : Promise.resolve([]),
      relatedDecisions(studyId, summary.target),
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
      throw badRequest(`Only members of the study can be mentioned; ${strangers.length === 1 ? "one mentioned id is" : `${strangers.length} mentioned ids are`} not a member.`, {
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
      const target = (await describeTargets(studyId, [key])).get(keyOf(key))!;
      if (target.missing) {
        const what = { trait: "trait", taxon: "taxon", value: "taxon and trait", override: "outcome override", run: "run", comparison: "comparison" }[input.target.type];
        throw badRequest(`The thread's target was not found: no ${what} of this study has this id.`, {
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
        const target = (await describeTargets(studyId, [key])).get(keyOf(key))!;
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
        if (!decision) throw badRequest("The linked coding decision was not found in this study.", { decisionId: "No coding decision of this study has this id" });
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
