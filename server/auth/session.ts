import { SignJWT, jwtVerify } from "jose";
import type { CookieOptions, NextFunction, Request, RequestHandler, Response } from "express";
import type { AppContext } from "../context";
import type { SessionUser } from "../http/route";

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
 */
export function loadSession(ctx: AppContext): RequestHandler {
  return async (req: Request, res: Response, next: NextFunction) => {
    const token = (req.cookies as Record<string, string> | undefined)?.[SESSION_COOKIE];
    // The health check answers for the database itself, signed in or not.
    if (!token || req.path === "/health") return next();
    try {
      const { payload } = await jwtVerify(token, ctx.config.sessionSecret, { algorithms: ["HS256"] });
      const sessionId = typeof payload.sid === "string" ? payload.sid : null;
      if (!sessionId || !payload.sub) return next();
      const user = await ctx.services.users.liveSessionUser(sessionId, payload.sub);
      if (user) (req as Request & { sessionUser?: SessionUser }).sessionUser = { ...user, sessionId };
      else clearSessionCookie(ctx, res);
      next();
    } catch (err) {
      const name = (err as { code?: string }).code ?? "";
      if (name.startsWith("ERR_JW")) {
        clearSessionCookie(ctx, res); // expired or forged: treat as signed out
        return next();
      }
      next(err);
    }
  };
}
