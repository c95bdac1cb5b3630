import { AsyncLocalStorage } from "node:async_hooks";
import type { NextFunction, Request, Response } from "express";
import type pg from "pg";

interface RequestTiming {
  dbMs: number;
  queries: number;
}

const currentRequest = new AsyncLocalStorage<RequestTiming>();

/**
 * Adds a Server-Timing header (W3C Server Timing) to every API answer: the time the app took and
 * how much of it went to PostgreSQL (summed over the request's queries, so parallel queries count
 * each), which the browser's network panel and the bench read.
 */
export function serverTiming() {
  return (_req: Request, res: Response, next: NextFunction) => {
    const started = performance.now();
    const timing: RequestTiming = { dbMs: 0, queries: 0 };
    const writeHead = res.writeHead;
    res.writeHead = function (this: Response, ...args: Parameters<Response["writeHead"]>) {
      if (!this.headersSent) {
        const appMs = performance.now() - started;
        this.setHeader("Server-Timing", `db;dur=${timing.dbMs.toFixed(1)};desc="${timing.queries} queries", app;dur=${appMs.toFixed(1)}`);
      }
      return writeHead.apply(this, args);
    } as Response["writeHead"];
    currentRequest.run(timing, next);
  };
}

/**
 * Counts each query a pool client runs toward the request it runs for (none outside a request).
 * pg's Pool.query hands its client a callback; drizzle's transactions use the promise form.
 */
export function timeQueries(client: pg.PoolClient): void {
  const query = client.query as (...args: unknown[]) => unknown;
  client.query = function (this: pg.PoolClient, ...args: unknown[]) {
    const timing = currentRequest.getStore();
    if (!timing) return query.apply(this, args);
    const started = performance.now();
    const done = () => {
      timing.dbMs += performance.now() - started;
      timing.queries += 1;
    };
    const last = args.length - 1;
    if (typeof args[last] === "function") {
      const callback = args[last] as (...a: unknown[]) => unknown;
      args[last] = (...a: unknown[]) => {
        done();
        return callback(...a);
      };
      return query.apply(this, args);
    }
    const answer = query.apply(this, args);
    if (!answer || typeof (answer as Promise<unknown>).finally !== "function") return answer;
    return (answer as Promise<unknown>).finally(done);
  } as typeof client.query;
}
