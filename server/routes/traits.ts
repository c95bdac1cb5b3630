import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import {
  traitChangeConflictSchema,
  traitCreateSchema,
  traitListSchema,
  traitParamsSchema,
  traitReorderSchema,
  traitSchema,
  traitUpdateResultSchema,
  traitUpdateSchema,
  traitUsageSchema,
} from "../../shared/schemas/traits";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function traitsRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { traits } = ctx.services;

  api.add({
    method: "get",
    path: "/studies/:studyId/traits",
    operationId: "listTraits",
    summary: "The codebook: every trait of the study in order, retired ones flagged",
    tags: ["codebook"],
    access: "study.read",
    params: studyParamsSchema,
    response: { status: 200, schema: traitListSchema },
    handler: ({ params }) => traits.list(params.studyId),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/traits",
    operationId: "createTrait",
    summary: "Add a trait to the codebook (409 when the key is taken)",
    tags: ["codebook"],
    access: "codebook.edit",
    params: studyParamsSchema,
    body: traitCreateSchema,
    response: { status: 201, schema: traitSchema },
    handler: ({ params, body }) => traits.create(params.studyId, body),
  });

  api.add({
    method: "patch",
    path: "/studies/:studyId/traits/:traitId",
    operationId: "updateTrait",
    summary: "Change, retire or restore a trait; removing states in use needs a remap",
    tags: ["codebook"],
    access: "codebook.edit",
    params: traitParamsSchema,
    body: traitUpdateSchema,
    errorBody: { status: 409, schema: traitChangeConflictSchema, description: "Values would be orphaned (states_in_use: send remap), out of range, or of another kind" },
    response: {
      status: 200,
      schema: traitUpdateResultSchema,
      description: "Changed. 409 TraitChangeConflict: values would be orphaned (states_in_use: send remap), out of range, or of another kind",
    },
    handler: ({ params, body, user }) => traits.update(params.studyId, params.traitId, user!, body),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/traits/reorder",
    operationId: "reorderTraits",
    summary: "Put the codebook in a new order (every trait id once)",
    tags: ["codebook"],
    access: "codebook.edit",
    params: studyParamsSchema,
    body: traitReorderSchema,
    response: { status: 200, schema: traitListSchema },
    handler: ({ params, body }) => traits.reorder(params.studyId, body.traitIds),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/traits/:traitId/usage",
    operationId: "getTraitUsage",
    summary: "How many taxa hold each state (with a sample), or the range of numbers held",
    tags: ["codebook"],
    access: "study.read",
    params: traitParamsSchema,
    response: { status: 200, schema: traitUsageSchema },
    handler: ({ params }) => traits.usage(params.studyId, params.traitId),
  });

  return api;
}
