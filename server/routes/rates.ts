import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import { ratesResultSchema } from "../../shared/schemas/outcomes";
import { turnoverQuerySchema, turnoverResultSchema } from "../../shared/schemas/turnover";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function ratesRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { outcomes, turnover } = ctx.services;

  api.add({
    method: "get",
    path: "/studies/:studyId/rates",
    operationId: "getRatesThroughTime",
    summary: "Extinction through time: per-capita extinction rate and proportional extinction for each stage the study's taxa span",
    tags: ["outcomes"],
    access: "study.read",
    params: studyParamsSchema,
    response: { status: 200, schema: ratesResultSchema },
    handler: ({ params }) => outcomes.rates(params.studyId),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/turnover",
    operationId: "getTurnover",
    summary:
      "Turnover through time: origination and extinction per stage, standing diversity (optionally split by a trait's states or higher taxon), how far the crisis stage stands out, and the boundary scorecard",
    tags: ["outcomes"],
    access: "study.read",
    params: studyParamsSchema,
    query: turnoverQuerySchema,
    response: { status: 200, schema: turnoverResultSchema },
    handler: ({ params, query }) => turnover.turnover(params.studyId, query),
  });

  return api;
}
