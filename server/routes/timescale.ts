import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { timescaleSchema } from "../../shared/schemas/timescale";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function timescaleRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { timescale } = ctx.services;

  api.add({
    method: "get",
    path: "/timescale",
    operationId: "getTimescale",
    summary: "The geologic time scale (ICS International Chronostratigraphic Chart): periods, epochs and stages with base ages and uncertainties",
    tags: ["timescale"],
    access: "user",
    response: { status: 200, schema: timescaleSchema },
    handler: () => timescale.get(),
  });

  return api;
}
