// `Authorization: Bearer <token>`: a person's API token stands in for a session on any /api route.
// An unknown, expired or revoked token is refused outright (401), never passed on as anonymous, so
// a script learns at once that its token stopped working.
import type { NextFunction, Request, RequestHandler, Response } from "express";
import type { AppContext } from "../context";
import { HttpError } from "../http/errors";
import type { AuthenticatedRequest } from "../http/route";

const BEARER = /^Bearer\s+(\S+)\s*$/i;

/** True when the request carries a bearer token (browsers never add one on their own, so no cross-site check applies). */
export const sentWithBearerToken = (req: Request) => /^Bearer\s/i.test(req.get("authorization") ?? "");

export function loadApiToken(ctx: AppContext): RequestHandler {
  return async (req: Request, res: Response, next: NextFunction) => {
    // Like every answer that depends on who asks (see loadSession), never cached.
    res.set("Cache-Control", "no-store");
    const header = req.get("authorization");
    if (!header || req.path === "/health") return next();
    const match = BEARER.exec(header);
    if (!match) return next(new HttpError(401, "invalid_token", "The Authorization header must read `Bearer <token>`."));
    try {
      const grant = await ctx.services.apiTokens.resolve(match[1]);
      if (!grant) return next(new HttpError(401, "invalid_token", "This API token is unknown, expired or revoked. Make a new one on the Account screen."));
      const auth = req as AuthenticatedRequest;
      auth.sessionUser = { ...grant.user, sessionId: `token:${grant.tokenId}` };
      auth.apiToken = grant;
      next();
    } catch (err) {
      next(err);
    }
  };
}
