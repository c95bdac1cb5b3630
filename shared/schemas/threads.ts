// Threads: discussions attached to a trait (its coding rule), a taxon, a single trait value, an
// outcome override, a run or a comparison. Open or resolved; a resolution may name the coding
// decision that settled it. Post bodies are light markdown (shared/markdown.ts), stored verbatim.
import { z } from "zod";
import { MARKDOWN_MAX_LENGTH } from "../markdown";
import { can, type StudyRole } from "../roles";
import { isoDateSchema, oneLine, uuidSchema, wellFormed } from "./common";

export const THREAD_TARGET_TYPES = ["trait", "taxon", "value", "override", "run", "comparison"] as const;
export type ThreadTargetType = (typeof THREAD_TARGET_TYPES)[number];

export const THREAD_TARGET_LABELS: Record<ThreadTargetType, string> = {
  trait: "Trait and its coding rule",
  taxon: "Taxon",
  value: "Trait value",
  override: "Outcome override",
  run: "Run",
  comparison: "Modern comparison",
};

export const THREAD_STATUSES = ["open", "resolved"] as const;
export type ThreadStatus = (typeof THREAD_STATUSES)[number];

export const THREAD_TITLE_MAX = 200;
export const THREAD_MAX_MENTIONS = 50;
export const THREADS_MAX_PAGE_SIZE = 100;

export const personRefSchema = z.object({ id: z.uuid(), name: z.string() }).meta({ id: "PersonRef" });
export type PersonRef = z.infer<typeof personRefSchema>;

export const postBodySchema = z
  .string({ message: "Write the post before sending it" })
  .trim()
  .min(1, "Write the post before sending it")
  .max(MARKDOWN_MAX_LENGTH, `A post may have at most ${MARKDOWN_MAX_LENGTH.toLocaleString("en-US")} characters`)
  .check(wellFormed("The post"));

export const mentionsSchema = z
  .array(uuidSchema, { message: "mentions must be a list of member ids" })
  .max(THREAD_MAX_MENTIONS, `A post may mention at most ${THREAD_MAX_MENTIONS} people`)
  .default([])
  .meta({ description: "Members mentioned in the body (as @Name); each is notified" });

export const threadTargetInputSchema = z
  .strictObject({
    type: z.enum(THREAD_TARGET_TYPES, { message: `Target type must be one of ${THREAD_TARGET_TYPES.join(", ")}` }),
    id: uuidSchema.meta({ description: "The trait, taxon, override, run or comparison; for a value, the taxon" }),
    traitId: uuidSchema.optional().meta({ description: "For a value only: the trait whose value of the taxon is discussed" }),
  })
  .superRefine((target, ctx) => {
    if (target.type === "value" && !target.traitId) ctx.addIssue({ code: "custom", path: ["traitId"], message: "A thread on a value names its trait (traitId)" });
    if (target.type !== "value" && target.traitId) ctx.addIssue({ code: "custom", path: ["traitId"], message: "traitId is only given for a thread on a value" });
  })
  .meta({ id: "ThreadTargetInput" });
export type ThreadTargetInput = z.infer<typeof threadTargetInputSchema>;

export const threadCreateSchema = z
  .strictObject({
    target: threadTargetInputSchema,
    title: z
      .string()
      .trim()
      .max(THREAD_TITLE_MAX, `The title may have at most ${THREAD_TITLE_MAX} characters`)
      .check(oneLine("The title"))
      .optional()
      .meta({ description: "Defaults to the first line of the body" }),
    body: postBodySchema,
    mentions: mentionsSchema,
  })
  .meta({ id: "ThreadCreate" });
export type ThreadCreateInput = z.input<typeof threadCreateSchema>;

export const postCreateSchema = z.strictObject({ body: postBodySchema, mentions: mentionsSchema }).meta({ id: "PostCreate" });
export type PostCreateInput = z.input<typeof postCreateSchema>;

export const threadResolveSchema = z
  .strictObject({
    decisionId: uuidSchema.nullable().default(null).meta({ description: "The coding decision that settled the thread (optional)" }),
  })
  .meta({ id: "ThreadResolve" });
export type ThreadResolveInput = z.input<typeof threadResolveSchema>;

export const threadParamsSchema = z.object({ studyId: uuidSchema, threadId: uuidSchema });

const wholeNumber = (name: string, max?: number) => {
  const message = max ? `${name} must be a whole number from 1 to ${max}` : `${name} must be a whole number from 1`;
  const base = z.coerce.number({ message }).int(message).min(1, message);
  return max ? base.max(max, message) : base;
};

