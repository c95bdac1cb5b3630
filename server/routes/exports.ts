import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { once } from "node:events";
import type { Response } from "express";
import { studyParamsSchema } from "../../shared/schemas/common";
import { csvFileSchema, taxaExportQuerySchema } from "../../shared/schemas/exports";
import { turnoverQuerySchema } from "../../shared/schemas/turnover";
import { scorecardCsv, turnoverStagesCsv } from "../services/turnoverExport";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

function startCsv(res: Response, fileName: string): void {
  res.status(200);
  res.type("text/csv; charset=utf-8");
  res.set("Content-Disposition", `attachment; filename="${fileName}"`);
  res.set("Cache-Control", "no-store");
}

export function exportsRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { exports, turnover } = ctx.services;
  const csv = (description: string) => ({ status: 200, schema: csvFileSchema, contentType: "text/csv", description });

  api.add({
    method: "get",
    path: "/studies/:studyId/exports/template.csv",
    operationId: "exportImportTemplate",
    summary: "An import template: the header row of the taxon columns and one column per active trait",
    tags: ["exports"],
    access: "study.read",
    params: studyParamsSchema,
    response: csv("A CSV file with a header row only"),
    handler: async ({ params, res }) => {
      const text = await exports.template(params.studyId);
      startCsv(res, await exports.fileName(params.studyId, "template"));
      res.send(text);
    },
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/exports/taxa.csv",
    operationId: "exportTaxa",
    summary: "The trait table as CSV: wide (a row per taxon) or long (a row per taxon and trait)",
    tags: ["exports"],
    access: "study.read",
    params: studyParamsSchema,
    query: taxaExportQuerySchema,
    response: csv("Values are state codes or numbers; download codebook.csv to read them"),
    handler: async ({ params, query, res }) => {
      const name = await exports.fileName(params.studyId, `taxa-${query.form}`);
      startCsv(res, name);
      await exports.taxa(params.studyId, query, {
        write: (chunk) => res.write(chunk),
        drained: () => once(res, "drain").then(() => undefined),
      });
      res.end();
    },
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/exports/codebook.csv",
    operationId: "exportCodebook",
    summary: "The codebook as CSV, one row per state, to read beside the table",
    tags: ["exports"],
    access: "study.read",
    params: studyParamsSchema,
    response: csv("trait_key, trait_label, kind, aspect, unit, transform, bounds, retired, coding_rule and one state per row"),
    handler: async ({ params, res }) => {
      const text = await exports.codebook(params.studyId);
      startCsv(res, await exports.fileName(params.studyId, "codebook"));
      res.send(text);
    },
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/exports/turnover.csv",
    operationId: "exportTurnover",
    summary: "Turnover through time as CSV: one row per stage with its boundary-crosser counts, q and p, standing diversity, and a column per group when split",
    tags: ["exports"],
    access: "study.read",
    params: studyParamsSchema,
    query: turnoverQuerySchema,
    response: csv("stage, base_ma, top_ma, duration_myr, crisis_stage, edge_stage, nbt, nbL, nFt, nFL, q and p per stage and per Myr, range_through, crossing_base, crossing_top, first_seen, last_seen, single_stage, range_through_<group>..."),
    handler: async ({ params, query, res }) => {
      const text = turnoverStagesCsv(await turnover.turnover(params.studyId, query));
      startCsv(res, await exports.fileName(params.studyId, "turnover"));
      res.send(text);
    },
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/exports/scorecard.csv",
    operationId: "exportScorecard",
    summary: "The boundary scorecard as CSV: the crisis stage's robust z of extinction and origination, each criterion, and each group read",
    tags: ["exports"],
    access: "study.read",
    params: studyParamsSchema,
    query: turnoverQuerySchema,
    response: csv("row (contrast, criterion, group, note), criterion, status, dimension, group, value, ci_low, ci_high, victims, at_risk, z, median, mad, n, note"),
    handler: async ({ params, query, res }) => {
      const text = scorecardCsv(await turnover.turnover(params.studyId, query));
      startCsv(res, await exports.fileName(params.studyId, "scorecard"));
      res.send(text);
    },
  });

  return api;
}
