/**
 * The fast path for GETs of cached immutable representations: a finished run's JSON, run and
 * series charts, a series as JSON or CSV, and their 304s. Requests that a route has already
 * answered from its in-process cache (api/routes/immutable_cache.ts) are answered here, ahead
 * of Hono's middleware chain and the zod validators, after the same checks the chain makes, in
 * the same order, with the same functions where it can: the `Host` check, the request-head
 * size, authentication (API keys and owners), the object-level access check in the store, the
 * request rate, the response headers of CORS and `Vary: Authorization`, the request id, the
 * metrics and the log line. Everything else (any check that would refuse, a cache miss, a
 * query string no route has validated before, a request with a body or an encoded one, a
 * path with percent-encodings or dot segments, a CORS preflight) goes to the Hono app
 * unchanged, before anything was counted or charged, so the app answers it exactly as it
 * always did.
 *
 * Query strings are validated once: a route that validated a query string on the full path
 * remembers its parsed value under the exact text (see {@link QueryMemo}), and the fast path
 * serves only query strings found there.
 *
 * Written by hand because it replaces, for these requests only, the chain Hono composes: a
 * profile of a cached chart under wrk spent more time in the middleware chain and the zod
 * validators than in the answer; measured side by side with the chain (test/bench/http_gets_ab.ts,
 * 5 rounds, 2 shared cores), 1.4–1.9 times the requests per second (the README's HTTP section).
 *
 * @module
 */
import type { Store } from "./store/types.ts";
import type { RequestView } from "./routes/cache.ts";
import { hostAllowed } from "./security/host_check.ts";
import { headBytesOf, MAX_HEAD_BYTES } from "./security/head_size.ts";
import { type CorsHeaders, corsSimpleHeaders } from "./security/cors.ts";
import { addAuthorizationVary, BEARER, principalForToken } from "./auth/authenticate.ts";
import { bucketKey } from "./limits/rate_limit.ts";
import { ANONYMOUS, isLimited, LOCAL_PRINCIPAL, type Principal } from "./auth/principal.ts";
import { requiredRole } from "./auth/authorise.ts";
import type { TokenBuckets } from "./limits/token_bucket.ts";
import { headResponse } from "./head_length.ts";

/** The request id of a request: the client's `X-Request-Id` when it is sane, else a UUIDv7. */
export function requestIdFrom(incoming: string | null | undefined): string {
  return incoming && /^[\w.-]{1,100}$/.test(incoming) ? incoming : requestUuidv7();
}

/**
 * A UUIDv7 (RFC 9562 §5.7) for a request id: the Unix time in milliseconds in the first 48
 * bits, then version 7, and the remaining bits of a native random UUIDv4 (`crypto.randomUUID`:
 * its random bits and the RFC 9562 variant). Written by hand because npm `uuidv7` took 0.98 µs
 * per id and this takes about 0.2 µs (deno bench, test/bench/request_id_bench.ts), on every
 * request that brings no id of its own. Ids made within one millisecond are not ordered among
 * themselves, which RFC 9562 §6.2 leaves optional and a request id does not need; run ids, whose
 * order the run list uses, keep the library's monotonic generator.
 *
 * @example
 * ```ts
 * import { requestUuidv7 } from "./hot_gets.ts";
 * const id = requestUuidv7();
 * console.assert(/^[0-9a-f]{8}-[0-9a-f]{4}-7[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/.test(id));
 * ```
 */
export function requestUuidv7(now = Date.now()): string {
  if (now !== prefixMs) {
    const ms = now.toString(16).padStart(12, "0");
    prefix = `${ms.slice(0, 8)}-${ms.slice(8, 12)}-7`;
    prefixMs = now;
  }
  return prefix + crypto.randomUUID().slice(15);
}
/** The time part of the last request id, and its millisecond. */
let prefix = "", prefixMs = -1;

/**
 * `f(x)`: at once when `x` is a value, once it resolves when it is a promise. The fast path's
 * steps answer at once where they can (a cached response, an embedded store), as each promise
 * and `await` costs a turn of the microtask queue.
 */
export function whenReady<T, U>(x: T | Promise<T>, f: (v: T) => U): U | Promise<Awaited<U>> {
  return x instanceof Promise ? x.then(f) as Promise<Awaited<U>> : f(x);
}

/** What a hot handler gets: the request's headers, the caller, path parameters, query. */
export interface HotRequest {
  /** Headers, the validated query's members, and the request id. */
  view: RequestView;
  principal: Principal;
  /** The path parameters, in the order of the pattern's `:name` segments. */
  params: string[];
  /** The query string as sent, with its `?` ("" when none). */
  search: string;
}

