// Limits on the account endpoints, counted in PostgreSQL so that every app process sees the same
// hits. Guessing is bounded per client address; an account's own sign-in is slowed down after
// failures, never locked (a lock-out would let anyone keep a person out of their account).
import { rateLimit, ipKeyGenerator } from "express-rate-limit";
import type { Request, RequestHandler } from "express";
import type { AppContext } from "../context";
import { PostgresRateLimitStore } from "./rateLimitStore";

function limitHandler(what: string, from: string): RequestHandler {
  return (_req, res) => {
    res.status(429).json({
      error: {
        code: "too_many_attempts",
        message: `Too many ${what} ${from}. Wait ${res.getHeader("Retry-After") ?? "a few"} seconds and try again.`,
      },
    });
  };
}

const COMMON = { standardHeaders: "draft-7" as const, legacyHeaders: false, passOnStoreError: false };
const byIp = (req: Request) => ipKeyGenerator(req.ip ?? "unknown");
const byEmail = (req: Request) => String((req.body as { email?: unknown } | undefined)?.email ?? "").trim().toLowerCase() || "none";
const bySessionUser = (req: Request) => (req as Request & { sessionUser?: { id: string } }).sessionUser?.id ?? "none";

/**
 * The wait before answering the n-th failed try beyond the free ones: `delayMs` doubling with each
 * further failure, up to 32 times `delayMs` (common practice, no source).
 */
export function signInDelayMs(failures: number, free: number, delayMs: number): number {
  const excess = failures - free;
  return excess <= 0 ? 0 : delayMs * 2 ** Math.min(excess - 1, 5);
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/**
 * Sign-in: failed attempts only are counted. Per client address they are capped (429 with
 * Retry-After); per account (the e-mail tried) each failure beyond the free ones makes the next
 * answer for that account wait longer, the right password included, but never refused.
 */
export function loginLimiters(ctx: AppContext): RequestHandler[] {
  const { windowMs, perIp, perAccount, delayMs = 1000 } = ctx.config.loginLimit;
  const failuresOnly = { ...COMMON, windowMs, skipSuccessfulRequests: true };
  return [
    rateLimit({ ...failuresOnly, limit: perIp, store: new PostgresRateLimitStore(ctx.db, "login-ip"), keyGenerator: byIp, handler: limitHandler("failed sign-ins", "from this address") }),
    rateLimit({
      ...failuresOnly,
      standardHeaders: false,
      limit: Number.MAX_SAFE_INTEGER, // counts only; the wait below does the limiting
      requestPropertyName: "accountFailures",
      store: new PostgresRateLimitStore(ctx.db, "login-account"),
      keyGenerator: byEmail,
    }),
    async (req, _res, next) => {
      const used = (req as Request & { accountFailures?: { used: number } }).accountFailures?.used ?? 0;
      // `used` counts this attempt too: the first try after `perAccount` failures waits `delayMs`.
      const wait = signInDelayMs(used - 1, perAccount, delayMs);
      if (wait > 0) await sleep(wait);
      next();
    },
  ];
}

/** Password-reset e-mails: every request counts (the answer is always the same 202), per address and per account. */
export function resetLimiters(ctx: AppContext): RequestHandler[] {
  const { windowMs, perIp, perAccount } = ctx.config.loginLimit;
  return [
    rateLimit({ ...COMMON, windowMs, limit: perIp, store: new PostgresRateLimitStore(ctx.db, "reset-ip"), keyGenerator: byIp, handler: limitHandler("reset requests", "from this address") }),
    rateLimit({ ...COMMON, windowMs, limit: perAccount, store: new PostgresRateLimitStore(ctx.db, "reset-account"), keyGenerator: byEmail, handler: limitHandler("reset requests", "for this account") }),
  ];
}

/**
 * Sign-up: every attempt counts, per client address (bulk account creation, and checking many
 * addresses) and per e-mail (each attempt on a registered address mails its owner).
 */
export function signupLimiters(ctx: AppContext): RequestHandler[] {
  const { windowMs, perIp, perAddress } = ctx.config.signupLimit;
  return [
    rateLimit({ ...COMMON, windowMs, limit: perIp, store: new PostgresRateLimitStore(ctx.db, "signup-ip"), keyGenerator: byIp, handler: limitHandler("sign-ups", "from this address") }),
    rateLimit({ ...COMMON, windowMs, limit: perAddress, store: new PostgresRateLimitStore(ctx.db, "signup-email"), keyGenerator: byEmail, handler: limitHandler("sign-ups", "with this e-mail") }),
  ];
}

/** Password change: failed tries of the current password count, per account and per client address. */
export function passwordChangeLimiters(ctx: AppContext): RequestHandler[] {
  const { windowMs, perIp, perAccount } = ctx.config.loginLimit;
  const failuresOnly = { ...COMMON, windowMs, skipSuccessfulRequests: true };
  return [
    rateLimit({ ...failuresOnly, limit: perIp, store: new PostgresRateLimitStore(ctx.db, "password-ip"), keyGenerator: byIp, handler: limitHandler("failed password changes", "from this address") }),
    rateLimit({ ...failuresOnly, limit: perAccount, store: new PostgresRateLimitStore(ctx.db, "password-account"), keyGenerator: bySessionUser, handler: limitHandler("failed password changes", "for this account") }),
  ];
}
