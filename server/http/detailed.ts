// Error answers that carry more than a message: a 409 naming the current value and who set it, a
// 400 listing every problem of an import by row and column. The body keeps the usual
// `{ error: { code, message } }` and adds the details beside it.
import type { Response } from "express";
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
