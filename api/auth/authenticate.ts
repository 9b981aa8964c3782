/**
 * Authentication middleware: turns `Authorization: Bearer <key>` into the request's
 * {@link Principal}. The key is the configured admin key (`SUNLAG_ADMIN_KEY`, the built-in
 * local owner as admin) or a stored API key (`sk_<id>_<secret>`: its record is found by id,
 * the secret checked against the stored hash in constant time, revoked and expired keys
 * refused). Without the header, the caller is the local owner when the instance requires no
 * keys (the single-user tool on loopback), else anonymous. A malformed or unknown key is a 401
 * problem with `WWW-Authenticate: Bearer` (RFC 6750 §3).
 *
 * @module
 */
import type { MiddlewareHandler } from "hono";
import type { Store } from "../store/types.ts";
import { ProblemError } from "../problems.ts";
import { parseApiKey, secretMatches, secretsEqual } from "./keys.ts";
import { ANONYMOUS, LOCAL_PRINCIPAL, narrower, type Principal } from "./principal.ts";

function refused(detail: string, error: "invalid_request" | "invalid_token"): ProblemError {
  return new ProblemError("unauthorized", detail, {}, {
    "WWW-Authenticate": `Bearer realm="sunlag", error="${error}"`,
  });
}

/** Resolve a presented bearer token to a principal, or throw a 401 problem. */
export async function principalForToken(
  store: Store,
  adminKey: string | null,
  token: string,
  now: Date = new Date(),
): Promise<Principal> {
  if (adminKey !== null && secretsEqual(token, adminKey)) {
    return { ...LOCAL_PRINCIPAL, via: "admin-key" };
  }
  const parsed = parseApiKey(token);
  if (!parsed) {
    throw refused("The bearer token is not a sunlag API key (sk_<id>_<secret>)", "invalid_token");
  }
  const rec = await store.getApiKey(parsed.id);
  // The same answer whether the id is unknown or the secret wrong.
  if (!rec || !secretMatches(parsed.secret, rec.hash)) {
    throw refused("The API key is not valid", "invalid_token");
  }
  if (rec.revoked_at !== null) throw refused("The API key was revoked", "invalid_token");
  if (rec.expires_at !== null && Date.parse(rec.expires_at) <= now.getTime()) {
    throw refused(`The API key expired at ${rec.expires_at}`, "invalid_token");
  }
  const owner = await store.getOwner(rec.owner);
  if (!owner) throw refused("The API key is not valid", "invalid_token");
  return {
    owner: owner.id,
    group: owner.group,
    role: narrower(owner.role, rec.role),
    via: "api-key",
    keyId: rec.id,
  };
}

/** An `Authorization` header with a bearer token; the token is the first group. */
export const BEARER = /^Bearer +([\x21-\x7e]{1,512})\s*$/i;

/** Set `principal` on every request (see the module documentation). */
export function authenticate(deps: { store: Store; adminKey: string | null }): MiddlewareHandler {
  return async (c, next) => {
    const header = c.req.header("authorization");
    let p: Principal;
    if (header === undefined) {
      p = deps.adminKey === null ? LOCAL_PRINCIPAL : ANONYMOUS;
    } else {
      const m = BEARER.exec(header);
      if (!m) {
        throw refused('The Authorization header must be "Bearer <API key>"', "invalid_request");
      }
      p = await principalForToken(deps.store, deps.adminKey, m[1]);
    }
    c.set("principal" as never, p as never);
    await next();
    // What a caller may see depends on its key: a browser that changes keys must not answer
    // the new one from what it kept for the old (RFC 9110 §12.5.5).
    if (deps.adminKey !== null) {
      try {
        addAuthorizationVary(c.res.headers);
      } catch {
        // a response with immutable headers (none of the service's own)
      }
    }
  };
}

/** Add `Authorization` to the `Vary` of response headers `h` unless it is there. */
export function addAuthorizationVary(h: Headers): void {
  const vary = h.get("vary");
  if (!vary || !/\bauthorization\b/i.test(vary)) {
    h.set("Vary", vary ? `${vary}, Authorization` : "Authorization");
  }
}

/** The principal of a request; anonymous when no middleware set one (fails closed). */
export function principalOf(c: { get(key: never): unknown }): Principal {
  return (c.get("principal" as never) as Principal | undefined) ?? ANONYMOUS;
}
