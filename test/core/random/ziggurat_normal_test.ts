import assert from "node:assert/strict";
import { fillNormalZiggurat, randomStream } from "../../../core/random/mod.ts";
import { normalCdf } from "../../../core/stats/mod.ts";
import { xoroshiro128plus } from "pure-rand/generator/xoroshiro128plus";

Deno.test("fillNormalZiggurat() draws N(0, 1): Kolmogorov–Smirnov against the normal CDF", () => {
  const n = 200_000, x = new Float64Array(n);
  fillNormalZiggurat(xoroshiro128plus(2024), x);
  x.sort();
  let d = 0;
  for (let i = 0; i < n; i++) {
    const f = normalCdf(x[i]);
    d = Math.max(d, Math.abs(f - i / n), Math.abs((i + 1) / n - f));
  }
  // KS critical value at 1 %: 1.628/√n (Massey 1951, J. Amer. Statist. Assoc. 46, 68)
  assert.ok(d < 1.628 / Math.sqrt(n), `D = ${d}`);
  // the tail beyond r = 3.4426 (Marsaglia & Tsang 2000) has probability 2(1 − Φ(r))
  let tail = 0;
  for (const v of x) if (Math.abs(v) > 3.442619855899) tail++;
  const p = 2 * (1 - normalCdf(3.442619855899));
  assert.ok(Math.abs(tail / n - p) < 5 * Math.sqrt(p / n), `tail ${tail / n} vs ${p}`);
});

Deno.test("fillNormalZiggurat() is reproducible, fills only its range and refuses bad ranges", async (t) => {
  await t.step("the same stream fills the same values; fills continue the stream", () => {
    const a = new Float64Array(10), b = new Float64Array(10);
    randomStream(5, 3).fillNormal(a);
    const s = randomStream(5, 3);
    s.fillNormal(b, 0, 4);
    s.fillNormal(b, 4, 10);
    assert.deepEqual(a, b);
  });
  await t.step("outside the range nothing changes", () => {
    const a = new Float64Array(5);
    randomStream(1).fillNormal(a, 1, 3);
    assert.equal(a[0], 0);
    assert.equal(a[4], 0);
    assert.ok(a[1] !== 0 && a[2] !== 0);
  });
  await t.step("a range outside the array is refused", () => {
    assert.throws(() => randomStream(1).fillNormal(new Float64Array(3), 2, 5), RangeError);
    assert.throws(() => randomStream(1).fillNormal(new Float64Array(3), -1, 2), RangeError);
  });
});