/**
 * Answers a request from a cache, or null when it cannot (the full path then answers). It
 * must have no effect on what it returns null for.
 */
export type HotHandler = (r: HotRequest) => Promise<Response | null> | Response | null;

/**
 * Parsed query strings of one route, by their exact text, as the route's validator accepted
 * them on the full path. Bounded: the table starts again when it is full.
 */
export class QueryMemo<T> {
  readonly #map = new Map<string, T>();
  constructor(readonly maxEntries = 512) {}

  /** Remember the parsed query of the request URL `url`. */
  remember(url: string, value: T): void {
    const search = searchOf(url);
    if (this.#map.has(search)) return;
    if (this.#map.size >= this.maxEntries) this.#map.clear();
    this.#map.set(search, value);
  }

  get(search: string): T | undefined {
    return this.#map.get(search);
  }
}

/** The query string of a URL, with its `?` ("" when none). */
export function searchOf(url: string): string {
  const q = url.indexOf("?");
  return q < 0 ? "" : url.slice(q);
}

interface Route {
  segments: (string | null)[];
  handler: HotHandler;
}

/** The hot handlers, by path pattern (`/v1/runs/:id/chart.svg`). */
export class HotGets {
  readonly #routes: Route[] = [];
  /** Requests answered here (for tests and benchmarks). */
  served = 0;

  add(pattern: string, handler: HotHandler): void {
    const segments = pattern.split("/").map((s) => s.startsWith(":") ? null : s);
    this.#routes.push({ segments, handler });
    this.#servable.clear();
  }

  /** {@link servable}'s answers for paths asked lately (bounded: starts again when full). */
  readonly #servable = new Map<string, { handler: HotHandler; params: string[] } | null>();

  /**
   * The handler and parameters for `path` when the fast path may serve it: it matches, needs no
   * decoding (no percent-encoding, no dot segment) and no role (not under /v1/admin); else null.
   */
  servable(path: string): { handler: HotHandler; params: string[] } | null {
    let m = this.#servable.get(path);
    if (m === undefined) {
      m = PLAIN.test(path) && !path.includes("/.") && requiredRole("GET", path) === null
        ? this.match(path)
        : null;
      if (this.#servable.size >= 1024) this.#servable.clear();
      this.#servable.set(path, m);
    }
    return m;
  }

  /** The handler and parameters for `path`, or null. */
  match(path: string): { handler: HotHandler; params: string[] } | null {
    const parts = path.split("/");
    outer: for (const r of this.#routes) {
      if (r.segments.length !== parts.length) continue;
      const params: string[] = [];
      for (let i = 0; i < parts.length; i++) {
        const s = r.segments[i];
        if (s === null) {
          if (parts[i] === "") continue outer;
          params.push(parts[i]);
        } else if (s !== parts[i]) continue outer;
      }
      return { handler: r.handler, params };
    }
    return null;
  }
}

/** What the fast path shares with the app's middleware. */
export interface HotPathDeps {
  hot: HotGets;
  store: Store;
  adminKey: string | null;
  allowedHosts: readonly string[];
  corsOrigins: readonly string[];
  buckets: TokenBuckets;
  /** Called once per answered request, as the request-id middleware does. */
  finish(method: string, path: string, status: number, t0: number, id: string): void;
}

/** Characters a path or query may have to be served here (no percent-encoding, no `#`). */
const PLAIN = /^[\w\-.~:/=&,+]*$/;

type Fetch = (req: Request, info?: unknown) => Response | Promise<Response>;

/**
 * `fetch` with the fast path ahead of `full` (the Hono app's fetch): see the module
 * documentation.
 */
export function withHotGets(deps: HotPathDeps, full: Fetch): Fetch {
  const hosts = new Map<string, boolean>();
  const hostOk = (origin: string) => {
    let ok = hosts.get(origin);
    if (ok === undefined) {
      if (hosts.size >= 64) hosts.clear();
      hosts.set(origin, ok = hostAllowed(new URL(origin + "/").host, deps.allowedHosts));
    }
    return ok;
  };

  function hot(req: Request, info: unknown, method: string): Response | Promise<Response> {
    const t0 = performance.now();
    const url = req.url;
    // the path as Hono's router sees it (hono/utils/url getPath), when it needs no decoding
    const start = url.indexOf("/", url.indexOf(":") + 4);
    const q = url.indexOf("?", start);
    const path = q < 0 ? url.slice(start) : url.slice(start, q);
    const search = q < 0 ? "" : url.slice(q);
    const m = deps.hot.servable(path);
    if (!m || !PLAIN.test(search.slice(1)) || !hostOk(url.slice(0, start))) {
      return full(req, info);
    }
    // the head's size and the headers read below, in one pass over them
    const head: HeadValues = {};
    let body = false;
    const size = headBytesOf(method, path.length + search.length, req.headers, (k, v) => {
      if (k === "content-length" || k === "transfer-encoding" || k === "content-encoding") {
        body = true;
      } else if (READ.has(k)) head[k as keyof HeadValues] = v;
    });
    // a body, or an encoded one, is for the body-limit and content-coding middleware
    if (body || size > MAX_HEAD_BYTES) return full(req, info);
    const at: Answering = { req, info, method, t0, path, search, match: m, head };
    const auth = head.authorization ?? null;
    if (auth === null) {
      return answer(at, deps.adminKey === null ? LOCAL_PRINCIPAL : ANONYMOUS);
    }
    const k = BEARER.exec(auth);
    if (!k) return full(req, info);
    return principalForToken(deps.store, deps.adminKey, k[1]).then(
      (principal) => answer(at, principal),
      () => full(req, info),
    );
  }

  /** The cached answer to an authenticated request, or the full path's. */
  function answer(at: Answering, principal: Principal): Response | Promise<Response> {
    const { head, req } = at;
    const id = requestIdFrom(head["x-request-id"]);
    const view: RequestView = {
      req: {
        header: (name) => {
          const k = name.toLowerCase();
          return READ.has(k) ? head[k as keyof HeadValues] : req.headers.get(name) ?? undefined;
        },
        query: () => undefined,
      },
      get: () => id,
    };
    let res: Response | null | Promise<Response | null>;
    try {
      res = at.match.handler({ view, principal, params: at.match.params, search: at.search });
    } catch {
      return full(at.req, at.info); // the store failed: the full path answers with its problem
    }
    if (res instanceof Promise) {
      return res.then((r) => send(at, principal, id, r), () => full(at.req, at.info));
    }
    return send(at, principal, id, res);
  }

  /** Send `res` after the rate limit, with the middleware's headers; counted and logged. */
  function send(
    at: Answering,
    principal: Principal,
    id: string,
    res: Response | null,
  ): Response | Promise<Response> {
    const { req, info, method, path, t0 } = at;
    if (!res) return full(req, info);
    if (isLimited(principal)) {
      // refused: the full path takes (and refuses) the token again and answers 429
      if (!deps.buckets.take(bucketKey(principal, info)).ok) return full(req, info);
    }
    const cors = deps.corsOrigins.length
      ? corsSimpleHeaders(deps.corsOrigins, at.head.origin ?? "")
      : null;
    if (deps.adminKey !== null || cors) res = decorate(res, cors, deps.adminKey !== null);
    const done = (r: Response) => {
      deps.finish(method, path, r.status, t0, id);
      deps.hot.served++;
      return r;
    };
    return method === "HEAD" ? headResponse(res).then(done) : done(res);
  }

  return (req, info) => {
    const method = req.method;
    if (method !== "GET" && method !== "HEAD") return full(req, info);
    return hot(req, info, method);
  };
}

/** The request headers the fast path and its handlers read, by lower-case name. */
interface HeadValues {
  authorization?: string;
  "x-request-id"?: string;
  "if-none-match"?: string;
  "accept-encoding"?: string;
  accept?: string;
  origin?: string;
}
const READ = new Set<string>([
  "authorization",
  "x-request-id",
  "if-none-match",
  "accept-encoding",
  "accept",
  "origin",
]);

/** A request on its way through the fast path. */
interface Answering {
  req: Request;
  info: unknown;
  method: string;
  /** performance.now() when it came in */
  t0: number;
  path: string;
  search: string;
  match: { handler: HotHandler; params: string[] };
  /** The headers read, from the one pass over them (combined as `Headers.get` combines them). */
  head: HeadValues;
}

/** The headers the CORS and authentication middleware add to a response, in their order. */
function decorate(res: Response, cors: CorsHeaders | null, keys: boolean): Response {
  const h = res.headers;
  if (cors) { for (const [k, v] of cors.before) h.set(k, v); }
  if (keys) addAuthorizationVary(h);
  if (cors?.varyOrigin) h.append("Vary", "Origin");
  return res;
}
