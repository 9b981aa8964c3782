/** Request ids made by the service when a request brings none (RFC 9562 UUIDv7). */
import assert from "node:assert/strict";
import { UUID } from "uuidv7";
import { requestIdFrom, requestUuidv7 } from "../../api/hot_gets.ts";

// RFC 9562 §5.7: 48-bit Unix time in ms, version 7, variant 10, the rest random.
Deno.test("requestUuidv7() is a UUIDv7 holding the time it was made", () => {
  const at = Date.UTC(2026, 11, 3, 12, 0, 0, 123);
  const id = requestUuidv7(at);
  assert.match(id, /^[0-9a-f]{8}-[0-9a-f]{4}-7[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
  const u = UUID.parse(id);
  assert.equal(u.getVariant(), "VAR_10");
  assert.equal(u.getVersion(), 7);
  const ms = u.bytes.slice(0, 6).reduce((t, b) => t * 256 + b, 0);
  assert.equal(ms, at);
  // 74 random bits: ids made in one millisecond differ
  const ids = new Set(Array.from({ length: 10_000 }, () => requestUuidv7(at)));
  assert.equal(ids.size, 10_000);
});

Deno.test("requestIdFrom() keeps a sane X-Request-Id and makes a UUIDv7 otherwise", () => {
  assert.equal(requestIdFrom("abc.DEF-1_2"), "abc.DEF-1_2");
  for (const bad of [null, undefined, "", "a b", "x".repeat(101), "é"]) {
    const id = requestIdFrom(bad);
    assert.match(id, /^[0-9a-f]{8}-[0-9a-f]{4}-7[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    const now = Date.now();
    const ms = UUID.parse(id).bytes.slice(0, 6).reduce((t, b) => t * 256 + b, 0);
    assert.ok(Math.abs(ms - now) < 5_000, `${id} holds ${ms}, now ${now}`);
  }
});
