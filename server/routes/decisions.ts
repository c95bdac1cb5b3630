import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import {
  batchParamsSchema,
  decisionListQuerySchema,
  decisionListSchema,
  decisionParamsSchema,
  decisionRevertSchema,
  revertConflictSchema,
  revertResultSchema,
} from "../../shared/schemas/decisions";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function decisionsRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { decisions } = ctx.services;

  api.add({
    method: "get",
    path: "/studies/:studyId/decisions",
    operationId: "listDecisions",
    summary: "The coding decisions of a study, newest first, filtered by taxon, trait, import, person or batch",
    tags: ["decisions"],
    access: "study.read",
    params: studyParamsSchema,
    query: decisionListQuerySchema,
    response: { status: 200, schema: decisionListSchema },
    handler: ({ params, query }) => decisions.list(params.studyId, query),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/decisions/:decisionId/revert",
    operationId: "revertDecision",
    summary: "Put back the value a decision replaced (the revert is itself a decision)",
    tags: ["decisions"],
    access: "taxa.edit",
    params: decisionParamsSchema,
    body: decisionRevertSchema,
    errorBody: { status: 409, schema: revertConflictSchema, description: "The value changed since, naming the current value" },
    response: { status: 200, schema: revertResultSchema, description: "Reverted. 409 RevertConflict: the value changed since, naming the current value" },
    handler: ({ params, body, user }) => decisions.revert(params.studyId, params.decisionId, user!, body.reason),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/decisions/batches/:batchId/revert",
    operationId: "revertDecisionBatch",
    summary: "Revert every decision of one edit (a bulk edit, a codebook remap) at once",
    tags: ["decisions"],
    access: "taxa.edit",
    params: batchParamsSchema,
    body: decisionRevertSchema,
    errorBody: { status: 409, schema: revertConflictSchema, description: "Values changed since; nothing was reverted" },
    response: { status: 200, schema: revertResultSchema, description: "Reverted. 409 RevertConflict: values changed since; nothing was reverted" },
    handler: ({ params, body, user }) => decisions.revertBatch(params.studyId, params.batchId, user!, body.reason),
  });

  return api;
}
