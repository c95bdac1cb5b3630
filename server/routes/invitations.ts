import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { invitationAcceptedSchema, invitationPreviewSchema, invitationTokenParamsSchema } from "../../shared/schemas/studies";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function invitationsRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { invitations } = ctx.services;

  api.add({
    method: "get",
    path: "/invitations/:token",
    operationId: "getInvitation",
    summary: "What an invitation offers, before accepting it",
    tags: ["members"],
    access: "public",
    params: invitationTokenParamsSchema,
    response: { status: 200, schema: invitationPreviewSchema },
    handler: ({ params }) => invitations.preview(params.token),
  });

  api.add({
    method: "post",
    path: "/invitations/:token/accept",
    operationId: "acceptInvitation",
    summary: "Accept an invitation as the signed-in account (403 unless the account's e-mail is the invited one)",
    tags: ["members"],
    access: "user",
    sessionOnly: true,
    params: invitationTokenParamsSchema,
    response: { status: 200, schema: invitationAcceptedSchema },
    handler: ({ params, user }) => invitations.accept(params.token, { id: user!.id, email: user!.email }),
  });

  return api;
}
