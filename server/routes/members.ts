import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import { invitationCreateSchema, memberListSchema, memberParamsSchema, memberUpdateSchema } from "../../shared/schemas/studies";
import { z } from "zod";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function membersRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { studies, invitations } = ctx.services;

  api.add({
    method: "get",
    path: "/studies/:studyId/members",
    operationId: "listMembers",
    summary: "Members of a study and pending invitations",
    tags: ["members"],
    access: "members.read",
    params: studyParamsSchema,
    response: { status: 200, schema: memberListSchema },
    handler: ({ params }) => studies.members(params.studyId),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/invitations",
    operationId: "inviteMember",
    summary: "Invite a person by e-mail with a role",
    tags: ["members"],
    access: "members.manage",
    params: studyParamsSchema,
    body: invitationCreateSchema,
    response: { status: 201, schema: z.object({ id: z.uuid() }) },
    handler: ({ params, user, body }) => invitations.invite(params.studyId, user!, body.email, body.role),
  });

  api.add({
    method: "patch",
    path: "/studies/:studyId/members/:userId",
    operationId: "updateMember",
    summary: "Change a member's role (a study keeps at least one owner)",
    tags: ["members"],
    access: "members.manage",
    params: memberParamsSchema,
    body: memberUpdateSchema,
    response: { status: 204 },
    handler: ({ params, body, user }) => studies.changeMembership(params.studyId, params.userId, body.role, user!),
  });

  api.add({
    method: "delete",
    path: "/studies/:studyId/members/:userId",
    operationId: "removeMember",
    summary: "Remove a member (a study keeps at least one owner)",
    tags: ["members"],
    access: "members.manage",
    params: memberParamsSchema,
    response: { status: 204 },
    handler: ({ params, user }) => studies.changeMembership(params.studyId, params.userId, null, user!),
  });

  return api;
}
