import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import { runDiffQuerySchema, runDiffSchema } from "../../shared/schemas/runDiff";
import {
  runExportQuerySchema,
  runListQuerySchema,
  runListSchema,
  runParamsPathSchema,
  runParamsSchema,
  runPreviewSchema,
  replicationZipSchema,
  runRerunSchema,
  runSchema,
} from "../../shared/schemas/runs";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";
import { runCsv, runFileName } from "../services/runExport";

export function runsRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { runs } = ctx.services;
  const tags = ["runs"];

  api.add({
    method: "post",
    path: "/studies/:studyId/runs/preview",
    operationId: "previewRun",
    summary: "What a run with these parameters would analyse: survivors, victims and taxa dropped for missing values, per boundary and trait; nothing is tested or stored",
    tags,
    access: "study.read",
    params: studyParamsSchema,
    body: runParamsSchema,
    response: { status: 200, schema: runPreviewSchema },
    handler: ({ params, body }) => runs.preview(params.studyId, body),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/runs",
    operationId: "startRun",
    summary: "Start a selectivity run: stored at once as queued and computed as a job; poll GET runs/{runId} for its status and progress",
    tags,
    access: "runs.create",
    params: studyParamsSchema,
    body: runParamsSchema,
    response: { status: 202, schema: runSchema, description: "The run, queued" },
    handler: ({ params, body, user }) => runs.create(params.studyId, user!, body),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/runs",
    operationId: "listRuns",
    summary: "The study's runs, newest first, with status, who started them, when, and the hash of the data they read (results left out)",
    tags,
    access: "study.read",
    params: studyParamsSchema,
    query: runListQuerySchema,
    response: { status: 200, schema: runListSchema },
    handler: ({ params, query }) => runs.list(params.studyId, query),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/runs/:runId",
    operationId: "getRun",
    summary: "One run as stored: parameters, data hash and row count, status and progress, and its results once it has succeeded (never recomputed)",
    tags,
    access: "study.read",
    params: runParamsPathSchema,
    response: { status: 200, schema: runSchema },
    handler: ({ params }) => runs.get(params.studyId, params.runId),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/runs/:runId/retry",
    operationId: "retryRun",
    summary: "Queue a failed run again with the same parameters (409 unless it failed)",
    tags,
    access: "runs.create",
    params: runParamsPathSchema,
    response: { status: 202, schema: runSchema, description: "The run, queued again" },
    handler: ({ params, user }) => runs.retry(params.studyId, params.runId, user!),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/runs/:runId/rerun",
    operationId: "rerunRun",
    summary: "A new run with the same parameters on today's data, linked to this one by rerunOf",
    tags,
    access: "runs.create",
    params: runParamsPathSchema,
    body: runRerunSchema,
    response: { status: 202, schema: runSchema, description: "The new run, queued" },
    handler: ({ params, body, user }) => runs.rerun(params.studyId, params.runId, user!, body),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/runs/:runId/diff",
    operationId: "diffRuns",
    summary: "Two finished runs side by side: whether the data changed (hash, row count), which parameters differ, each trait's and contrast's odds ratios and p-values, and the verdicts of the runs' checks that changed (sampling, robustness panel, crisis against background)",
    tags,
    access: "study.read",
    params: runParamsPathSchema,
    query: runDiffQuerySchema,
    response: { status: 200, schema: runDiffSchema },
    handler: ({ params, query }) => runs.diff(params.studyId, params.runId, query.against),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/runs/:runId/export",
    operationId: "exportRun",
    summary: "Download a run: format=json is the stored run as is; format=csv its tables (all, each row naming its table, or one chosen with table=)",
    tags,
    access: "study.read",
    params: runParamsPathSchema,
    query: runExportQuerySchema,
    response: { status: 200, schema: runSchema, description: "format=json: the run (application/json); format=csv: text/csv (CsvFile)" },
    handler: async ({ params, query, res }) => {
      const run = await runs.get(params.studyId, params.runId);
      const file = runFileName(run, query.format, query.format === "csv" ? query.table : undefined);
      res.setHeader("Content-Disposition", `attachment; filename="${file}"`);
      if (query.format === "json") return run;
      res.type("text/csv; charset=utf-8").send(runCsv(run, query.table));
    },
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/runs/:runId/replication.zip",
    operationId: "downloadRunReplication",
    summary: "Download a finished run for a re-run outside the app: the exact rows it analysed, its parameters and results, and an R script (base R only) that recomputes the numbers and prints them beside the app's",
    tags,
    access: "study.read",
    params: runParamsPathSchema,
    response: { status: 200, schema: replicationZipSchema, contentType: "application/zip", description: "A zip of one folder: rows.csv, traits.csv, model-columns.csv, app-results.csv, settings.csv, run.json, rerun.R, README.txt. 409 when the study's data changed since the run." },
    handler: async ({ params, res }) => {
      const { fileName, zip } = await ctx.services.runReplication.bundle(params.studyId, params.runId);
      res.setHeader("Content-Disposition", `attachment; filename="${fileName}"`);
      res.setHeader("Cache-Control", "no-store");
      res.type("application/zip").send(Buffer.from(zip));
    },
  });

  return api;
}
