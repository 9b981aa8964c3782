/**
 * An in-process cache of rendered immutable representations (charts and JSON of succeeded
 * runs): least recently used entries are evicted beyond a byte budget. A representation is
 * cached only when it can never change (a succeeded run, a content-addressed series), so the
 * cache needs no invalidation; a hit answers without touching the store or re-rendering,
 * and a matching `If-None-Match` answers 304 straight from the cached tag.
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

/** True when `If-None-Match` lists `etag` (or `*`), RFC 9110 §13.1.2 (strong comparison). */
export function matchesIfNoneMatch(c: Context, etag: string): boolean {
  const inm = c.req.header("if-none-match");
  if (!inm) return false;
  return inm.split(",").some((t) => {
    const s = t.trim();
    return s === "*" || s === etag;
  });
}

/** The response for a cached representation: 304 when the client has it, else 200. */
export function serveRepresentation(c: Context, r: CachedRepresentation): Response {
  const requestId = (c.get("requestId" as never) as string | undefined) ?? "";
  if (matchesIfNoneMatch(c, r.etag)) {
    return new Response(null, {
      status: 304,
      headers: { ...immutableHeaders(r.etag), "X-Request-Id": requestId },
    });
  }
  return new Response(r.body, {
    status: 200,
    headers: { ...r.headers, ...immutableHeaders(r.etag), "X-Request-Id": requestId },
  });
}
