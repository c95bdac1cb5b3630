import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import { ratesResultSchema } from "../../shared/schemas/outcomes";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function ratesRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { outcomes } = ctx.services;

  api.add({
    method: "get",
    path: "/studies/:studyId/rates",
    summary: "Extinction through time: per-capita extinction rate and proportional extinction for each stage the study's taxa span",
    tags: ["outcomes"],
    access: "study.read",
    params: studyParamsSchema,
    response: { status: 200, schema: ratesResultSchema },
    handler: ({ params }) => outcomes.rates(params.studyId),
  });

  return api;
}
