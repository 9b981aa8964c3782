import assert from "node:assert/strict";
import {
  lowerTriangularMixer,
  lowerTriangularMixingModule,
  mixLowerTriangularJs,
} from "../../../core/irradiance/lower_triangular_mixing.ts";
import { randomStream } from "../../../core/random/mod.ts";

/** A random lower-triangular factor with entries above the diagonal set to garbage (ignored). */
function factor(B: number, seed: number): Float64Array {
  const s = randomStream(seed), L = new Float64Array(B * B);
  for (let a = 0; a < B; a++) {
    for (let c = 0; c < B; c++) L[a * B + c] = c <= a ? s.normal() : 1e300;
  }
  return L;
}

Deno.test("lowerTriangularMixer() is bit-identical to the plain loop", async (t) => {
  assert.ok(WebAssembly.validate(lowerTriangularMixingModule()));
  for (const B of [1, 2, 7, 8, 9, 16, 17, 100]) {
    await t.step(`order ${B}`, () => {
      const L = factor(B, B), w = lowerTriangularMixer(L, B, 9), j = mixLowerTriangularJs(L, B, 9);
      assert.equal(w.name, "wasm-simd-f64");
      assert.ok(w.stride >= B);
      const s = randomStream(100 + B);
      for (const days of [9, 1, 0, 2, 5, 8]) {
        s.fillNormal(j.z, 0, days * B);
        w.z.set(j.z.subarray(0, days * B));
        w.mix(days);
        j.mix(days);
        for (let d = 0; d < days; d++) {
          for (let a = 0; a < B; a++) {
            assert.ok(Object.is(w.e[d * w.stride + a], j.e[d * B + a]), `day ${d} row ${a}`);
          }
        }
      }
    });
  }
  await t.step("the sums follow the order of the columns (no reassociation)", () => {
    // 1 + 1e-16 + 1e-16 rounds to 1 summed left to right, to 1 + 2.2e-16 summed right to left
    const L = Float64Array.of(1, 0, 0, 1, 1, 0, 1, 1, 1);
    const w = lowerTriangularMixer(L, 3, 2);
    w.z.set([1, 1e-16, 1e-16, 1, 1e-16, 1e-16]);
    w.mix(2);
    assert.equal(w.e[2], 1);
    assert.equal(w.e[w.stride + 2], 1);
  });
});

Deno.test("mixLowerTriangularJs() computes L·z for each day", () => {
  // [[2, 0], [1, 3]]·[1, 2] = [2, 7]; ·[0, -1] = [0, -3]
  const j = mixLowerTriangularJs(Float64Array.of(2, 99, 1, 3), 2, 2);
  j.z.set([1, 2, 0, -1]);
  j.mix(2);
  assert.deepEqual([...j.e], [2, 7, 0, -3]);
});

Deno.test("lowerTriangularMixer() rejects a bad factor or day count", () => {
  for (const make of [lowerTriangularMixer, mixLowerTriangularJs]) {
    assert.throws(() => make(new Float64Array(3), 2), RangeError);
    assert.throws(() => make(new Float64Array(0), 0), RangeError);
    assert.throws(() => make(new Float64Array(4), 2, 0), RangeError);
    const m = make(Float64Array.of(1, 0, 0, 1), 2, 4);
    assert.throws(() => m.mix(5), /days must be in \[0, 4\], got 5/);
    assert.throws(() => m.mix(1.5), RangeError);
    assert.throws(() => m.mix(-1), RangeError);
  }
});
