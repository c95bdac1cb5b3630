import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import { outcomesQuerySchema, outcomesResultSchema } from "../../shared/schemas/outcomes";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function outcomesRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { outcomes } = ctx.services;

  api.add({
    method: "get",
    path: "/studies/:studyId/outcomes",
    operationId: "getOutcomes",
    summary: "Survivors, victims and taxa not at risk across a boundary, with the proportional extinction, data warnings and the lists (overrides applied)",
    tags: ["outcomes"],
    access: "study.read",
    params: studyParamsSchema,
    query: outcomesQuerySchema,
    response: { status: 200, schema: outcomesResultSchema },
    handler: ({ params, query }) => outcomes.outcomes(params.studyId, query),
  });

  return api;
}
