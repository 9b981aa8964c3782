/**
 * Media-type guard: routes that take JSON answer 415 (RFC 9457 problem) for any other body type.
 *
 * @module
 */
import type { MiddlewareHandler } from "hono";
import { ProblemError } from "../problems.ts";

const JSON_TYPE = /^application\/([\w.-]+\+)?json$/i;

/** Require a JSON body (Content-Type application/json or +json). */
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
    await next();
  };
}
