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
