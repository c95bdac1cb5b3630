// One declaration per endpoint: it validates input with the shared zod schemas, decides access
// from (user, study, action) through shared/roles, and registers the endpoint in the OpenAPI
// document. No route checks roles by hand.
import { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { Router as ExpressRouter, type NextFunction, type Request, type RequestHandler, type Response, type Router } from "express";
import { z, type ZodType } from "zod";
import type { StudyAction, StudyRole } from "../../shared/roles";
import { can, sharedRole } from "../../shared/roles";
import type { TokenGrant } from "../services/apiTokens";
import { apiErrorSchema, findLoneSurrogate, loneSurrogateMessage } from "../../shared/schemas/common";
import { forbidden, HttpError, unauthorized, validationError } from "./errors";
import type { AppContext } from "../context";

export type Access = "public" | "user" | StudyAction;

export interface SessionUser {
  id: string;
  email: string;
  name: string;
  sessionId: string;
}

/** A request after the session cookie or an API token was read (server/auth). */
export type AuthenticatedRequest = Request & { sessionUser?: SessionUser; apiToken?: TokenGrant };

export interface HandlerArgs<B, Q, P> {
  body: B;
  query: Q;
  params: P;
  user: SessionUser | null;
  role: StudyRole | null;
  /** The API token the request was made with, when it was not made with a session. */
  apiToken: TokenGrant | null;
  req: Request;
  res: Response;
  ctx: AppContext;
}

export interface RouteSpec<B extends ZodType, Q extends ZodType, P extends ZodType> {
  method: "get" | "post" | "patch" | "put" | "delete";
  /** Express path below /api, e.g. "/studies/:studyId/members". */
  path: string;
  /** Stable lowerCamelCase name of the operation in the OpenAPI document (generated clients name their methods after it). */
  operationId: string;
  summary: string;
  tags: string[];
  access: Access;
  /** Acts on the account itself (password, tokens, sign-out, new studies...): a session only, never an API token. */
  sessionOnly?: true;
  body?: B;
  query?: Q;
  params?: P;
  /** Status and schema of the success answer; `raw` handlers send the answer themselves. */
  response: { status: number; schema?: ZodType; description?: string; contentType?: string };
  /** An error answer that carries more than a message (a DomainError with details, see server/domain/errors.ts): documented with its own schema. */
  errorBody?: { status: number; schema: ZodType; description: string };
  /** Extra middleware that runs after the access check and before validation (e.g. multer for uploads). */
  before?: RequestHandler[];
  /** For OpenAPI only, when `before` parses a multipart body. */
  multipart?: ZodType;
  handler: (args: HandlerArgs<z.output<B>, z.output<Q>, z.output<P>>) => Promise<unknown> | unknown;
}

interface RouteAccess {
  params: unknown;
  user: SessionUser | null;
  role: StudyRole | null;
  apiToken: TokenGrant | null;
}

export interface RegisteredRoute {
  method: string;
  path: string; // OpenAPI form, /api/studies/{studyId}
  access: Access;
}

/** operationIds already declared in each OpenAPI document: a second route with the same id is a mistake. */
const declaredOperationIds = new WeakMap<OpenAPIRegistry, Set<string>>();

/** One resource's Express router, whose endpoints are declared with `add`. */
export class ApiRouter {
  readonly routes: RegisteredRoute[] = [];
  readonly router: Router = ExpressRouter();
  constructor(
    private readonly registry: OpenAPIRegistry,
    private readonly ctx: AppContext,
  ) {}

  add<B extends ZodType = ZodType, Q extends ZodType = ZodType, P extends ZodType = ZodType>(spec: RouteSpec<B, Q, P>): void {
    const openApiPath = "/api" + spec.path.replace(/:(\w+)/g, "{$1}");
    const declared = declaredOperationIds.get(this.registry) ?? new Set<string>();
    declaredOperationIds.set(this.registry, declared);
    if (declared.has(spec.operationId)) throw new Error(`Two routes declare the operationId "${spec.operationId}" (the second: ${spec.method.toUpperCase()} ${spec.path})`);
    declared.add(spec.operationId);
    this.routes.push({ method: spec.method, path: openApiPath, access: spec.access });
    this.registerOpenApi(spec, openApiPath);
    const ctx = this.ctx;
    // Access is decided before anything reads the body (an upload's `before` included), so a
    // refused request is answered 401/403 without its body being read or stored.
    const authorise = async (req: Request, res: Response, next: NextFunction) => {
      try {
        const params = spec.params ? spec.params.safeParse(req.params) : { success: true as const, data: req.params };
        if (!params.success) throw validationError(params.error, "path");
        const user = (req as AuthenticatedRequest).sessionUser ?? null;
        const apiToken = (req as AuthenticatedRequest).apiToken ?? null;
        let role: StudyRole | null = null;
        if (spec.access !== "public") {
          if (!user) throw unauthorized();
          if (apiToken && spec.sessionOnly) throw forbidden("An API token cannot do this: sign in to the app to change the account, its tokens or its studies.");
          if (spec.access !== "user") {
            const studyId = (params.data as { studyId?: string }).studyId;
            if (!studyId) throw new Error(`Route ${spec.path} checks a study action but has no studyId`);
            role = await ctx.services.studies.roleOf(studyId, user.id);
            if (apiToken) {
              // Both bounds hold on every request: the token's role and the owner's role today.
              const granted = apiToken.studies.get(studyId);
              if (!granted) throw forbidden("This API token does not cover this study.");
              role = role ? sharedRole(role, granted) : null;
            }
            if (!can(role, spec.access)) {
              throw role ? forbidden() : forbidden("You are not a member of this study.");
            }
          }
        }
        res.locals.routeAccess = { params: params.data, user, role, apiToken } satisfies RouteAccess;
        next();
      } catch (err) {
        next(err);
      }
    };
    const handler = async (req: Request, res: Response, next: NextFunction) => {
      try {
        const { params, user, role, apiToken } = res.locals.routeAccess as RouteAccess;
        refuseLoneSurrogates(req.query, "query");
        refuseLoneSurrogates(req.body, "request body");
        const query = spec.query ? spec.query.safeParse(req.query) : { success: true as const, data: req.query };
        if (!query.success) throw validationError(query.error, "query");
        const body = spec.body ? spec.body.safeParse(req.body ?? {}) : { success: true as const, data: undefined };
        if (!body.success) throw validationError(body.error, "request body");
        const result = await spec.handler({
          body: body.data as never,
          query: query.data as never,
          params: params as never,
          user,
          role,
          apiToken,
          req,
          res,
          ctx,
        });
        if (res.headersSent) return;
        if (spec.response.status === 204) res.status(204).end();
        else res.status(spec.response.status).json(result);
      } catch (err) {
        next(err);
      }
    };
    this.router[spec.method](spec.path, authorise, ...(spec.before ?? []), handler);
  }

  private registerOpenApi(spec: RouteSpec<ZodType, ZodType, ZodType>, path: string): void {
    const errors = (codes: number[]) =>
      Object.fromEntries(
        codes.map((code) => [code, { description: ERROR_DESCRIPTIONS[code], content: { "application/json": { schema: apiErrorSchema } } }]),
      );
    const errorCodes = [400, ...(spec.access === "public" ? [] : [401]), ...(spec.access !== "public" && spec.access !== "user" ? [403] : []), 429, 503];
    const success = spec.response.schema
      ? { description: spec.response.description ?? "Success", content: { [spec.response.contentType ?? "application/json"]: { schema: spec.response.schema } } }
      : { description: spec.response.description ?? "Success" };
    const body = spec.multipart
      ? { body: { content: { "multipart/form-data": { schema: spec.multipart } } } }
      : spec.body
        ? { body: { content: { "application/json": { schema: spec.body } } } }
        : {};
    this.registry.registerPath({
      method: spec.method,
      path,
      operationId: spec.operationId,
      summary: spec.summary,
      tags: spec.tags,
      security: spec.access === "public" ? [] : spec.sessionOnly ? [{ session: [] }] : [{ session: [] }, { apiToken: [] }],
      description: spec.access !== "public" && spec.access !== "user" ? `Study action: \`${spec.access}\`` : undefined,
      request: {
        ...(spec.params ? { params: spec.params as never } : {}),
        ...(spec.query ? { query: spec.query as never } : {}),
        ...body,
      },
      responses: {
        [spec.response.status]: success,
        ...errors(errorCodes),
        ...(spec.errorBody ? { [spec.errorBody.status]: { description: spec.errorBody.description, content: { "application/json": { schema: spec.errorBody.schema } } } } : {}),
      },
    });
  }
}

/** Text with a lone UTF-16 surrogate anywhere in the input is refused here, for every route (400 naming the field). */
function refuseLoneSurrogates(input: unknown, where: string): void {
  const found = findLoneSurrogate(input);
  if (found) {
    const message = loneSurrogateMessage(found.path === "_" ? "The text" : found.path, found.codePoint);
    throw new HttpError(400, "validation_failed", `Invalid ${where}: ${message}`, { [found.path]: message });
  }
}

const ERROR_DESCRIPTIONS: Record<number, string> = {
  400: "Invalid input; `fields` names each field at fault",
  401: "No session: sign in",
  403: "The caller's role does not allow this",
  429: "Too many attempts; see Retry-After",
  503: "The database is unreachable",
};

export { HttpError };
