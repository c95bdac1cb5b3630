import type { RequestHandler } from "express";
import { HttpError } from "./errors";

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Refuses state-changing requests sent from another site: a browser names the page's origin in
 * the Origin header, which must be the app's own (APP_URL or the host the request came to).
 */
export function sameOriginOnly(appUrl: string, extraOrigins: string[] = []): RequestHandler {
  const allowed = new Set([new URL(appUrl).origin, ...extraOrigins]);
  return (req, _res, next) => {
    if (SAFE_METHODS.has(req.method)) return next();
    const origin = req.get("origin");
    const fetchSite = req.get("sec-fetch-site");
    const ownOrigin = `${req.protocol}://${req.get("host")}`;
    if (origin && origin !== ownOrigin && !allowed.has(origin)) {
      return next(new HttpError(403, "cross_origin", `Requests from ${origin} are not accepted; use the app at ${appUrl}.`));
    }
    if (!origin && fetchSite === "cross-site") {
      return next(new HttpError(403, "cross_origin", "Cross-site requests are not accepted."));
    }
    next();
  };
}
