import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import {
  accountUpdateSchema,
  loginSchema,
  meSchema,
  passwordChangeSchema,
  passwordResetConfirmSchema,
  passwordResetRequestSchema,
  sessionSchema,
  signupAnswerSchema,
  signupSchema,
  userSchema,
} from "../../shared/schemas/auth";
import { okSchema } from "../../shared/schemas/common";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route";
import { clearSessionCookie, startSession } from "../auth/session";
import { loginLimiters, passwordChangeLimiters, resetLimiters, signupLimiters } from "../auth/loginLimiter";
import { passwordResetMail, signupAttemptMail } from "../mail/templates";

export function authRouter(ctx: AppContext, registry: OpenAPIRegistry): ApiRouter {
  const api = new ApiRouter(registry, ctx);
  const { users } = ctx.services;

  api.add({
    method: "post",
    path: "/auth/signup",
    operationId: "signUp",
    summary: "Create an account and sign in; an e-mail that already has an account gets `check_mail` (no session) and its owner a notice",
    tags: ["auth"],
    access: "public",
    before: signupLimiters(ctx),
    body: signupSchema,
    response: { status: 201, schema: signupAnswerSchema },
    async handler({ body, res }) {
      const user = await users.signup(body);
      if (user) {
        await startSession(ctx, res, user.id);
        return user;
      }
      // Never "already exists": the owner of the address learns of the attempt by mail instead.
      const mail = signupAttemptMail({ signInLink: `${ctx.config.appUrl}/sign-in`, resetLink: `${ctx.config.appUrl}/forgot-password` });
      await ctx.mailer.send({ to: body.email, ...mail }).catch((err: unknown) => console.error("The sign-up notice could not be sent:", err));
      return { status: "check_mail" as const, email: body.email };
    },
  });

  api.add({
    method: "post",
    path: "/auth/login",
    operationId: "signIn",
    summary: "Sign in (failures capped per client address; an account's failures slow its next answers down)",
    tags: ["auth"],
    access: "public",
    before: loginLimiters(ctx),
    body: loginSchema,
    response: { status: 200, schema: userSchema },
    async handler({ body, res }) {
      const user = await users.authenticate(body.email, body.password);
      await startSession(ctx, res, user.id);
      return user;
    },
  });

  api.add({
    method: "post",
    path: "/auth/logout",
    operationId: "signOut",
    summary: "Sign out of this browser",
    tags: ["auth"],
    access: "public",
    sessionOnly: true,
    response: { status: 204 },
    async handler({ user, res }) {
      if (user) await users.endSession(user.sessionId);
      clearSessionCookie(ctx, res);
    },
  });

  // The client asks this on every first load: a signed-out visitor gets 200 with `user: null`, not
  // a 401 that the browser would print as an error on the sign-in page.
  api.add({
    method: "get",
    path: "/auth/session",
    operationId: "getSession",
    summary: "Who is signed in in this browser: the account, or null when nobody is",
    tags: ["auth"],
    access: "public",
    response: { status: 200, schema: sessionSchema },
    async handler({ user }) {
      return { user: user ? await users.get(user.id) : null, environment: ctx.config.environment };
    },
  });

  api.add({
    method: "get",
    path: "/auth/me",
    operationId: "getCurrentUser",
    summary: "The signed-in account",
    tags: ["auth"],
    access: "user",
    response: { status: 200, schema: meSchema },
    async handler({ user }) {
      return { user: await users.get(user!.id), environment: ctx.config.environment };
    },
  });

  api.add({
    method: "patch",
    path: "/auth/me",
    operationId: "updateCurrentUser",
    summary: "Change the account's name",
    tags: ["auth"],
    access: "user",
    sessionOnly: true,
    body: accountUpdateSchema,
    response: { status: 200, schema: userSchema },
    handler: ({ user, body }) => users.updateName(user!.id, body.name),
  });

  api.add({
    method: "post",
    path: "/auth/password",
    operationId: "changePassword",
    summary: "Change the password; ends every other session of the account (failed tries rate-limited)",
    tags: ["auth"],
    access: "user",
    sessionOnly: true,
    before: passwordChangeLimiters(ctx),
    body: passwordChangeSchema,
    response: { status: 204 },
    async handler({ user, body }) {
      await users.changePassword(user!.id, user!.sessionId, body.currentPassword, body.newPassword);
    },
  });

  api.add({
    method: "post",
    path: "/auth/password-reset/request",
    operationId: "requestPasswordReset",
    summary: "E-mail a one-time reset link (answers the same whether or not the account exists)",
    tags: ["auth"],
    access: "public",
    before: resetLimiters(ctx),
    body: passwordResetRequestSchema,
    response: { status: 202, schema: okSchema },
    async handler({ body }) {
      const reset = await users.createPasswordReset(body.email);
      if (reset) {
        await ctx.mailer.send({ to: body.email, ...passwordResetMail({ link: `${ctx.config.appUrl}/reset-password/${reset.token}` }) });
      }
      return { ok: true };
    },
  });

  api.add({
    method: "post",
    path: "/auth/password-reset/confirm",
    operationId: "confirmPasswordReset",
    summary: "Set a new password with the e-mailed token",
    tags: ["auth"],
    access: "public",
    body: passwordResetConfirmSchema,
    response: { status: 204 },
    async handler({ body }) {
      await users.confirmPasswordReset(body.token, body.password);
    },
  });

  return api;
}
