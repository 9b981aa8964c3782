/**
 * DNS-rebinding guard: answer only requests whose `Host` (the authority of the request URL)
 * is in the configured list. A page on an attacker's domain that re-points its name at
 * 127.0.0.1 reaches the service with its own name in `Host`, and is refused with 421
 * Misdirected Request (RFC 9110 §15.5.20) before any route runs.
 *
 * Entries are `host` (any port) or `host:port`, compared case-insensitively; `*` allows any.
 *
 * @module
 */
import type { MiddlewareHandler } from "hono";
import { ProblemError } from "../problems.ts";

/**
 * True when `authority` (`host[:port]`, IPv6 in brackets) matches an entry of `allowed`.
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { hostAllowed } from "./host_check.ts";
 * const list = ["localhost:8080", "127.0.0.1:8080", "[::1]:8080"];
 * assert.equal(hostAllowed("LOCALHOST:8080", list), true);
 * assert.equal(hostAllowed("localhost:8081", list), false);
 * assert.equal(hostAllowed("evil.example:8080", list), false);
 * assert.equal(hostAllowed("anything", ["*"]), true);
 * ```
 */
export function hostAllowed(authority: string, allowed: readonly string[]): boolean {
  if (allowed.includes("*")) return true;
  const a = authority.toLowerCase();
  const m = /^(\[[^\]]*\]|[^:]*)(?::(\d+))?$/.exec(a);
  if (!m) return false;
  const host = m[1];
  return allowed.some((e) => e === a || e === host);
}

/** Refuse requests for hosts not in `allowed` (see the module documentation). */
export function hostCheck(allowed: readonly string[]): MiddlewareHandler {
  return async (c, next) => {
    const authority = new URL(c.req.url).host;
    if (!hostAllowed(authority, allowed)) {
      throw new ProblemError(
        "misdirected",
        `This service does not answer for host "${authority.slice(0, 200)}"; ` +
          "its operator lists the names it serves in SUNLAG_ALLOWED_HOSTS",
      );
    }
    await next();
  };
}
