import { SignJWT, errors as joseErrors, jwtVerify } from "jose";
import type { CookieOptions, NextFunction, Request, RequestHandler, Response } from "express";
import type { AppContext } from "../context";
import type { AuthenticatedRequest } from "../http/route";

export const SESSION_COOKIE = "ss_session";

export async function signSessionToken(ctx: AppContext, sessionId: string, userId: string, expiresAt: Date): Promise<string> {
  return new SignJWT({ sid: sessionId })
    .setProtectedHeader({ alg: "HS256" })
    .setSubject(userId)
    .setIssuedAt()
    .setExpirationTime(Math.floor(expiresAt.getTime() / 1000))
    .sign(ctx.config.sessionSecret);
}

export function sessionCookieOptions(ctx: AppContext, expiresAt?: Date): CookieOptions {
  return {
    httpOnly: true,
    sameSite: "lax",
    secure: ctx.config.environment === "production",
    path: "/",
    ...(expiresAt ? { expires: expiresAt } : {}),
  };
}

/** Starts a session row and sets the cookie. */
export async function startSession(ctx: AppContext, res: Response, userId: string): Promise<void> {
  const expiresAt = new Date(Date.now() + ctx.config.sessionTtlSeconds * 1000);
  const sessionId = await ctx.services.users.createSession(userId, expiresAt);
  const token = await signSessionToken(ctx, sessionId, userId, expiresAt);
  res.cookie(SESSION_COOKIE, token, sessionCookieOptions(ctx, expiresAt));
}

export function clearSessionCookie(ctx: AppContext, res: Response): void {
  res.clearCookie(SESSION_COOKIE, sessionCookieOptions(ctx));
}

/**
 * Reads the session cookie: a valid signature is not enough, the session row must still be
 * live, so sign-out and password changes take effect at once in every app process.
 * Every API answer it runs before is marked `Cache-Control: no-store`: nearly all of them depend
 * on who is signed in, and no browser or proxy cache may hand one person's answer to another.
 */
export function loadSession(ctx: AppContext): RequestHandler {
  return async (req: Request, res: Response, next: NextFunction) => {
    res.set("Cache-Control", "no-store");
    const token = (req.cookies as Record<string, string> | undefined)?.[SESSION_COOKIE];
    // The health check answers for the database itself, signed in or not.
    // A request made with an API token (auth/apiToken.ts) is already signed in: the cookie is not read.
    if (!token || req.path === "/health" || (req as AuthenticatedRequest).apiToken) return next();
    try {
      const { payload } = await jwtVerify(token, ctx.config.sessionSecret, { algorithms: ["HS256"] });
      const sessionId = typeof payload.sid === "string" ? payload.sid : null;
      if (!sessionId || !payload.sub) return next();
      const user = await ctx.services.users.liveSessionUser(sessionId, payload.sub);
      if (user) (req as AuthenticatedRequest).sessionUser = { ...user, sessionId };
      else clearSessionCookie(ctx, res);
      next();
    } catch (err) {
      // Expired, forged, garbled or signed with another algorithm (alg "none", RS256...): every
      // refusal by jose means no session, and the cookie is cleared so the browser stops sending it.
      if (err instanceof joseErrors.JOSEError) {
        clearSessionCookie(ctx, res);
        return next();
      }
      next(err);
    }
  };
}
