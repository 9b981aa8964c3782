/**
 * HTTP caching for immutable resources (content-addressed series, finished runs, their
 * charts): strong ETags, `Cache-Control: public, max-age=31536000, immutable` and 304 on
 * `If-None-Match` (RFC 9110 §13.1.2, RFC 8246).
 *
 * @module
 */
import type { Context } from "hono";

/**
 * What the caching helpers read of a request: its headers and its request id. A Hono
 * `Context` is one; the fast path for cached GETs (api/hot_gets.ts) makes a lighter one.
 */
export interface RequestView {
  req: {
    header(name: string): string | undefined;
    query(name: string): string | undefined;
  };
  get(key: "requestId"): string | undefined;
}

/**
 * `view` with the query members of `query` (the fast path's view has none): a query string
 * a route validated before, as it parsed it.
 */
export function withQuery(
  view: RequestView,
  query: Record<string, string | undefined>,
): RequestView {
  return { ...view, req: { ...view.req, query: (name) => query[name] } };
}

/**
 * Cache-Control of an immutable representation that only some callers may see (a private or
 * group item): browsers keep it, shared caches do not (RFC 9111 §5.2.2.7).
 */
export const PRIVATE_IMMUTABLE = "private, max-age=31536000, immutable";

/** Headers for an immutable representation; `shared: false` keeps it out of shared caches. */
export function immutableHeaders(etag: string, shared = true): Record<string, string> {
  return {
    ETag: etag,
    "Cache-Control": shared ? "public, max-age=31536000, immutable" : PRIVATE_IMMUTABLE,
  };
}

/** A 304 response when `If-None-Match` matches `etag`, else null. */
export function notModified(c: RequestView, etag: string, shared = true): Response | null {
  const inm = c.req.header("if-none-match");
  if (!inm) return null;
  // If-None-Match uses the weak comparison (RFC 9110 §13.1.2): W/"x" matches "x".
  const tags = inm.split(",").map((t) => t.trim().replace(/^W\//, ""));
  if (tags.includes("*") || tags.includes(etag)) {
    return new Response(null, {
      status: 304,
      headers: {
        ...immutableHeaders(etag, shared),
        "X-Request-Id": c.get("requestId") ?? "",
      },
    });
  }
  return null;
}

/** Set the headers of {@link immutableHeaders} on the response being built. */
export function setImmutableHeaders(c: Context, etag: string, shared = true): void {
  for (const [k, v] of Object.entries(immutableHeaders(etag, shared))) c.header(k, v);
}