export const threadListQuerySchema = z.object({
  status: z.enum(["open", "resolved", "all"], { message: "status must be open, resolved or all" }).default("all"),
  targetType: z.enum(THREAD_TARGET_TYPES, { message: `targetType must be one of ${THREAD_TARGET_TYPES.join(", ")}` }).optional(),
  targetId: uuidSchema.optional().meta({ description: "Threads about this trait, taxon, override, run or comparison (a taxon's also include its values' threads)" }),
  traitId: uuidSchema.optional().meta({ description: "With targetType=value and targetId (the taxon): that one value's threads" }),
  authorId: uuidSchema.optional().meta({ description: "Threads opened by this person" }),
  mentioned: uuidSchema.optional().meta({ description: "Threads in which a post mentions this person" }),
  page: wholeNumber("page").default(1),
  pageSize: wholeNumber("pageSize", THREADS_MAX_PAGE_SIZE).default(25),
});
export type ThreadListQuery = z.output<typeof threadListQuerySchema>;

export const threadTargetSchema = z
  .object({
    type: z.enum(THREAD_TARGET_TYPES),
    id: z.uuid(),
    traitId: z.uuid().nullable(),
    label: z.string().meta({ description: "What the thread is about, in words (e.g. “Feeding mode of Tethyconcha lata”)" }),
    taxonId: z.uuid().nullable().meta({ description: "The taxon concerned (taxon, value and override threads)" }),
    missing: z.boolean().meta({ description: "The target was deleted since the thread was opened" }),
  })
  .meta({ id: "ThreadTarget" });
export type ThreadTarget = z.infer<typeof threadTargetSchema>;

export const threadSummarySchema = z
  .object({
    id: z.uuid(),
    title: z.string(),
    status: z.enum(THREAD_STATUSES),
    target: threadTargetSchema,
    author: personRefSchema.nullable(),
    createdAt: isoDateSchema,
    updatedAt: isoDateSchema.meta({ description: "Last post, resolution or reopening" }),
    postCount: z.number().int(),
    lastPost: z.object({ author: personRefSchema.nullable(), createdAt: isoDateSchema, excerpt: z.string() }).nullable(),
    resolvedAt: isoDateSchema.nullable(),
    resolvedBy: personRefSchema.nullable(),
  })
  .meta({ id: "ThreadSummary" });
export type ThreadSummary = z.infer<typeof threadSummarySchema>;

export const threadListSchema = z
  .object({
    rows: z.array(threadSummarySchema).meta({ description: "Latest activity first" }),
    total: z.number().int(),
    page: z.number().int(),
    pageSize: z.number().int(),
    counts: z.object({ open: z.number().int(), resolved: z.number().int() }).meta({ description: "Under the same filters, whatever the status filter" }),
  })
  .meta({ id: "ThreadList" });
export type ThreadList = z.infer<typeof threadListSchema>;

export const threadPostSchema = z
  .object({
    id: z.uuid(),
    author: personRefSchema.nullable(),
    body: z.string().meta({ description: "Exactly as written (light markdown); clients render it as text with formatting, never as HTML" }),
    mentions: z.array(personRefSchema),
    createdAt: isoDateSchema,
  })
  .meta({ id: "ThreadPost" });
export type ThreadPost = z.infer<typeof threadPostSchema>;

/** A coding decision as a thread shows it: what changed, from what to what, and why. */
export const decisionBriefSchema = z
  .object({
    id: z.uuid(),
    action: z.string(),
    subject: z.string().meta({ description: "What was changed, e.g. “Body size of Vessiraspis minor”" }),
    oldText: z.string().meta({ description: "The value before, for people (empty when none)" }),
    newText: z.string().meta({ description: "The value after, for people (empty when none)" }),
    reason: z.string(),
    user: personRefSchema.nullable(),
    createdAt: isoDateSchema,
  })
  .meta({ id: "DecisionBrief" });
export type DecisionBrief = z.infer<typeof decisionBriefSchema>;

export const threadDetailSchema = threadSummarySchema
  .extend({
    posts: z.array(threadPostSchema).meta({ description: "Oldest first" }),
    resolutionDecision: decisionBriefSchema.nullable(),
    relatedDecisions: z.array(decisionBriefSchema).meta({ description: "Recent coding decisions about the target, newest first: what a resolution can link" }),
  })
  .meta({ id: "ThreadDetail" });
export type ThreadDetail = z.infer<typeof threadDetailSchema>;

/**
 * Who may resolve or reopen a thread: coders and study leads (the action `threads.resolve`), and
 * the person who opened it while they may still post.
 */
export function canResolveThread(role: StudyRole | null | undefined, userId: string, thread: { author: PersonRef | null }): boolean {
  if (can(role, "threads.resolve")) return true;
  return thread.author?.id === userId && can(role, "threads.post");
}

/** The first line of a body, cut to the title's length: the title when none is given. */
export function titleFromBody(body: string): string {
  const firstLine = body.trim().split(/\r?\n/)[0].replace(/[*`_#>]+/g, "").trim();
  const text = firstLine || "Discussion";
  return text.length <= 90 ? text : `${text.slice(0, 89).trimEnd()}…`;
}
