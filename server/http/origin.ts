import type { RequestHandler } from "express";
import { HttpError } from "./errors";
import { sentWithBearerToken } from "../auth/apiToken";

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/** Host names that only this machine can be reached by: no outside page can make a browser send them. */
const LOOPBACK_HOSTNAMES = new Set(["localhost", "127.0.0.1", "[::1]"]);

function hostnameOf(host: string): string {
  try {
    return new URL(`http://${host}`).hostname;
  } catch {
    return "";
  }
}

/**
 * Guards the API against other sites, with APP_URL as the app's only public name:
 * - a request naming another Host is refused (421), so a name an attacker points at this server
 *   (DNS rebinding) cannot read or change anything; loopback names stay allowed, since no page
 *   elsewhere can make a browser send them (the app opened as localhost, a proxy on the machine);
 * - a state-changing request must come from APP_URL's origin (the Origin header), or from the
 *   loopback origin it was sent to.
 * The health check answers whatever the Host, for load balancers that call it by address.
 */
export function sameOriginOnly(appUrl: string, extraOrigins: string[] = []): RequestHandler {
  const app = new URL(appUrl);
  const allowedOrigins = new Set([app.origin, ...extraOrigins]);
  const allowedHosts = new Set([app.host, ...extraOrigins.map((o) => new URL(o).host)]);
  return (req, _res, next) => {
    const host = req.host ?? ""; // the Host header, or X-Forwarded-Host when the proxy is trusted
    const loopback = LOOPBACK_HOSTNAMES.has(hostnameOf(host));
    if (!allowedHosts.has(host) && !loopback && req.path !== "/health") {
      return next(new HttpError(421, "unknown_host", `This server answers as ${app.host} only, not as ${host || "an unnamed host"}. Use the app at ${appUrl}.`));
    }
    // A browser never adds a bearer token by itself, and a page elsewhere cannot make it send one
    // without a CORS preflight this API never grants: scripts with API tokens send no Origin.
    if (SAFE_METHODS.has(req.method) || sentWithBearerToken(req)) return next();
    const origin = req.get("origin");
    const fetchSite = req.get("sec-fetch-site");
    const ownLoopbackOrigin = loopback && origin === `${req.protocol}://${host}`;
    if (origin && !allowedOrigins.has(origin) && !ownLoopbackOrigin) {
      return next(new HttpError(403, "cross_origin", `Requests from ${origin} are not accepted; use the app at ${appUrl}.`));
    }
    if (!origin && fetchSite === "cross-site") {
      return next(new HttpError(403, "cross_origin", "Cross-site requests are not accepted."));
    }
    next();
  };
}
