import express, { type Express } from "express";
import compression from "compression";
import cookieParser from "cookie-parser";
import helmet from "helmet";
import { existsSync } from "node:fs";
import { join } from "node:path";
import { OpenAPIRegistry, OpenApiGeneratorV31 } from "@asteasolutions/zod-to-openapi";
import type { AppContext } from "./context";
import { APP_VERSION, type AppConfig } from "./config";
import { errorHandler, notFound } from "./http/errors";
import { clientAssets } from "./http/clientAssets";
import { sameOriginOnly } from "./http/origin";
import { serverTiming } from "./http/serverTiming";
import type { ApiRouter, RegisteredRoute } from "./http/route";
import { loadSession } from "./auth/session";
import { loadApiToken } from "./auth/apiToken";
import { healthRouter } from "./routes/health";
import { authRouter } from "./routes/auth";
import { apiTokensRouter } from "./routes/apiTokens";
import { studiesRouter } from "./routes/studies";
import { membersRouter } from "./routes/members";
import { invitationsRouter } from "./routes/invitations";
import { outboxRouter } from "./routes/outbox";
import { timescaleRouter } from "./routes/timescale";
import { outcomesRouter } from "./routes/outcomes";
import { overridesRouter } from "./routes/overrides";
import { ratesRouter } from "./routes/rates";
import { runsRouter } from "./routes/runs";
import { traitsRouter } from "./routes/traits";
import { taxaRouter } from "./routes/taxa";
import { decisionsRouter } from "./routes/decisions";
import { importsRouter } from "./routes/imports";
import { occurrencesRouter } from "./routes/occurrences";
import { timeBinsRouter } from "./routes/timeBins";
import { exportsRouter } from "./routes/exports";
import { modernListsRouter } from "./routes/modernLists";
import { comparisonsRouter } from "./routes/comparisons";
import { threadsRouter } from "./routes/threads";
import { notificationsRouter } from "./routes/notifications";
import { activityRouter } from "./routes/activity";

export interface BuiltApp {
  app: Express;
  openapi: Record<string, unknown>;
  routes: RegisteredRoute[];
}

const RESOURCE_ROUTERS = [healthRouter, authRouter, apiTokensRouter, studiesRouter, membersRouter, invitationsRouter, outboxRouter, timescaleRouter, outcomesRouter, overridesRouter, ratesRouter, runsRouter, traitsRouter, taxaRouter, decisionsRouter, importsRouter, occurrencesRouter, timeBinsRouter, exportsRouter, threadsRouter, notificationsRouter, activityRouter, modernListsRouter, comparisonsRouter];

export function buildOpenApi(registry: OpenAPIRegistry) {
  registry.registerComponent("securitySchemes", "session", { type: "apiKey", in: "cookie", name: "ss_session" });
  registry.registerComponent("securitySchemes", "apiToken", { type: "http", scheme: "bearer", description: "A personal API token from the Account screen" });
  return new OpenApiGeneratorV31(registry.definitions).generateDocument({
    openapi: "3.1.0",
    info: {
      title: "Stratasieve API",
      version: APP_VERSION,
      description: "Every endpoint validates its input with the same zod schemas the client uses. Errors are `{ error: { code, message, fields? } }`.",
    },
    servers: [{ url: "/" }],
  });
}

/**
 * The OpenAPI document alone, with no database or mail: the routes declare it when they are built,
 * and their services are only touched when a request comes (scripts/api-client.ts uses this).
 */
export function describeApi(config: AppConfig): Record<string, unknown> {
  const untouched = new Proxy({}, { get: () => ({}) });
  const ctx = { config, services: untouched, db: untouched, database: untouched, mailer: untouched, jobs: untouched, workers: untouched } as unknown as AppContext;
  const registry = new OpenAPIRegistry();
  for (const make of RESOURCE_ROUTERS) make(ctx, registry);
  return buildOpenApi(registry) as unknown as Record<string, unknown>;
}

export function createApp(ctx: AppContext, opts: { clientDir?: string } = {}): BuiltApp {
  const app = express();
  app.disable("x-powered-by");
  app.set("trust proxy", process.env.TRUST_PROXY ? Number(process.env.TRUST_PROXY) || process.env.TRUST_PROXY : false);
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: true,
        directives: {
          "default-src": ["'self'"],
          "img-src": ["'self'", "data:", "blob:"],
          "style-src": ["'self'", "'unsafe-inline'"], // charts set inline styles
          "font-src": ["'self'", "data:"],
          "connect-src": ["'self'"],
          "upgrade-insecure-requests": ctx.config.environment === "production" ? [] : null,
        },
      },
      hsts: ctx.config.environment === "production",
    }),
  );
  app.use(express.json({ limit: "2mb" }));
  app.use(cookieParser());

  const registry = new OpenAPIRegistry();
  const routers: ApiRouter[] = RESOURCE_ROUTERS.map((make) => make(ctx, registry));
  const openapi = buildOpenApi(registry) as unknown as Record<string, unknown>;

  const api = express.Router();
  api.use(serverTiming());
  // JSON answers (a run's results run to hundreds of kilobytes) go brotli or gzip, as the browser accepts.
  api.use(compression());
  api.use(sameOriginOnly(ctx.config.appUrl));
  api.use(loadApiToken(ctx));
  api.use(loadSession(ctx));
  api.get("/openapi.json", (_req, res) => {
    res.json(openapi);
  });
  for (const r of routers) api.use(r.router);
  api.use((req, _res, next) => next(notFound(`No API endpoint ${req.method} ${req.originalUrl}.`)));
  app.use("/api", api);

  const clientDir = opts.clientDir;
  if (clientDir && existsSync(join(clientDir, "index.html"))) {
    app.use(clientAssets(clientDir));
  }
  app.use(errorHandler);
  return { app, openapi, routes: routers.flatMap((r) => r.routes) };
}
