import assert from "node:assert/strict";
import { randomStream } from "../../../core/random/mod.ts";

Deno.test("randomStream() is reproducible and normal() has unit variance", () => {
  const a = randomStream(123, 5);
  const b = randomStream(123, 5);
  for (let i = 0; i < 10; i++) assert.equal(a.normal(), b.normal());
  const s = randomStream(9);
  let m = 0, v = 0;
  const n = 200_000;
  for (let i = 0; i < n; i++) {
    const x = s.normal();
    m += x;
    v += x * x;
  }
  m /= n;
  v = v / n - m * m;
  // common practice: 5 standard errors of the mean and variance estimates
  assert.ok(Math.abs(m) < 5 / Math.sqrt(n));
  assert.ok(Math.abs(v - 1) < 5 * Math.sqrt(2 / n));
});

Deno.test("randomStream() rejects bad seeds", () => {
  assert.throws(() => randomStream(-1), RangeError);
  assert.throws(() => randomStream(1.5), RangeError);
  assert.throws(() => randomStream(1, 2 ** 32), RangeError);
});

Deno.test("randomStream().fill() gives the bits of as many uniform() calls", () => {
  for (const [seed, index] of [[0, 0], [1, 7], [4294967295, 4294967295], [123456, 99]]) {
    const a = randomStream(seed, index), b = randomStream(seed, index);
    const out = new Float64Array(1000);
    a.fill(out, 3);
    a.fill(out.subarray(3), 997);
    for (let i = 0; i < 1000; i++) assert.equal(out[i], b.uniform(), `${seed}/${index}: ${i}`);
    // the stream goes on where fill stopped, for every kind of draw
    assert.equal(a.uniform(), b.uniform());
    assert.equal(a.normal(), b.normal());
    assert.equal(a.int(0, 1000), b.int(0, 1000));
  }
});
