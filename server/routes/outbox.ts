import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { outboxListSchema } from "../../shared/schemas/outbox";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";
import { notFound } from "../http/errors";

/**
 * The local fake mailbox: exists only outside production and only when no SMTP_URL is set. Each
 * account reads its own mail only (addressed to its e-mail since it was created); the fake also
 * prints every message's links on the server console.
 */
export function outboxRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  api.add({
    method: "get",
    path: "/outbox",
    operationId: "listOutbox",
    summary: "Your own mail, as caught by the local fake mail server (not in production)",
    tags: ["outbox"],
    access: "user",
    response: { status: 200, schema: outboxListSchema },
    async handler({ user }) {
      if (ctx.config.environment === "production" || ctx.config.smtpUrl) throw notFound("There is no outbox: mail goes to a real mail server.");
      const account = await ctx.services.users.get(user!.id);
      return { messages: await ctx.services.outbox.listFor({ email: account.email, since: new Date(account.createdAt) }) };
    },
  });
  return api;
}
