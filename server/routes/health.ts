import { sql } from "drizzle-orm";
import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { healthSchema } from "../../shared/schemas/health";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";

export function healthRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  api.add({
    method: "get",
    path: "/health",
    operationId: "getHealth",
    summary: "Is the app up and its database reachable?",
    tags: ["health"],
    access: "public",
    response: { status: 200, schema: healthSchema, description: "Up; 503 with the same shape when the database is unreachable" },
    async handler({ res }) {
      try {
        await ctx.db.execute(sql`SELECT 1`);
        return { status: "ok", database: "ok" };
      } catch {
        res.status(503).json({ status: "unavailable", database: "unreachable" });
      }
    },
  });
  return api;
}
