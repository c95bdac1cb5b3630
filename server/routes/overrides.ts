import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import {
  outcomeOverrideBulkResultSchema,
  outcomeOverrideBulkSchema,
  outcomeOverrideCreatedSchema,
  outcomeOverrideCreateSchema,
  outcomeOverrideListQuerySchema,
  outcomeOverrideListSchema,
  outcomeOverrideParamsSchema,
  outcomeOverrideRevokeSchema,
  outcomeOverrideSchema,
} from "../../shared/schemas/outcomes";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function overridesRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { outcomes } = ctx.services;

  api.add({
    method: "get",
    path: "/studies/:studyId/outcome-overrides",
    operationId: "listOutcomeOverrides",
    summary: "Outcomes set by hand, active and revoked, with who set them, when and why",
    tags: ["outcomes"],
    access: "study.read",
    params: studyParamsSchema,
    query: outcomeOverrideListQuerySchema,
    response: { status: 200, schema: outcomeOverrideListSchema },
    handler: ({ params, query }) => outcomes.listOverrides(params.studyId, query),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/outcome-overrides",
    operationId: "createOutcomeOverride",
    summary: "Set a taxon's outcome by hand with a reason (replaces an active override of the same taxon and boundary); recorded as a coding decision",
    tags: ["outcomes"],
    access: "outcomes.override",
    params: studyParamsSchema,
    body: outcomeOverrideCreateSchema,
    response: { status: 201, schema: outcomeOverrideCreatedSchema },
    handler: ({ params, user, body }) => outcomes.createOverride(params.studyId, user!, body),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/outcome-overrides/bulk",
    operationId: "createOutcomeOverrides",
    summary: "Apply an imported outcome column (taxon name and outcome per row) in one transaction: all rows or none",
    tags: ["outcomes"],
    access: "outcomes.override",
    params: studyParamsSchema,
    body: outcomeOverrideBulkSchema,
    response: { status: 201, schema: outcomeOverrideBulkResultSchema },
    handler: ({ params, user, body }) => outcomes.bulkOverride(params.studyId, user!, body),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/outcome-overrides/:overrideId/revoke",
    operationId: "revokeOutcomeOverride",
    summary: "Revoke an override with a reason: the taxon's computed outcome applies again; recorded as a coding decision",
    tags: ["outcomes"],
    access: "outcomes.override",
    params: outcomeOverrideParamsSchema,
    body: outcomeOverrideRevokeSchema,
    response: { status: 200, schema: outcomeOverrideSchema },
    handler: ({ params, user, body }) => outcomes.revokeOverride(params.studyId, params.overrideId, user!, body.reason),
  });

  return api;
}
