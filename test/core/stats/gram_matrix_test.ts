import assert from "node:assert/strict";
import { gramMatrix, gramMatrixJs, gramMatrixModule } from "../../../core/stats/gram_matrix.ts";
import { randomStream } from "../../../core/random/mod.ts";

function columns(m: number, n: number, seed: number): Float64Array[] {
  const s = randomStream(seed);
  return Array.from({ length: m }, () => Float64Array.from({ length: n }, () => s.normal()));
}

Deno.test("gramMatrix() is bit-identical to the plain loop", async (t) => {
  assert.ok(WebAssembly.validate(gramMatrixModule()));
  // sizes around the 8-column panels, the row pairs and the row blocks (96 KiB of rows)
  const sizes: [number, number][] = [
    [1, 1],
    [1, 5],
    [2, 3],
    [3, 1],
    [7, 100],
    [8, 9],
    [9, 2000],
    [16, 1],
    [17, 1537],
    [100, 3001],
  ];
  for (const [m, n] of sizes) {
    await t.step(`${m} columns of ${n}`, () => {
      const c = columns(m, n, 10 * m + n), w = gramMatrix(c), j = gramMatrixJs(c);
      for (let a = 0; a < m; a++) {
        for (let b = 0; b < m; b++) assert.ok(Object.is(w[a][b], j[a][b]), `G[${a}][${b}]`);
      }
    });
  }
  await t.step("the sums follow the order of the points (no reassociation)", () => {
    // 1 + 1e-16 + 1e-16 rounds to 1 summed left to right, to 1 + 2.2e-16 summed right to left
    const x = Float64Array.of(1, 1e-8, 1e-8), one = Float64Array.of(1, 1e-8, 1e-8);
    const g = gramMatrix([x, one, x]);
    assert.equal(g[0][1], 1);
    assert.equal(g[2][0], 1);
  });
  await t.step("a second call reuses the kernel's memory without stale sums", () => {
    const big = columns(20, 4000, 1), small = columns(3, 10, 2);
    gramMatrix(big);
    assert.deepEqual(gramMatrix(small), gramMatrixJs(small));
  });
});

Deno.test("gramMatrix() of no columns or empty columns", () => {
  assert.deepEqual(gramMatrix([]), []);
  assert.deepEqual(gramMatrix([new Float64Array(0), new Float64Array(0)]), [[0, 0], [0, 0]]);
});

Deno.test("gramMatrixJs() computes AᵀA", () => {
  // [1 3; 2 4]ᵀ[1 3; 2 4] = [5 11; 11 25]
  assert.deepEqual(gramMatrixJs([Float64Array.of(1, 2), Float64Array.of(3, 4)]), [[5, 11], [
    11,
    25,
  ]]);
});

Deno.test("gramMatrix() rejects columns of different lengths", () => {
  for (const f of [gramMatrix, gramMatrixJs]) {
    assert.throws(() => f([new Float64Array(3), new Float64Array(2)]), RangeError);
  }
});
