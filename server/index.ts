// The server process: `npm start` runs it after the database is ready (scripts/start.ts).
import { join } from "node:path";
import { loadConfig } from "./config";
import { createContext } from "./context-factory";
import { createApp } from "./app";

export async function startServer() {
  const config = loadConfig();
  const ctx = await createContext(config);
  const { app } = createApp(ctx, { clientDir: join(process.cwd(), "dist") });
  const server = app.listen(config.port, config.host);
  await new Promise<void>((resolve, reject) => {
    server.once("listening", resolve);
    server.once("error", reject);
  });
  const shutdown = () => {
    server.close(() => void ctx.close().then(() => process.exit(0)));
    setTimeout(() => process.exit(0), 5000).unref();
  };
  process.once("SIGINT", shutdown);
  process.once("SIGTERM", shutdown);
  return { server, ctx, config };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  startServer()
    .then(({ config }) => console.log(`Stratasieve is serving on ${config.appUrl}`))
    .catch((err) => {
      console.error(err instanceof Error ? err.message : err);
      process.exit(1);
    });
}
