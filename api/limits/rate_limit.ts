/**
 * Request-rate middleware: one token per request from the caller's bucket (its owner, or its
 * client address when anonymous); an empty bucket is a 429 problem with `Retry-After`.
 * Admins, and so the single-user tool, are not limited.
 *
 * @module
 */
import type { Context, MiddlewareHandler } from "hono";
import { ProblemError } from "../problems.ts";
import { principalOf } from "../auth/authenticate.ts";
import { isLimited, type Principal } from "../auth/principal.ts";
import type { TokenBuckets } from "./token_bucket.ts";

/** The client's address under `Deno.serve` (its handler info is Hono's `c.env`). */
export function clientAddress(c: Context): string {
  return addressOf(c.env);
}

/** The client's address in `Deno.serve`'s handler info, or "unknown". */
export function addressOf(info: unknown): string {
  return (info as { remoteAddr?: { hostname?: string } } | undefined)?.remoteAddr?.hostname ??
    "unknown";
}

/** The bucket of a caller: its owner's, or its address's when anonymous. */
export function bucketKey(p: Principal, info: unknown): string {
  return p.owner !== null ? `owner:${p.owner}` : `addr:${addressOf(info)}`;
}

/** Limit each caller to the buckets' rate (see the module documentation). */
export function rateLimit(buckets: TokenBuckets): MiddlewareHandler {
  return async (c, next) => {
    const p = principalOf(c);
    if (isLimited(p) && c.req.method !== "OPTIONS") {
      const t = buckets.take(bucketKey(p, c.env));
      if (!t.ok) {
        throw new ProblemError(
          "rate-limited",
          `Too many requests: ${buckets.rate} per second with bursts of ${buckets.burst} ` +
            "(SUNLAG_RATE_PER_SECOND, SUNLAG_RATE_BURST); try again after Retry-After seconds",
          { retry_after_seconds: t.retryAfterSeconds },
          { "Retry-After": String(t.retryAfterSeconds) },
        );
      }
    }
    await next();
  };
}
