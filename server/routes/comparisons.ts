import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import { comparisonExportQuerySchema, comparisonListSchema, comparisonParamsPathSchema, comparisonParamsSchema, comparisonSchema } from "../../shared/schemas/comparisons";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";
import { comparisonCsv, comparisonFileName } from "../services/comparisonExport";

export function comparisonsRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { comparisons } = ctx.services;
  const tags = ["comparisons"];

  api.add({
    method: "post",
    path: "/studies/:studyId/comparisons",
    operationId: "createComparison",
    summary: "Score a modern list with a finished run's fitted model (through the list's saved crosswalk), hold the scores against the threat categories, and save the comparison",
    tags,
    access: "comparisons.create",
    params: studyParamsSchema,
    body: comparisonParamsSchema,
    response: { status: 201, schema: comparisonSchema, description: "Saved. 409: the list has no saved crosswalk, or the run has not succeeded; 400: the model needs a trait the crosswalk does not pair" },
    handler: ({ params, body, user }) => comparisons.create(params.studyId, user!, body),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/comparisons",
    operationId: "listComparisons",
    summary: "The study's saved comparisons, newest first, with the run and list they read, the data hash, the AUC and how many species are worth a look",
    tags,
    access: "study.read",
    params: studyParamsSchema,
    response: { status: 200, schema: comparisonListSchema },
    handler: ({ params }) => comparisons.list(params.studyId),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/comparisons/:comparisonId",
    operationId: "getComparison",
    summary: "One saved comparison with its results as stored (never recomputed)",
    tags,
    access: "study.read",
    params: comparisonParamsPathSchema,
    response: { status: 200, schema: comparisonSchema },
    handler: ({ params }) => comparisons.get(params.studyId, params.comparisonId),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/comparisons/:comparisonId/export",
    operationId: "exportComparison",
    summary: "Download a comparison: format=csv its tables (all, each row naming its table, or one chosen with table=); format=json the stored comparison",
    tags,
    access: "study.read",
    params: comparisonParamsPathSchema,
    query: comparisonExportQuerySchema,
    response: { status: 200, schema: comparisonSchema, description: "format=json: the comparison (application/json); format=csv: text/csv" },
    handler: async ({ params, query, res }) => {
      const comparison = await comparisons.get(params.studyId, params.comparisonId);
      const table = query.format === "csv" ? query.table : undefined;
      res.setHeader("Content-Disposition", `attachment; filename="${comparisonFileName(comparison, query.format, table)}"`);
      if (query.format === "json") return comparison;
      res.type("text/csv; charset=utf-8").send(comparisonCsv(comparison, table));
    },
  });

  api.add({
    method: "delete",
    path: "/studies/:studyId/comparisons/:comparisonId",
    operationId: "deleteComparison",
    summary: "Delete a saved comparison",
    tags,
    access: "comparisons.create",
    params: comparisonParamsPathSchema,
    response: { status: 204 },
    handler: ({ params, user }) => comparisons.remove(params.studyId, params.comparisonId, user!),
  });

  return api;
}
