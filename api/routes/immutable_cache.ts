/**
 * An in-process cache of rendered immutable representations (charts and JSON of succeeded
 * runs): least recently used entries are evicted beyond a byte budget. A representation is
 * cached only when it can never change (a succeeded run, a content-addressed series), so the
 * cache needs no invalidation; a hit answers without touching the store or re-rendering,
 * and a matching `If-None-Match` answers 304 straight from the cached tag. Clients that accept
 * gzip get a gzip-coded copy, compressed once on first demand and kept beside the identity
 * bytes (outside the byte budget, which counts identity bodies); it is a representation of its
 * own with its own strong tag (RFC 9110 §8.8.3).
 *
 * Written by hand: a Map in insertion order is an LRU in a dozen lines, and the registry's
 * LRU packages count entries rather than bytes.
 *
 * @module
 */
import type { Context } from "hono";
import { immutableHeaders } from "./cache.ts";

export interface CachedRepresentation {
  /** Strong entity tag, quoted. */
  etag: string;
  body: Uint8Array<ArrayBuffer>;
  /** Content-Type and any other headers of the representation (not the cache headers). */
  headers: Record<string, string>;
  /** The gzip-coded body, made on first demand. */
  gzip?: Promise<Uint8Array<ArrayBuffer>>;
  /** Series drawn into it: served from the cache only to callers who may see them all. */
  requires?: string[];
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
    if (v) {
      this.#map.delete(key);
      this.#map.set(key, v);
    }
    return v;
  }

  set(key: string, v: CachedRepresentation): void {
    if (v.body.byteLength > this.maxEntryBytes) return;
    const old = this.#map.get(key);
    if (old) {
      this.#bytes -= old.body.byteLength;
      this.#map.delete(key);
    }
    this.#map.set(key, v);
    this.#bytes += v.body.byteLength;
    for (const [k, e] of this.#map) {
      if (this.#bytes <= this.maxBytes) break;
      this.#map.delete(k);
      this.#bytes -= e.body.byteLength;
    }
  }
}

/**
 * True when `If-None-Match` lists `etag` (or `*`). If-None-Match uses the weak comparison
 * (RFC 9110 §13.1.2), so `W/"x"` (as a compressing proxy may rewrite a tag) matches `"x"`.
 */
export function matchesIfNoneMatch(c: Context, etag: string): boolean {
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
 */
export async function serveRepresentation(
  c: Context,
  r: CachedRepresentation,
  shared = true,
): Promise<Response> {
  const requestId = (c.get("requestId" as never) as string | undefined) ?? "";
  const gz = r.body.byteLength >= GZIP_MIN_BYTES && acceptsGzip(c.req.header("accept-encoding"));
  const etag = gz ? gzipTag(r.etag) : r.etag;
  const vary = [r.headers.Vary, r.body.byteLength >= GZIP_MIN_BYTES ? "Accept-Encoding" : ""]
    .filter(Boolean).join(", ");
  const common: Record<string, string> = {
    ...immutableHeaders(etag, shared),
    "X-Request-Id": requestId,
    ...(vary ? { Vary: vary } : {}),
  };
  if (matchesIfNoneMatch(c, etag)) return new Response(null, { status: 304, headers: common });
  if (!gz) return new Response(r.body, { status: 200, headers: { ...r.headers, ...common } });
  r.gzip ??= gzipBytes(r.body);
  return new Response(await r.gzip, {
    status: 200,
    headers: { ...r.headers, ...common, "Content-Encoding": "gzip" },
  });
}
