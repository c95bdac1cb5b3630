// Error answers that carry more than a message: a 409 naming the current value and who set it, a
// 400 listing every problem of an import by row and column. The body keeps the usual
// `{ error: { code, message } }` and adds the details beside it.
import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import type { Response } from "express";
import { z, type ZodType } from "zod";
import { HttpError } from "./errors";

export class DetailedHttpError extends HttpError {
  constructor(
    status: number,
    code: string,
    message: string,
    readonly details: Record<string, unknown>,
  ) {
    super(status, code, message);
  }
}

/**
 * Runs a route's work; a DetailedHttpError becomes its JSON answer here (the app's error handler
 * would drop the details), anything else goes on to the error handler.
 */
export async function answeringDetails<T>(res: Response, work: () => Promise<T>): Promise<T | undefined> {
  try {
    return await work();
  } catch (err) {
    if (err instanceof DetailedHttpError) {
      res.status(err.status).json({ error: { code: err.code, message: err.message }, ...err.details });
      return undefined;
    }
    throw err;
  }
}

/**
 * Lists the schema of a detailed error body (and the named schemas inside it) among the OpenAPI
 * document's components, so the client's types and the document agree. A route names it in the
 * description of its answer (e.g. "409: TaxonConflict").
 */
export function documentErrorBody(registry: OpenAPIRegistry, schema: ZodType): void {
  const json = z.toJSONSchema(schema, { io: "output", unrepresentable: "any" }) as { $defs?: Record<string, unknown> };
  const defs = JSON.parse(JSON.stringify(json.$defs ?? {}).replaceAll('"#/$defs/', '"#/components/schemas/')) as Record<string, object>;
  for (const [name, def] of Object.entries(defs)) registry.registerComponent("schemas", name, def as never);
}
