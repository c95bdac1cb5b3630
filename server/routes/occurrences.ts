import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import { IMPORT_MAX_BYTES, importSummarySchema, importUploadFormSchema } from "../../shared/schemas/imports";
import {
  occurrenceCommitSchema,
  occurrenceListQuerySchema,
  occurrenceListSchema,
  occurrencePreviewRequestSchema,
  occurrencePreviewSchema,
  occurrenceProblemsErrorSchema,
  occurrenceRevertResultSchema,
  occurrenceUploadListSchema,
  occurrenceUploadParamsSchema,
  occurrenceUploadSchema,
  rangeDerivationSchema,
  rangesApplyResultSchema,
  rangesApplySchema,
  rangesPreviewSchema,
  threeTimerQuerySchema,
  threeTimerSchema,
} from "../../shared/schemas/occurrences";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";
import { csvUpload, uploadedFile } from "../http/uploads";

export function occurrencesRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { occurrences } = ctx.services;

  api.add({
    method: "post",
    path: "/studies/:studyId/occurrence-uploads",
    operationId: "uploadOccurrences",
    summary: "Upload an occurrence table (CSV, at most 50 MB): columns, a suggested mapping and sample rows",
    tags: ["occurrences"],
    access: "imports.run",
    params: studyParamsSchema,
    before: [csvUpload(ctx.config.uploadDir, IMPORT_MAX_BYTES)],
    multipart: importUploadFormSchema,
    response: { status: 201, schema: occurrenceUploadSchema, description: "Uploaded and read. 413: larger than 50 MB" },
    handler: ({ params, user, req }) => occurrences.upload(params.studyId, user!, uploadedFile(req)),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/occurrence-uploads",
    operationId: "listOccurrenceUploads",
    summary: "Occurrence uploads of the study, newest first (at most 200)",
    tags: ["occurrences"],
    access: "study.read",
    params: studyParamsSchema,
    response: { status: 200, schema: occurrenceUploadListSchema },
    handler: ({ params }) => occurrences.list(params.studyId),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/occurrence-uploads/:uploadId",
    operationId: "getOccurrenceUpload",
    summary: "One occurrence upload, with the progress of a running commit (poll it)",
    tags: ["occurrences"],
    access: "study.read",
    params: occurrenceUploadParamsSchema,
    response: { status: 200, schema: importSummarySchema },
    handler: ({ params }) => occurrences.get(params.studyId, params.uploadId),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/occurrence-uploads/:uploadId/preview",
    operationId: "previewOccurrenceUpload",
    summary: "Read the file through a mapping: every row problem (row and taxon named), duplicates, and sample rows",
    tags: ["occurrences"],
    access: "imports.run",
    params: occurrenceUploadParamsSchema,
    body: occurrencePreviewRequestSchema,
    response: { status: 200, schema: occurrencePreviewSchema, description: "Read. 400: the mapping has no age column, or names a column the file lacks" },
    handler: ({ params, body }) => occurrences.preview(params.studyId, params.uploadId, body),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/occurrence-uploads/:uploadId/commit",
    operationId: "commitOccurrenceUpload",
    summary: "Write the valid rows in one transaction, or nothing; skipping invalid rows must be asked for",
    tags: ["occurrences"],
    access: "imports.run",
    params: occurrenceUploadParamsSchema,
    body: occurrenceCommitSchema,
    errorBody: { status: 400, schema: occurrenceProblemsErrorSchema, description: "Rows have problems and skipInvalid is false; nothing was written" },
    response: { status: 200, schema: importSummarySchema, description: "Committed. 400 OccurrenceProblemsError: rows have problems and skipInvalid is false; nothing was written" },
    handler: ({ params, body, user }) => occurrences.commit(params.studyId, params.uploadId, user!, body),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/occurrence-uploads/:uploadId/revert",
    operationId: "revertOccurrenceUpload",
    summary: "Remove the occurrences an upload wrote (ranges applied from them stay until their batch is reverted)",
    tags: ["occurrences"],
    access: "imports.run",
    params: occurrenceUploadParamsSchema,
    response: { status: 200, schema: occurrenceRevertResultSchema },
    handler: ({ params, user }) => occurrences.revert(params.studyId, params.uploadId, user!),
  });

  api.add({
    method: "delete",
    path: "/studies/:studyId/occurrence-uploads/:uploadId",
    operationId: "discardOccurrenceUpload",
    summary: "Discard an occurrence upload that was not committed, and its stored file",
    tags: ["occurrences"],
    access: "imports.run",
    params: occurrenceUploadParamsSchema,
    response: { status: 204 },
    handler: ({ params }) => occurrences.discard(params.studyId, params.uploadId),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/occurrences",
    operationId: "listOccurrences",
    summary: "One taxon's occurrences, oldest first, with the upload each came from",
    tags: ["occurrences"],
    access: "study.read",
    params: studyParamsSchema,
    query: occurrenceListQuerySchema,
    response: { status: 200, schema: occurrenceListSchema },
    handler: ({ params, query }) => occurrences.ofTaxon(params.studyId, query.taxon),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/occurrences/ranges/preview",
    operationId: "previewRangesFromOccurrences",
    summary: "Ranges derived from the study's occurrences against the trait table: changes (old -> new), new taxa, taxa without occurrences",
    tags: ["occurrences"],
    access: "study.read",
    params: studyParamsSchema,
    body: rangeDerivationSchema,
    response: { status: 200, schema: rangesPreviewSchema },
    handler: ({ params, body }) => occurrences.previewRanges(params.studyId, body),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/occurrences/ranges/apply",
    operationId: "applyRangesFromOccurrences",
    summary: "Apply the derived ranges of chosen taxa as coding decisions naming the uploads (one batch, revertible)",
    tags: ["occurrences"],
    access: "taxa.edit",
    params: studyParamsSchema,
    body: rangesApplySchema,
    response: { status: 200, schema: rangesApplyResultSchema },
    handler: ({ params, body, user }) => occurrences.applyRanges(params.studyId, user!, body),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/occurrences/three-timer",
    operationId: "getThreeTimerRates",
    summary: "Three-timer counts, sampling completeness and rates per stage (Alroy 2008); with boundaryMa, the stages on both sides and warnings",
    tags: ["occurrences"],
    access: "study.read",
    params: studyParamsSchema,
    query: threeTimerQuerySchema,
    response: { status: 200, schema: threeTimerSchema },
    handler: ({ params, query }) => occurrences.threeTimer(params.studyId, query.boundaryMa),
  });

  return api;
}
