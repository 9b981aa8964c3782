/**
 * Function-level authorisation, in one table: which role each kind of request needs. Reads
 * (GET, HEAD, OPTIONS) need none here, because every read filters by visibility in the
 * store; replaying a run needs a reader (it recomputes, so it needs an account to charge);
 * every other state-changing request needs a writer; `/v1/admin/` needs an admin. An
 * anonymous caller gets 401 (with the way to authenticate), a caller whose role is too low
 * 403.
 *
 * @module
 */
import type { MiddlewareHandler } from "hono";
import type { Role } from "../store/types.ts";
import { ProblemError } from "../problems.ts";
import { principalOf } from "./authenticate.ts";
import { hasRole } from "./principal.ts";

const SAFE = new Set(["GET", "HEAD", "OPTIONS"]);

/** The role a request needs, or null when any caller may make it. */
export function requiredRole(method: string, path: string): Role | null {
  if (path === "/v1/admin" || path.startsWith("/v1/admin/")) return "admin";
  if (SAFE.has(method)) return null;
  if (method === "POST" && /^\/v1\/runs\/[^/]+\/replay$/.test(path)) return "reader";
  return "writer";
}

/** Refuse requests whose caller lacks the role {@link requiredRole} names. */
export function authorise(): MiddlewareHandler {
  return async (c, next) => {
    const need = requiredRole(c.req.method, c.req.path);
    if (need !== null) {
      const p = principalOf(c);
      if (p.role === null) {
        throw new ProblemError(
          "unauthorized",
          `${c.req.method} ${c.req.path} needs an API key: send "Authorization: Bearer <key>" ` +
            "(an admin of this instance makes keys)",
          {},
          { "WWW-Authenticate": 'Bearer realm="sunlag"' },
        );
      }
      if (!hasRole(p, need)) {
        throw new ProblemError(
          "forbidden",
          `${c.req.method} ${c.req.path} needs the ${need} role; this key has ${p.role}`,
        );
      }
    }
    await next();
  };
}
