/**
 * Media-type guard: routes that take JSON answer 415 (RFC 9457 problem) for any other body type.
 *
 * @module
 */
import type { MiddlewareHandler } from "hono";
import { ProblemError } from "../problems.ts";

const JSON_TYPE = /^application\/([\w.-]+\+)?json$/i;

/**
 * Require a JSON body (Content-Type application/json or +json), and parse it once: Hono caches
 * a body's text but parses it again on every `c.req.json()`, so the validator and a handler
 * that reads the raw body (to name unknown fields) would parse it twice (2.9 s each for a
 * 36 MB body on this machine).
 */
export function requireJson(): MiddlewareHandler {
  return async (c, next) => {
    const ct = (c.req.header("content-type") ?? "").split(";")[0].trim();
    if (!JSON_TYPE.test(ct)) {
      throw new ProblemError(
        "unsupported-media-type",
        `This endpoint takes application/json; the request said "${ct || "(no Content-Type)"}"`,
        {},
        { Accept: "application/json" },
      );
    }
    const parse = c.req.json.bind(c.req);
    let parsed: Promise<unknown> | undefined;
    c.req.json = (() => (parsed ??= parse())) as typeof c.req.json;
    await next();
  };
}
