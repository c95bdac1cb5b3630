import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { studyParamsSchema } from "../../shared/schemas/common";
import { TIME_BIN_CSV_MAX_BYTES, timeBinCsvSchema, timeBinListSchema, timeBinSetSchema, timeBinUploadFormSchema } from "../../shared/schemas/timeBins";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";
import { csvUpload, uploadedFile } from "../http/uploads";

export function timeBinsRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { timeBins } = ctx.services;

  api.add({
    method: "get",
    path: "/studies/:studyId/time-bins",
    operationId: "listTimeBins",
    summary: "The study's own time bins, oldest first, with how interval names resolve (study bins first, then the ICS chart)",
    tags: ["time bins"],
    access: "study.read",
    params: studyParamsSchema,
    response: { status: 200, schema: timeBinListSchema },
    handler: ({ params }) => timeBins.list(params.studyId),
  });

  api.add({
    method: "put",
    path: "/studies/:studyId/time-bins",
    operationId: "replaceTimeBins",
    summary: "Save the study's whole set of time bins (oldest first, names unique, not overlapping); an empty list removes them",
    tags: ["time bins"],
    access: "timeBins.edit",
    params: studyParamsSchema,
    body: timeBinSetSchema,
    response: { status: 200, schema: timeBinListSchema, description: "Saved. 400: `fields` names each bin and field at fault, e.g. bins.3.baseMa" },
    handler: ({ params, body, user }) => timeBins.replace(params.studyId, user!, body),
  });

  api.add({
    method: "post",
    path: "/studies/:studyId/time-bins/csv",
    operationId: "readTimeBinsCsv",
    summary: "Read a CSV file of time bins (name, base_ma, top_ma, chart_unit; at most 1 MB) and check it by row and column; nothing is saved",
    tags: ["time bins"],
    access: "timeBins.edit",
    params: studyParamsSchema,
    before: [csvUpload(ctx.config.uploadDir, TIME_BIN_CSV_MAX_BYTES)],
    multipart: timeBinUploadFormSchema,
    response: { status: 200, schema: timeBinCsvSchema, description: "Read: the rows and every problem. Send the rows to PUT /time-bins to save them. 413: larger than 1 MB" },
    handler: ({ req }) => timeBins.readCsv(uploadedFile(req)),
  });

  return api;
}
