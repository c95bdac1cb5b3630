import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import { importSettingsSchema } from "../../shared/schemas/importChecks";
import { studyCreateSchema, studyListSchema, studySchema, studyUpdateSchema } from "../../shared/schemas/studies";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";
import { sharedRole } from "../../shared/roles";

export function studiesRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { studies } = ctx.services;

  api.add({
    method: "get",
    path: "/studies",
    operationId: "listStudies",
    summary: "Studies the caller is a member of (with an API token: those the token covers, each with the role the token may act with)",
    tags: ["studies"],
    access: "user",
    response: { status: 200, schema: studyListSchema },
    handler: async ({ user, apiToken }) => {
      const mine = await studies.listFor(user!.id);
      if (!apiToken) return { studies: mine };
      return {
        studies: mine.flatMap((study) => {
          const granted = apiToken.studies.get(study.id);
          return granted ? [{ ...study, role: sharedRole(study.role, granted) }] : [];
        }),
      };
    },
  });

  api.add({
    method: "post",
    path: "/studies",
    operationId: "createStudy",
    summary: "Create a study; the caller becomes its owner",
    tags: ["studies"],
    access: "user",
    sessionOnly: true,
    body: studyCreateSchema,
    response: { status: 201, schema: studySchema },
    handler: ({ user, body }) => studies.create(user!.id, body),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId",
    operationId: "getStudy",
    summary: "One study",
    tags: ["studies"],
    access: "study.read",
    params: studyParamsSchema,
    response: { status: 200, schema: studySchema },
    handler: ({ params, role }) => studies.get(params.studyId, role!),
  });

  api.add({
    method: "patch",
    path: "/studies/:studyId",
    operationId: "updateStudy",
    summary: "Rename or describe a study",
    tags: ["studies"],
    access: "study.update",
    params: studyParamsSchema,
    body: studyUpdateSchema,
    response: { status: 200, schema: studySchema },
    handler: ({ params, role, body }) => studies.update(params.studyId, role!, body),
  });

  api.add({
    method: "delete",
    path: "/studies/:studyId",
    operationId: "deleteStudy",
    summary: "Delete a study and everything in it",
    tags: ["studies"],
    access: "study.delete",
    params: studyParamsSchema,
    response: { status: 204 },
    handler: ({ params }) => studies.remove(params.studyId),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/import-settings",
    operationId: "getImportSettings",
    summary: "The study's import settings: missing-value tokens read as missing in every import",
    tags: ["studies"],
    access: "study.read",
    params: studyParamsSchema,
    response: { status: 200, schema: importSettingsSchema },
    handler: ({ params }) => studies.importSettings(params.studyId),
  });

  api.add({
    method: "put",
    path: "/studies/:studyId/import-settings",
    operationId: "updateImportSettings",
    summary: "Replace the study's missing-value tokens (who may change the codebook may change them); later previews and commits read them",
    tags: ["studies"],
    access: "codebook.edit",
    params: studyParamsSchema,
    body: importSettingsSchema,
    response: { status: 200, schema: importSettingsSchema },
    handler: ({ params, user, body }) => studies.updateImportSettings(params.studyId, user!.id, body),
  });

  return api;
}
