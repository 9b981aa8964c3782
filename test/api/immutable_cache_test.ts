/**
 * The in-process cache of immutable representations keeps its byte budget, counting the
 * gzip-coded copies made on demand, and serves the gzip copy it counted.
 */
import assert from "node:assert/strict";
import { Hono } from "hono";
import { gunzipSync } from "node:zlib";
import {
  type CachedRepresentation,
  ImmutableCache,
  serveRepresentation,
} from "../../api/routes/immutable_cache.ts";

Deno.test("ImmutableCache keeps its byte budget and refuses entries above the entry limit", () => {
  const cache = new ImmutableCache(1000, 400);
  const rep = (n: number) => ({ etag: `"${n}"`, body: new Uint8Array(n), headers: {} });
  for (let i = 0; i < 20; i++) {
    cache.set(`k${i}`, rep(150 + i));
    assert.ok(cache.bytes <= 1000, `after ${i + 1} entries: ${cache.bytes} bytes`);
  }
  assert.ok(cache.get("k19"), "the newest entry is kept");
  assert.equal(cache.get("k0"), undefined, "the oldest entry was evicted");
  const before = cache.bytes;
  cache.set("big", rep(401));
  assert.equal(cache.get("big"), undefined);
  assert.equal(cache.bytes, before);
  cache.set("k19", rep(10));
  assert.equal(cache.bytes, before - 169 + 10, "replacing an entry counts its new size");
});

Deno.test("ImmutableCache counts a gzip-coded copy in its budget once it is made", async () => {
  const cache = new ImmutableCache(10_000, 8_000);
  const text = "0123456789,".repeat(400); // 4,400 bytes, compresses well
  const rep: CachedRepresentation = {
    etag: '"a"',
    body: new TextEncoder().encode(text) as Uint8Array<ArrayBuffer>,
    headers: { "Content-Type": "text/csv" },
  };
  cache.set("a", rep);
  assert.equal(cache.bytes, 4400);
  const app = new Hono();
  app.get("/", (c) => serveRepresentation(c, cache.get("a")!));
  const res = await app.request("/", { headers: { "Accept-Encoding": "gzip" } });
  assert.equal(res.headers.get("content-encoding"), "gzip");
  assert.equal(res.headers.get("etag"), '"a-gzip"');
  const gz = new Uint8Array(await res.arrayBuffer());
  assert.equal(gunzipSync(gz).toString(), text);
  assert.equal(
    cache.bytes,
    4400 + 2 * gz.byteLength,
    "the gzip copy and the ready response made of it are counted",
  );
  await (await app.request("/")).arrayBuffer();
  assert.equal(cache.bytes, 2 * 4400 + 2 * gz.byteLength, "the identity ready response too");
  // a second entry that overflows the budget evicts the first with its gzip copy
  cache.set("b", { etag: '"b"', body: new Uint8Array(6000), headers: {} });
  assert.equal(cache.get("a"), undefined);
  assert.equal(cache.bytes, 6000);
  // a gzip copy made for an entry no longer cached is not counted
  rep.onExtraBytes?.(100);
  assert.equal(cache.bytes, 6000);
});
