import type { NextFunction, Request, RequestHandler, Response } from "express";
import expressStaticGzip from "express-static-gzip";
import type { ServerResponse } from "node:http";
import { join, sep } from "node:path";

/** A file under assets/ carries a hash of its content in its name: it never changes, so it is kept a year. */
export const IMMUTABLE_ASSET = "public, max-age=31536000, immutable";
/** index.html names the current assets: the browser asks again on every visit (a 304 when unchanged). */
export const REVALIDATE_PAGE = "no-cache";

/**
 * Serves the built client (dist/): the brotli or gzip copy that `vite build` wrote beside each file
 * when the browser accepts it, hashed assets cached for a year, and index.html for every other path
 * so that the client's router decides. An unknown file under /assets/ is a 404, never the page: a
 * browser holding an older index.html would otherwise run HTML as a script.
 */
export function clientAssets(clientDir: string): RequestHandler {
  const assetsDir = join(clientDir, "assets") + sep;
  const serveFile = expressStaticGzip(clientDir, {
    enableBrotli: true,
    orderPreference: ["br", "gzip"],
    index: false,
    serveStatic: {
      index: false,
      cacheControl: false,
      fallthrough: true,
      setHeaders(res: ServerResponse, path: string) {
        res.setHeader("Cache-Control", path.startsWith(assetsDir) ? IMMUTABLE_ASSET : REVALIDATE_PAGE);
      },
    },
  });
  return (req: Request, res: Response, next: NextFunction) => {
    if (req.method !== "GET" && req.method !== "HEAD") return next();
    serveFile(req, res, (err?: unknown) => {
      if (err) return next(err);
      if (req.path.startsWith("/assets/")) {
        res.status(404).type("text/plain").send("This file is not part of the current version of Stratasieve. Reload the page.");
        return;
      }
      req.url = "/index.html";
      serveFile(req, res, next);
    });
  };
}
