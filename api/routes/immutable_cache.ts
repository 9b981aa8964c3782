/**
 * An in-process cache of rendered immutable representations (charts and JSON of succeeded
 * runs): least recently used entries are evicted beyond a byte budget. A representation is
 * cached only when it can never change (a succeeded run, a content-addressed series), so the
 * cache needs no invalidation; a hit answers without touching the store or re-rendering,
 * and a matching `If-None-Match` answers 304 straight from the cached tag. Clients that accept
 * gzip get a gzip-coded copy, compressed once on first demand and kept beside the identity
 * bytes (the byte budget counts both); it is a representation of its own with its own strong
 * tag (RFC 9110 §8.8.3).
 *
 * Written by hand: a Map in insertion order is an LRU in a dozen lines, and the registry's
 * LRU packages count entries rather than bytes.
 *
 * @module
 */
import { immutableHeaders, notModified, PRIVATE_IMMUTABLE, type RequestView } from "./cache.ts";
import type { HoldingRef, Store } from "../store/types.ts";
import { holdingsNowOf, sharedCacheable } from "../auth/access.ts";
import { type Principal, viewerOf } from "../auth/principal.ts";
import { whenReady } from "../hot_gets.ts";

export interface CachedRepresentation {
  /** Strong entity tag, quoted. */
  etag: string;
  body: Uint8Array<ArrayBuffer>;
  /** Content-Type and any other headers of the representation (not the cache headers). */
  headers: Record<string, string>;
  /** The gzip-coded body, made on first demand. */
  gzip?: Promise<Uint8Array<ArrayBuffer>>;
  /**
   * Told the size of each copy of the body made beside it (the gzip-coded body, the bodies of
   * ready responses) once it is made (set by the cache holding it).
   */
  onExtraBytes?: (bytes: number) => void;
  /**
   * Series drawn into it, as the items of one access check (`holdingsOf`): served from the
   * cache only to callers who may see them all.
   */
  requires?: HoldingRef[];
  /** A ready response of each variant, made on first use (see `serveRepresentation`). */
  ready?: (Response | undefined)[];
  /**
   * Served only as it is: never gzip-coded, and without `Vary: Accept-Encoding` (for
   * representations whose routes have always answered that way).
   */
  identityOnly?: boolean;
}

/** Bodies smaller than this are sent as they are. */
const GZIP_MIN_BYTES = 1024;

async function gzipBytes(b: Uint8Array<ArrayBuffer>): Promise<Uint8Array<ArrayBuffer>> {
  const stream = new Blob([b]).stream().pipeThrough(new CompressionStream("gzip"));
  return new Uint8Array(await new Response(stream).arrayBuffer());
}

/** True when `Accept-Encoding` allows gzip (RFC 9110 §12.5.3: a q of 0 refuses it). */
export function acceptsGzip(header: string | undefined): boolean {
  if (!header) return false;
  let star: boolean | null = null;
  for (const part of header.split(",")) {
    const [name, ...params] = part.trim().toLowerCase().split(";");
    const q = params.map((x) => x.trim()).find((x) => x.startsWith("q="));
    const ok = q === undefined || Number(q.slice(2)) > 0;
    if (name.trim() === "gzip" || name.trim() === "x-gzip") return ok;
    if (name.trim() === "*") star = ok;
  }
  return star ?? false;
}

/** The strong tag of the gzip-coded variant. */
export function gzipTag(etag: string): string {
  return etag.endsWith('"') ? `${etag.slice(0, -1)}-gzip"` : `${etag}-gzip`;
}

export class ImmutableCache {
  readonly #map = new Map<string, CachedRepresentation>();
  /** Bytes each entry holds: its identity body, plus its gzip-coded body once made. */
  readonly #sizes = new Map<string, number>();
  #bytes = 0;

