import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { activityListQuerySchema, activityListSchema } from "../../shared/schemas/activity";
import { studyParamsSchema } from "../../shared/schemas/common";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function activityRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  api.add({
    method: "get",
    path: "/studies/:studyId/activity",
    operationId: "listActivity",
    summary: "The study's activity feed, newest first: imports, bulk decisions, runs, comparisons, threads and membership changes",
    tags: ["activity"],
    access: "study.read",
    params: studyParamsSchema,
    query: activityListQuerySchema,
    response: { status: 200, schema: activityListSchema },
    handler: ({ params, query }) => ctx.services.activity.list(params.studyId, query),
  });
  return api;
}
