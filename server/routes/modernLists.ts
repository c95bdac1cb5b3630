import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import {
  crosswalkSavedSchema,
  crosswalkSchema,
  MODERN_LIST_MAX_BYTES,
  MODERN_LIST_MAX_LABEL,
  modernListCommitSchema,
  modernListListSchema,
  modernListParamsSchema,
  modernListPreviewRequestSchema,
  modernListPreviewSchema,
  modernListProblemsErrorSchema,
  modernListSchema,
  modernListUploadFormSchema,
  modernListUploadSchema,
  modernUploadParamsSchema,
} from "../../shared/schemas/modernLists";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";
import { csvUpload, uploadedFile } from "../http/uploads";

export function modernListsRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { modernLists } = ctx.services;
  const tags = ["modern lists"];

  api.add({
    method: "post",
    path: "/studies/:studyId/modern-list-uploads",
    operationId: "uploadModernList",
    summary: `Upload a modern species list as CSV (at most ${MODERN_LIST_MAX_LABEL}): its columns, a suggested mapping and sample rows`,
    tags,
    access: "comparisons.create",
    params: studyParamsSchema,
    before: [csvUpload(ctx.config.uploadDir, MODERN_LIST_MAX_BYTES)],
    multipart: modernListUploadFormSchema,
    response: { status: 201, schema: modernListUploadSchema, description: `Uploaded and read. 413: larger than ${MODERN_LIST_MAX_LABEL}` },
    handler: ({ params, user, req }) => modernLists.upload(params.studyId, user!, uploadedFile(req)),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/modern-list-uploads/:uploadId/preview",
    operationId: "previewModernList",
    summary: "Read the uploaded list through a mapping: every problem by row and column, species per threat category, and the first rows as they would be stored",
    tags,
    access: "comparisons.create",
    params: modernUploadParamsSchema,
    body: modernListPreviewRequestSchema,
    response: { status: 200, schema: modernListPreviewSchema },
    handler: ({ params, body }) => modernLists.preview(params.studyId, params.uploadId, body.mapping),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/modern-list-uploads/:uploadId/commit",
    operationId: "commitModernList",
    summary: "Save the list with its valid species in one transaction, or nothing; leaving invalid rows out must be asked for",
    tags,
    access: "comparisons.create",
    params: modernUploadParamsSchema,
    body: modernListCommitSchema,
    errorBody: { status: 400, schema: modernListProblemsErrorSchema, description: "Rows have problems and skipInvalid is false; nothing was written" },
    response: { status: 201, schema: modernListSchema, description: "Saved. 400 ModernListProblemsError: rows have problems and skipInvalid is false; nothing was written" },
    handler: ({ params, body, user }) => modernLists.commit(params.studyId, params.uploadId, user!, body),
  });

  api.add({
    method: "delete",
    path: "/studies/:studyId/modern-list-uploads/:uploadId",
    operationId: "discardModernListUpload",
    summary: "Discard an upload that was not saved, and its stored file",
    tags,
    access: "comparisons.create",
    params: modernUploadParamsSchema,
    response: { status: 204 },
    handler: ({ params }) => modernLists.discard(params.studyId, params.uploadId),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/modern-lists",
    operationId: "listModernLists",
    summary: "The study's modern lists, newest first, with species per threat category and whether a crosswalk is saved",
    tags,
    access: "study.read",
    params: studyParamsSchema,
    response: { status: 200, schema: modernListListSchema },
    handler: ({ params }) => modernLists.list(params.studyId),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/modern-lists/:listId",
    operationId: "getModernList",
    summary: "One list: its trait columns with their values and counts, the saved crosswalk (or a suggestion) and what it reads of the list, unusable values listed",
    tags,
    access: "study.read",
    params: modernListParamsSchema,
    response: { status: 200, schema: modernListSchema },
    handler: ({ params }) => modernLists.get(params.studyId, params.listId),
  });

  api.add({
    method: "put",
    path: "/studies/:studyId/modern-lists/:listId/crosswalk",
    operationId: "saveCrosswalk",
    summary: "Save the crosswalk: which list column holds which trait, which list value means which state (numbers: a multiplier to the trait's unit)",
    tags,
    access: "comparisons.create",
    params: modernListParamsSchema,
    body: crosswalkSchema,
    response: { status: 200, schema: crosswalkSavedSchema, description: "Saved, with what it reads of the list: values without a state are listed with their species" },
    handler: ({ params, body, user }) => modernLists.saveCrosswalk(params.studyId, params.listId, user!, body),
  });

  api.add({
    method: "delete",
    path: "/studies/:studyId/modern-lists/:listId",
    operationId: "deleteModernList",
    summary: "Delete a list, its species and the comparisons made with it",
    tags,
    access: "comparisons.create",
    params: modernListParamsSchema,
    response: { status: 204 },
    handler: ({ params, user }) => modernLists.remove(params.studyId, params.listId, user!),
  });

  return api;
}
