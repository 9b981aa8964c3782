import assert from "node:assert/strict";
import { collinearityConditionNumber, conditionNumber } from "../../../core/stats/mod.ts";

Deno.test("collinearityConditionNumber() equals √((1+r)/(1−r)) for two regressors", () => {
  // algebra of the 2×2 correlation matrix (eigenvalues 1 ± r): common practice
  const n = 50, x = new Float64Array(n), z = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    x[i] = Math.sin(i);
    z[i] = Math.sin(i) + 0.5 * Math.cos(3 * i);
  }
  let sx = 0, sz = 0, sxz = 0, mx = 0, mz = 0;
  for (let i = 0; i < n; i++) (mx += x[i] / n), (mz += z[i] / n);
  for (let i = 0; i < n; i++) {
    sx += (x[i] - mx) ** 2;
    sz += (z[i] - mz) ** 2;
    sxz += (x[i] - mx) * (z[i] - mz);
  }
  const r = Math.abs(sxz / Math.sqrt(sx * sz));
  const c = collinearityConditionNumber([x, z]);
  assert.ok(Math.abs(c - Math.sqrt((1 + r) / (1 - r))) < 1e-9);
});

Deno.test("collinearityConditionNumber() is Infinity for duplicated or constant regressors", () => {
  const x = new Float64Array([1, 2, 3, 5]);
  assert.equal(collinearityConditionNumber([new Float64Array(4).fill(2)]), Infinity);
  assert.ok(collinearityConditionNumber([x, x.map((v) => 3 * v + 1)]) > 1e12);
  assert.equal(collinearityConditionNumber([x]), 1);
});

Deno.test("conditionNumber() rejects empty designs and short columns", () => {
  assert.throws(() => conditionNumber([]), RangeError);
  assert.throws(() => conditionNumber([new Float64Array(1), new Float64Array(1)]), RangeError);
});
