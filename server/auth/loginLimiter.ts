import { rateLimit, ipKeyGenerator } from "express-rate-limit";
import type { RequestHandler } from "express";
import type { AppContext } from "../context";
import { PostgresRateLimitStore } from "./rateLimitStore";

function limitHandler(what: string): RequestHandler {
  return (_req, res) => {
    res.status(429).json({
      error: {
        code: "too_many_attempts",
        message: `Too many sign-in attempts ${what}. Wait ${res.getHeader("Retry-After") ?? "a few"} seconds and try again.`,
      },
    });
  };
}

/** Sign-in is limited per client IP and per account (the e-mail tried), counted in PostgreSQL. */
export function loginLimiters(ctx: AppContext, purpose = "login"): RequestHandler[] {
  const { windowMs, perIp, perAccount } = ctx.config.loginLimit;
  const common = { windowMs, standardHeaders: "draft-7" as const, legacyHeaders: false, passOnStoreError: false };
  return [
    rateLimit({
      ...common,
      limit: perIp,
      store: new PostgresRateLimitStore(ctx.db, `${purpose}-ip`),
      keyGenerator: (req) => ipKeyGenerator(req.ip ?? "unknown"),
      handler: limitHandler("from this address"),
    }),
    rateLimit({
      ...common,
      limit: perAccount,
      store: new PostgresRateLimitStore(ctx.db, `${purpose}-account`),
      keyGenerator: (req) => String((req.body as { email?: unknown } | undefined)?.email ?? "").trim().toLowerCase() || "none",
      handler: limitHandler("for this account"),
    }),
  ];
}
