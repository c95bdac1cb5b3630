import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { outboxListSchema } from "../../shared/schemas/outbox";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";
import { forbidden, notFound } from "../http/errors";

/** The local fake mailbox: exists only outside production and only when no SMTP_URL is set. */
export function outboxRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  api.add({
    method: "get",
    path: "/outbox",
    summary: "Messages caught by the local fake mail server (owners only; not in production)",
    tags: ["outbox"],
    access: "user",
    response: { status: 200, schema: outboxListSchema },
    async handler({ user }) {
      if (ctx.config.environment === "production" || ctx.config.smtpUrl) throw notFound("There is no outbox: mail goes to a real mail server.");
      const owned = (await ctx.services.studies.listFor(user!.id)).some((s) => s.role === "owner");
      if (!owned) throw forbidden("The outbox is for study leads (owners).");
      return { messages: await ctx.services.outbox.list() };
    },
  });
  return api;
}
