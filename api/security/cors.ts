/**
 * The CORS policy, from `SUNLAG_CORS_ORIGINS`:
 *
 * - empty (the default): no CORS headers; browsers keep other sites' pages out.
 * - a list of origins: those pages may read and write, sending `Authorization` (a key the
 *   user gave them) and JSON. Never `Access-Control-Allow-Credentials`: the service uses no
 *   cookies.
 * - `*`: any page may read (GET, HEAD) public items anonymously; no `Authorization`, no
 *   state-changing method, no credentials, so a key never travels cross-site on its own and
 *   no page can change anything.
 *
 * @module
 */
import type { MiddlewareHandler } from "hono";
import { cors } from "hono/cors";

const EXPOSE = ["X-Request-Id", "ETag", "Location", "Preference-Applied", "Retry-After"];

/** The CORS middleware for the configured origins, or null when CORS is off. */
export function corsPolicy(origins: readonly string[]): MiddlewareHandler | null {
  if (origins.length === 0) return null;
  if (origins.includes("*")) {
    return cors({
      origin: "*",
      allowMethods: ["GET", "HEAD", "OPTIONS"],
      allowHeaders: ["Accept", "If-None-Match", "X-Request-Id"],
      exposeHeaders: EXPOSE,
      credentials: false,
      maxAge: 600,
    });
  }
  return cors({
    origin: [...origins],
    allowMethods: ["GET", "HEAD", "POST", "PATCH", "DELETE", "OPTIONS"],
    allowHeaders: [
      "Content-Type",
      "Content-Encoding",
      "Accept",
      "Authorization",
      "Prefer",
      "If-None-Match",
      "X-Request-Id",
      "X-Requested-With",
    ],
    exposeHeaders: EXPOSE,
    credentials: false,
    maxAge: 600,
  });
}

/** The headers CORS adds to a response to a request that is not a preflight. */
export interface CorsHeaders {
  /** Set on the response (before the route answers, so they win over the route's own). */
  before: [string, string][];
  /** Whether `Vary: Origin` is appended once the route answered. */
  varyOrigin: boolean;
}

/**
 * What the policy of {@link corsPolicy} adds to the response to a GET or HEAD from `origin`
 * ("" when the request has none), for the fast path of cached GETs (api/hot_gets.ts), which
 * answers without the middleware: the same as `hono/cors` with these options (its
 * `Access-Control-Allow-Origin`, `Access-Control-Expose-Headers` and, for a list of origins,
 * `Vary: Origin`), checked side by side in test/api/hot_gets_test.ts.
 */
export function corsSimpleHeaders(origins: readonly string[], origin: string): CorsHeaders {
  const any = origins.includes("*");
  const allow = any ? "*" : origins.includes(origin) ? origin : null;
  const before: [string, string][] = [];
  if (allow) before.push(["Access-Control-Allow-Origin", allow]);
  before.push(["Access-Control-Expose-Headers", EXPOSE_TEXT]);
  return { before, varyOrigin: !any };
}

const EXPOSE_TEXT = EXPOSE.join(",");
