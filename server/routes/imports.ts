import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import {
  IMPORT_MAX_BYTES,
  importCommitSchema,
  importListQuerySchema,
  importListSchema,
  importParamsSchema,
  importPreviewRequestSchema,
  importPreviewSchema,
  importProblemsErrorSchema,
  importRevertResultSchema,
  importRevertSchema,
  importSummarySchema,
  importUploadFormSchema,
  importUploadSchema,
} from "../../shared/schemas/imports";
import { revertConflictSchema } from "../../shared/schemas/decisions";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";
import { csvUpload, uploadedFile } from "../http/uploads";

export function importsRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { imports } = ctx.services;

  api.add({
    method: "post",
    path: "/studies/:studyId/imports",
    operationId: "uploadTraitTable",
    summary: "Upload a CSV file (at most 50 MB): columns, a suggested mapping and sample rows",
    tags: ["imports"],
    access: "imports.run",
    params: studyParamsSchema,
    before: [csvUpload(ctx.config.uploadDir, IMPORT_MAX_BYTES)],
    multipart: importUploadFormSchema,
    response: { status: 201, schema: importUploadSchema, description: "Uploaded and read. 413: larger than 50 MB" },
    handler: ({ params, user, req }) => imports.upload(params.studyId, user!, uploadedFile(req)),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/imports",
    operationId: "listImports",
    summary: "Import history: who imported what and when, with counts",
    tags: ["imports"],
    access: "study.read",
    params: studyParamsSchema,
    query: importListQuerySchema,
    response: { status: 200, schema: importListSchema },
    handler: ({ params, query }) => imports.list(params.studyId, query),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/imports/:importId",
    operationId: "getImport",
    summary: "One import, with the progress of a running commit (poll it)",
    tags: ["imports"],
    access: "study.read",
    params: importParamsSchema,
    response: { status: 200, schema: importSummarySchema },
    handler: ({ params }) => imports.get(params.studyId, params.importId),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/imports/:importId/upload",
    operationId: "resumeImport",
    summary: "An upload not yet committed, read again to resume at the mapping step: columns, sample rows and the mapping last previewed (else a suggested one)",
    tags: ["imports"],
    access: "imports.run",
    params: importParamsSchema,
    response: { status: 200, schema: importUploadSchema, description: "409: the upload was committed, discarded or its file is no longer kept" },
    handler: ({ params }) => imports.resume(params.studyId, params.importId),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/imports/:importId/preview",
    operationId: "previewImport",
    summary: "Read the file through a mapping: every problem by row and column, and what a commit would change",
    tags: ["imports"],
    access: "imports.run",
    params: importParamsSchema,
    body: importPreviewRequestSchema,
    response: { status: 200, schema: importPreviewSchema },
    handler: ({ params, body }) => imports.preview(params.studyId, params.importId, body.mapping, body.nameMerges, body.higherTaxonMerges),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/imports/:importId/commit",
    operationId: "commitImport",
    summary: "Write the valid rows in one transaction, or nothing; skipping invalid rows must be asked for",
    tags: ["imports"],
    access: "imports.run",
    params: importParamsSchema,
    body: importCommitSchema,
    errorBody: { status: 400, schema: importProblemsErrorSchema, description: "Rows have problems and skipInvalid is false; nothing was written" },
    response: { status: 200, schema: importSummarySchema, description: "Committed. 400 ImportProblemsError: rows have problems and skipInvalid is false; nothing was written" },
    handler: ({ params, body, user }) => imports.commit(params.studyId, params.importId, user!, body),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/imports/:importId/revert",
    operationId: "revertImport",
    summary: "Put back the values an import replaced and remove the taxa it added",
    tags: ["imports"],
    access: "imports.run",
    params: importParamsSchema,
    body: importRevertSchema,
    errorBody: { status: 409, schema: revertConflictSchema, description: "Values changed since the import (send skipChanged to leave those)" },
    response: { status: 200, schema: importRevertResultSchema, description: "Reverted. 409 RevertConflict: values changed since the import (send skipChanged to leave those)" },
    handler: ({ params, body, user }) => imports.revert(params.studyId, params.importId, user!, body),
  });

  api.add({
    method: "delete",
    path: "/studies/:studyId/imports/:importId",
    operationId: "discardImport",
    summary: "Discard an upload that was not committed, and its stored file",
    tags: ["imports"],
    access: "imports.run",
    params: importParamsSchema,
    response: { status: 204 },
    handler: ({ params }) => imports.discard(params.studyId, params.importId),
  });

  return api;
}