  /**
   * @param maxBytes total body bytes kept @default 64 MiB
   * @param maxEntryBytes larger bodies are not cached @default 8 MiB
   */
  constructor(readonly maxBytes = 64 * 1024 * 1024, readonly maxEntryBytes = 8 * 1024 * 1024) {}

  get size(): number {
    return this.#map.size;
  }

  get bytes(): number {
    return this.#bytes;
  }

  get(key: string): CachedRepresentation | undefined {
    const v = this.#map.get(key);
    // most recently used last (a Map keeps insertion order); already there when asked again
    if (v && key !== this.#newest) {
      this.#map.delete(key);
      this.#map.set(key, v);
      this.#newest = key;
    }
    return v;
  }

  /** The key last moved to the end of the map (most recently used), if it still is. */
  #newest: string | null = null;

  set(key: string, v: CachedRepresentation): void {
    if (v.body.byteLength > this.maxEntryBytes) return;
    this.#drop(key);
    this.#map.set(key, v);
    this.#newest = key;
    this.#sizes.set(key, v.body.byteLength);
    this.#bytes += v.body.byteLength;
    v.onExtraBytes = (n) => {
      // counted only while this very entry is cached
      if (this.#map.get(key) !== v) return;
      this.#sizes.set(key, this.#sizes.get(key)! + n);
      this.#bytes += n;
      this.#evict();
    };
    this.#evict();
  }

  #drop(key: string): void {
    if (!this.#map.has(key)) return;
    if (key === this.#newest) this.#newest = null;
    this.#bytes -= this.#sizes.get(key)!;
    this.#map.delete(key);
    this.#sizes.delete(key);
  }

  /** Evict least recently used entries until the budget holds. */
  #evict(): void {
    for (const k of this.#map.keys()) {
      if (this.#bytes <= this.maxBytes) break;
      this.#drop(k);
    }
  }
}

/**
 * True when `If-None-Match` lists `etag` (or `*`). If-None-Match uses the weak comparison
 * (RFC 9110 §13.1.2), so `W/"x"` (as a compressing proxy may rewrite a tag) matches `"x"`.
 */
export function matchesIfNoneMatch(c: RequestView, etag: string): boolean {
  const inm = c.req.header("if-none-match");
  if (!inm) return false;
  return inm.split(",").some((t) => {
    const s = t.trim().replace(/^W\//, "");
    return s === "*" || s === etag;
  });
}

/**
 * The response for a cached representation: 304 when the client has it, else 200, gzip-coded
 * when the client accepts it and the body is worth compressing. `shared: false` (an item not
 * public) keeps it out of shared caches.
 *
 * Each variant (gzip-coded or not, 304 or 200) is made into a response once and kept; a
 * request gets a clone of it with its own request id (and `Cache-Control` when not shared).
 * Deno copies the bytes a new `Response` is made of, while a clone shares them: measured with
 * a 169 kB body, 124–297 µs per new response against 2.4–6.0 µs per clone and two header
 * changes (20,000 of each, load 6). The copies are counted in the cache's byte budget.
 */
export function serveRepresentation(
  c: RequestView,
  r: CachedRepresentation,
  shared = true,
): Response | Promise<Response> {
  // at once when the variant asked for is made already (from its second request on): the fast
  // path (api/hot_gets.ts) then answers without a promise
  const gz = compressible(r) && acceptsGzip(c.req.header("accept-encoding"));
  const notModified = matchesIfNoneMatch(c, gz ? gzipTag(r.etag) : r.etag);
  const ready = r.ready?.[(gz ? 2 : 0) | (notModified ? 1 : 0)];
  return ready ? cloneFor(c, ready, shared) : makeVariant(c, r, shared, gz, notModified);
}

/** A clone of a made variant with the request's id (and `Cache-Control` when not shared). */
function cloneFor(c: RequestView, ready: Response, shared: boolean): Response {
  const res = ready.clone();
  if (!shared) res.headers.set("Cache-Control", PRIVATE_IMMUTABLE);
  res.headers.set("X-Request-Id", c.get("requestId") ?? "");
  return res;
}

/** Make the variant of `r` the request asks for, keep it, and answer with a clone of it. */
async function makeVariant(
  c: RequestView,
  r: CachedRepresentation,
  shared: boolean,
  gz: boolean,
  notModified: boolean,
): Promise<Response> {
  const i = (gz ? 2 : 0) | (notModified ? 1 : 0);
  let body: Uint8Array<ArrayBuffer> | null = null;
  if (!notModified) {
    if (gz && !r.gzip) {
      r.gzip = gzipBytes(r.body);
      r.gzip.then((g) => r.onExtraBytes?.(g.byteLength), () => {});
    }
    body = gz ? await r.gzip! : r.body;
  }
  // made while another request awaited the same gzip: keep the first
  let ready = r.ready?.[i];
  if (!ready) {
    ready = new Response(body, {
      status: notModified ? 304 : 200,
      headers: headersOf(r, gz, notModified),
    });
    (r.ready ??= [])[i] = ready;
    if (body) r.onExtraBytes?.(body.byteLength);
  }
  return cloneFor(c, ready, shared);
}

/** True when a gzip-coded variant of `r` is offered. */
function compressible(r: CachedRepresentation): boolean {
  return !r.identityOnly && r.body.byteLength >= GZIP_MIN_BYTES;
}

/**
 * A representation served only as it is (see `identityOnly`): `text` as UTF-8, or bytes.
 * `headers` are those of the representation (Content-Type and the like), not the cache headers.
 */
export function identityRepresentation(
  etag: string,
  content: string | Uint8Array<ArrayBuffer>,
  headers: Record<string, string>,
): CachedRepresentation {
  const body = typeof content === "string" ? new TextEncoder().encode(content) : content;
  return { etag, body, headers, identityOnly: true };
}

/**
 * A cached representation as routes that check `If-None-Match` with `notModified` first
 * answer it: their 304 (cache headers and request id only), else the stored bytes.
 */
export function serveStored(
  c: RequestView,
  r: CachedRepresentation,
  shared: boolean,
): Response | Promise<Response> {
  return notModified(c, r.etag, shared) ?? serveRepresentation(c, r, shared);
}

/**
 * The headers of one variant of a representation (gzip-coded or not, 304 or 200) as a shared
 * cache may keep it, with an empty `X-Request-Id` in its place.
 */
function headersOf(
  r: CachedRepresentation,
  gz: boolean,
  notModified: boolean,
): Record<string, string> {
  const vary = [r.headers.Vary, compressible(r) ? "Accept-Encoding" : ""]
    .filter(Boolean).join(", ");
  const common: Record<string, string> = {
    ...immutableHeaders(gz ? gzipTag(r.etag) : r.etag, true),
    "X-Request-Id": "",
    ...(vary ? { Vary: vary } : {}),
  };
  return notModified
    ? common
    : { ...r.headers, ...common, ...(gz ? { "Content-Encoding": "gzip" } : {}) };
}

/**
 * A fast-path answer (api/hot_gets.ts) with cached representation `r`, when the caller sees
 * every item in `items` (the first one's holding decides whether shared caches may keep it);
 * null when it does not, so that the full path answers. At once where the store answers at once.
 * `serve` answers with `r` ({@link serveStored} for the routes that answer 304 as `notModified`).
 */
export function serveCachedIfSeen(
  store: Store,
  items: readonly HoldingRef[],
  principal: Principal,
  view: RequestView,
  r: CachedRepresentation,
  serve: typeof serveStored = serveRepresentation,
): Response | null | Promise<Response | null> {
  return whenReady(holdingsNowOf(store, items, viewerOf(principal)), (held) => {
    if (held.some((h) => !h)) return null;
    return serve(view, r, sharedCacheable(principal, held[0]!));
  });
}
