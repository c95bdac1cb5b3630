import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import {
  postCreateSchema,
  threadCreateSchema,
  threadDetailSchema,
  threadListQuerySchema,
  threadListSchema,
  threadParamsSchema,
  threadResolveSchema,
} from "../../shared/schemas/threads";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function threadsRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { threads } = ctx.services;

  api.add({
    method: "get",
    path: "/studies/:studyId/threads",
    operationId: "listThreads",
    summary: "Threads of a study, latest activity first, filtered by status, target, author or mentioned person",
    tags: ["threads"],
    access: "study.read",
    params: studyParamsSchema,
    query: threadListQuerySchema,
    response: { status: 200, schema: threadListSchema },
    handler: ({ params, query }) => threads.list(params.studyId, query),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/threads",
    operationId: "createThread",
    summary: "Open a thread on a trait, a taxon, a trait value, an outcome override, a run or a comparison, with its first post",
    tags: ["threads"],
    access: "threads.post",
    params: studyParamsSchema,
    body: threadCreateSchema,
    response: { status: 201, schema: threadDetailSchema },
    handler: ({ params, body, user }) => threads.create(params.studyId, user!, body),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/threads/:threadId",
    operationId: "getThread",
    summary: "A thread with its posts (bodies verbatim), its resolution and the decisions a resolution can link",
    tags: ["threads"],
    access: "study.read",
    params: threadParamsSchema,
    response: { status: 200, schema: threadDetailSchema },
    handler: ({ params }) => threads.detail(params.studyId, params.threadId),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/threads/:threadId/posts",
    operationId: "replyToThread",
    summary: "Reply in a thread; mentioned members are notified",
    tags: ["threads"],
    access: "threads.post",
    params: threadParamsSchema,
    body: postCreateSchema,
    response: { status: 201, schema: threadDetailSchema },
    handler: ({ params, body, user }) => threads.post(params.studyId, params.threadId, user!, body),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/threads/:threadId/resolve",
    operationId: "resolveThread",
    summary: "Resolve a thread, optionally linking the coding decision that settled it (coders, study leads and the thread's author)",
    tags: ["threads"],
    access: "threads.post",
    params: threadParamsSchema,
    body: threadResolveSchema,
    response: { status: 200, schema: threadDetailSchema },
    handler: ({ params, body, user, role }) => threads.resolve(params.studyId, params.threadId, user!, role, body.decisionId),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/threads/:threadId/reopen",
    operationId: "reopenThread",
    summary: "Reopen a resolved thread (coders, study leads and the thread's author)",
    tags: ["threads"],
    access: "threads.post",
    params: threadParamsSchema,
    response: { status: 200, schema: threadDetailSchema },
    handler: ({ params, user, role }) => threads.reopen(params.studyId, params.threadId, user!, role),
  });

  return api;
}
