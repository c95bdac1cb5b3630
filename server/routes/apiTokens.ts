import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { apiTokenCreatedSchema, apiTokenCreateSchema, apiTokenListSchema, apiTokenParamsSchema } from "../../shared/schemas/apiTokens";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

/** The signed-in person's API tokens: made, listed and revoked with a session only. */
export function apiTokensRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { apiTokens } = ctx.services;
  const tags = ["api tokens"];

  api.add({
    method: "get",
    path: "/tokens",
    operationId: "listApiTokens",
    summary: "The caller's API tokens, newest first, with their studies, status and last use (never the tokens themselves)",
    tags,
    access: "user",
    sessionOnly: true,
    response: { status: 200, schema: apiTokenListSchema },
    handler: async ({ user }) => ({ tokens: await apiTokens.list(user!.id) }),
  });

  api.add({
    method: "post",
    path: "/tokens",
    operationId: "createApiToken",
    summary: "Make an API token for chosen studies, each with a role no higher than the caller's there; the answer holds the token once",
    tags,
    access: "user",
    sessionOnly: true,
    body: apiTokenCreateSchema,
    response: { status: 201, schema: apiTokenCreatedSchema },
    handler: ({ user, body }) => apiTokens.create(user!.id, body),
  });

  api.add({
    method: "delete",
    path: "/tokens/:tokenId",
    operationId: "revokeApiToken",
    summary: "Revoke one of the caller's API tokens; it stops working with the next request",
    tags,
    access: "user",
    sessionOnly: true,
    params: apiTokenParamsSchema,
    response: { status: 204 },
    handler: ({ user, params }) => apiTokens.revoke(user!.id, params.tokenId),
  });

  return api;
}
