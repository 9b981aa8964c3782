/**
 * Cross-site request forgery guard: a state-changing request (POST, PUT, PATCH, DELETE) that a
 * web page on another site could send without a CORS preflight (a "simple" request: no
 * Content-Type or a CORS-safelisted one, `text/plain`, `application/x-www-form-urlencoded`,
 * `multipart/form-data`, and no custom header) is refused when it comes from another origin.
 *
 * A request is cross-site when its `Origin` is not this service's own or `null`, or
 * `Sec-Fetch-Site` says `cross-site` or `same-site`. Browsers send `Origin` with every request
 * whose method is neither GET nor HEAD (Fetch standard, "append a request Origin header"), so
 * scripts and command-line clients, which send neither header, are not affected; a page
 * proves it is not a simple request by sending JSON, `Authorization`, or `X-Requested-With`.
 *
 * @module
 */
import type { MiddlewareHandler } from "hono";
import { ProblemError } from "../problems.ts";

const UNSAFE = new Set(["POST", "PUT", "PATCH", "DELETE"]);
const SAFELISTED_TYPES = new Set([
  "",
  "text/plain",
  "application/x-www-form-urlencoded",
  "multipart/form-data",
]);

/** True when a browser could send this request cross-site without a preflight. */
export function isSimpleRequest(method: string, headers: Headers): boolean {
  if (!UNSAFE.has(method) && method !== "GET" && method !== "HEAD") return false;
  const ct = (headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  return SAFELISTED_TYPES.has(ct) && !headers.has("authorization") &&
    !headers.has("x-requested-with");
}

/** True when the request says it comes from a page of another origin. */
export function isCrossSite(url: string, headers: Headers): boolean {
  const site = (headers.get("sec-fetch-site") ?? "").toLowerCase();
  if (site === "cross-site" || site === "same-site") return true;
  const origin = headers.get("origin");
  if (origin === null) return false;
  return origin === "null" || origin.toLowerCase() !== new URL(url).origin.toLowerCase();
}

/** Refuse simple cross-site state-changing requests with a 403 problem. */
export function crossSiteGuard(): MiddlewareHandler {
  return async (c, next) => {
    const h = c.req.raw.headers;
    if (
      UNSAFE.has(c.req.method) && isSimpleRequest(c.req.method, h) && isCrossSite(c.req.url, h)
    ) {
      throw new ProblemError(
        "cross-site",
        `${c.req.method} ${c.req.path} from another site must not be a simple request: send ` +
          "a JSON body (Content-Type: application/json), an Authorization header, or " +
          "X-Requested-With",
      );
    }
    await next();
  };
}
