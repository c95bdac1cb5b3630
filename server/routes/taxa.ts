import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import {
  taxaBulkEditSchema,
  taxaBulkResultSchema,
  taxaIdsQuerySchema,
  taxaIdsSchema,
  taxaListQuerySchema,
  taxaPageSchema,
  taxonConflictSchema,
  taxonCreateSchema,
  taxonDeleteQuerySchema,
  taxonHistoryQuerySchema,
  taxonHistorySchema,
  taxonParamsSchema,
  taxonRowSchema,
  taxonSavedSchema,
  taxonUpdateSchema,
} from "../../shared/schemas/taxa";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function taxaRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { taxa, decisions } = ctx.services;

  api.add({
    method: "get",
    path: "/studies/:studyId/taxa",
    operationId: "listTaxa",
    summary: "A page of the trait table, sorted, filtered and counted on the study's grid copy (never stale), rows read fresh",
    tags: ["taxa"],
    access: "study.read",
    params: studyParamsSchema,
    query: taxaListQuerySchema,
    response: { status: 200, schema: taxaPageSchema },
    handler: ({ params, query }) => taxa.list(params.studyId, query),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/taxa",
    operationId: "createTaxon",
    summary: "Add a taxon (one coding decision); 409 when the name is taken",
    tags: ["taxa"],
    access: "taxa.edit",
    params: studyParamsSchema,
    body: taxonCreateSchema,
    response: { status: 201, schema: taxonSavedSchema },
    handler: ({ params, body, user }) => taxa.create(params.studyId, user!, body),
  });

  // Before /taxa/:taxonId, which would otherwise take "ids" for a taxon id.
  api.add({
    method: "get",
    path: "/studies/:studyId/taxa/ids",
    operationId: "listMatchingTaxonIds",
    summary: "The ids of every taxon the filters match, in the grid's order (for selecting them all); 400 beyond one bulk edit's limit",
    tags: ["taxa"],
    access: "study.read",
    params: studyParamsSchema,
    query: taxaIdsQuerySchema,
    response: { status: 200, schema: taxaIdsSchema },
    handler: ({ params, query }) => taxa.matchingIds(params.studyId, query),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/taxa/bulk",
    operationId: "bulkEditTaxa",
    summary: "Set one field of many taxa with one shared reason (one decision per changed taxon, one batch)",
    tags: ["taxa"],
    access: "taxa.edit",
    params: studyParamsSchema,
    body: taxaBulkEditSchema,
    response: { status: 200, schema: taxaBulkResultSchema },
    handler: ({ params, body, user }) => taxa.bulkEdit(params.studyId, user!, body),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/taxa/:taxonId",
    operationId: "getTaxon",
    summary: "One row of the trait table",
    tags: ["taxa"],
    access: "study.read",
    params: taxonParamsSchema,
    response: { status: 200, schema: taxonRowSchema },
    handler: ({ params }) => taxa.get(params.studyId, params.taxonId),
  });

  api.add({
    method: "patch",
    path: "/studies/:studyId/taxa/:taxonId",
    operationId: "updateTaxon",
    summary: "Edit a taxon based on its version; a reason is required to replace or clear a value",
    tags: ["taxa"],
    access: "taxa.edit",
    params: taxonParamsSchema,
    body: taxonUpdateSchema,
    errorBody: { status: 409, schema: taxonConflictSchema, description: "The row changed since that version; the body holds the current values and who set them" },
    response: { status: 200, schema: taxonSavedSchema, description: "Saved. 409 TaxonConflict: the row changed since that version; the body holds the current values and who set them" },
    handler: ({ params, body, user }) => taxa.update(params.studyId, params.taxonId, user!, body),
  });

  api.add({
    method: "delete",
    path: "/studies/:studyId/taxa/:taxonId",
    operationId: "deleteTaxon",
    summary: "Remove a taxon (its history stays; reverting the decision restores it)",
    tags: ["taxa"],
    access: "taxa.edit",
    params: taxonParamsSchema,
    query: taxonDeleteQuerySchema,
    errorBody: { status: 409, schema: taxonConflictSchema, description: "The row changed since that version" },
    response: { status: 204, description: "Removed. 409 TaxonConflict: the row changed since that version" },
    handler: ({ params, query, user }) => taxa.remove(params.studyId, params.taxonId, user!, query),
  });

  api.add({
    method: "get",
    path: "/studies/:studyId/taxa/:taxonId/history",
    operationId: "getTaxonHistory",
    summary: "Every coding decision about a taxon, or about one of its cells (traitId or field)",
    tags: ["taxa", "decisions"],
    access: "study.read",
    params: taxonParamsSchema,
    query: taxonHistoryQuerySchema,
    response: { status: 200, schema: taxonHistorySchema },
    handler: ({ params, query }) => decisions.history(params.studyId, params.taxonId, query),
  });

  return api;
}
